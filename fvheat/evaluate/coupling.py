"""Thermal coupling coefficients between more than two environments (ISO 10211).

Each environment is a set of boundaries at one temperature. With environment j at 1 K and
all others at 0 (imposed heat fluxes left out), the steady field T_j gives the heat flow
Φ_i^(j) (W/m) into the body through the boundaries of every environment i. The system
matrix does not depend on the boundary temperatures, so it is factorised once and each
environment costs one back-substitution.

Sign convention (ISO 10211's, L_ij ≥ 0 between environments):

* L_ij = −Φ_i^(j) for i ≠ j, W/(m·K): the heat flow from environment i to environment j is
  L_ij·(θ_i − θ_j), and L_ij ≥ 0;
* L_ii = Φ_i^(i), the heat flow into the body from environment i when it alone is at 1 K,
  which equals the sum Σ_{j≠i} L_ij of the other entries of its row;
* so the heat flow from environment i into the body is Φ_i = Σ_{j≠i} L_ij·(θ_i − θ_j).

The matrix must be symmetric (reciprocity) and its rows must sum as above (energy
conservation); both are checked and reported relative to the largest entry.

Temperature weighting factors: the surface temperature at a point is θ = Σ_j g_j·θ_j with
g_j the point's temperature in the solve with environment j at 1 K (Σ_j g_j = 1). They are
given at the coldest surface point of each environment's boundaries at the case's own
environment temperatures, so θ there can be evaluated for any set of temperatures.
They come from the heat-loss system (the boundaries' own surface resistances).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any

import numpy as np

from fvheat.assembly.enthalpy import EnthalpyModel
from fvheat.assembly.system import System
from fvheat.case.model import Boundary, Case
from fvheat.case.signals import Constant
from fvheat.errors import CaseError
from fvheat.evaluate.junction import side_temperature
from fvheat.evaluate.surfaces import surface_points
from fvheat.mesh.mesh import Mesh
from fvheat.solve.linear import make_solver


@dataclass(frozen=True)
class WeightedPoint:
    """The coldest surface point of one environment's boundaries at the case's temperatures:
    where it is (m), on which boundary, its temperature there (°C) and its weighting
    factors ``g`` (one per environment, in case order)."""

    environment: str
    boundary: str
    at: tuple[float, float]
    temperature: float
    g: tuple[float, ...]

    def as_dict(self) -> dict[str, Any]:
        """The point as a JSON-ready dict (°C, m, weighting factors g)."""
        return {
            "environment": self.environment,
            "boundary": self.boundary,
            "at": list(self.at),
            "temperature": self.temperature,
            "g": list(self.g),
        }


@dataclass
class CouplingResult:
    """Coupling coefficients L (W/(m·K), see the module notes for the signs), the checks of
    symmetry and row sums (largest deviation relative to the largest |L|), the case's
    environment temperatures (°C) and the weighting factors at each environment's coldest
    surface point."""

    environments: list[str]
    temperatures: list[float]
    matrix: np.ndarray
    symmetry_error: float
    row_sum_error: float
    points: list[WeightedPoint]
    warnings: list[str] = field(default_factory=list)

    def heat_flows(self, temperatures: np.ndarray | list[float]) -> np.ndarray:
        """Heat flow from each environment into the body (W/m) at environment
        temperatures ``temperatures`` (°C, case order): Φ_i = Σ_{j≠i} L_ij·(θ_i − θ_j)."""
        t = np.asarray(temperatures, dtype=float)
        off = self.matrix - np.diag(np.diag(self.matrix))
        return off @ np.ones_like(t) * t - off @ t

    def as_dict(self) -> dict[str, Any]:
        """The coupling coefficients L (W/(m·K)) as a JSON-ready dict."""
        return {
            "environments": list(self.environments),
            "L": self.matrix.tolist(),
            "unit": "W/(m·K)",
            "convention": (
                "L[i][j] (i ≠ j) ≥ 0: heat flow from environment i to j is L[i][j]·(θ_i − θ_j); "
                "L[i][i] = heat flow into the body from i alone at 1 K = Σ_{j≠i} L[i][j]"
            ),
            "symmetry_error": self.symmetry_error,
            "row_sum_error": self.row_sum_error,
            "checks_pass": bool(self.symmetry_error < 1e-8 and self.row_sum_error < 1e-8),
            "temperatures": list(self.temperatures),
            "weighting_factors": [p.as_dict() for p in self.points],
            "weighting_factors_from": "heat-loss solve (the boundaries' own surface resistances)",
            "warnings": list(self.warnings),
        }


def check_coupling(case: Case, mesh: Mesh | None = None) -> list[float]:
    """The environments' temperatures (°C); :class:`CaseError` when coupling coefficients
    cannot be computed (a radiating boundary, temperature-dependent conductivity)."""
    j = case.junction
    assert j is not None and j.environments
    for b in case.boundaries:
        if b.radiative:
            raise CaseError(
                f"boundary {b.name!r} radiates (emissivity > 0), which is non-linear; coupling "
                "coefficients need linear surfaces: give it a combined surface resistance",
                file=str(case.source),
                key="junction.environments",
            )
    if mesh is not None and EnthalpyModel.build(case, mesh).variable_conductivity:
        raise CaseError(
            "a material's conductivity changes with its phase, which is non-linear; coupling "
            "coefficients need constant conductivities",
            file=str(case.source),
            key="junction.environments",
        )
    return [
        side_temperature(case, env.boundaries, f"environments.{i}")
        for i, env in enumerate(j.environments)
    ]


def _unit_boundary(b: Boundary, value: float) -> Boundary:
    """``b`` at the constant temperature ``value`` (°C), without any imposed heat flux."""
    if b.kind == "temperature":
        return replace(b, temperature=Constant(value), heat_flux=None)
    if b.kind == "surface":
        return replace(b, air_temperature=Constant(value), radiant_temperature=None, heat_flux=None)
    return replace(b, heat_flux=Constant(0.0))


def coupling_coefficients(case: Case, system: System) -> CouplingResult:
    """Coupling coefficients and weighting factors of the case's environments from unit
    solves on the steady ``system`` of ``case`` (one factorisation, a back-substitution
    per environment)."""
    j = case.junction
    assert j is not None and j.environments
    temps = check_coupling(case, system.mesh)
    envs = j.environments
    index = {b.name: k for k, b in enumerate(case.boundaries)}
    env_of = np.full(len(case.boundaries), -1)
    for i, env in enumerate(envs):
        env_of[[index[n] for n in env.boundaries]] = i
    solver = make_solver(system.matrix, case.solver, repeated=True)
    n = len(envs)
    flows = np.zeros((n, n))  # flows[i, j] = Φ_i^(j)
    point_values = []
    surf = system.surface
    for jj in range(n):
        bounds = tuple(
            _unit_boundary(b, 1.0 if env_of[k] == jj else 0.0)
            for k, b in enumerate(case.boundaries)
        )
        unit = replace(system, surface=replace(surf, boundaries=bounds))
        temp = solver.solve(unit.sources(0.0))
        ts, flux, _ = unit.surface.surface_state(temp, 0.0)
        per_boundary = np.bincount(surf.bid, weights=flux, minlength=len(bounds))
        mine: np.ndarray = env_of >= 0
        flows[:, jj] = np.bincount(env_of[mine], weights=per_boundary[mine], minlength=n)
        point_values.append(surface_points(system.mesh, unit.surface, ts).temperature)
    matrix = -flows
    np.fill_diagonal(matrix, np.diag(flows))
    scale = max(float(np.max(np.abs(matrix))), 1e-300)
    off = matrix - np.diag(np.diag(matrix))
    symmetry = float(np.max(np.abs(matrix - matrix.T))) / scale
    row_sum = float(np.max(np.abs(np.diag(matrix) - off.sum(axis=1)))) / scale

    values = np.array(point_values)  # (environments, points)
    pts = surface_points(system.mesh, surf, np.zeros(surf.face.size))
    at_case = np.asarray(temps) @ values
    point_env = env_of[pts.bid]
    points = []
    for i, env in enumerate(envs):
        mine = np.flatnonzero(point_env == i)
        if mine.size == 0:
            continue
        k = int(mine[np.argmin(at_case[mine])])
        points.append(
            WeightedPoint(
                environment=env.name,
                boundary=case.boundaries[int(pts.bid[k])].name,
                at=(float(pts.at[k, 0]), float(pts.at[k, 1])),
                temperature=float(at_case[k]),
                g=tuple(float(v) for v in values[:, k]),
            )
        )
    warnings = []
    if any(b.heat_flux is not None for b in case.boundaries):
        warnings.append(
            "imposed heat fluxes are left out of the coupling coefficients and the weighting "
            "factors (they are not environments)"
        )
    return CouplingResult(
        environments=[e.name for e in envs],
        temperatures=[float(t) for t in temps],
        matrix=matrix,
        symmetry_error=symmetry,
        row_sum_error=row_sum,
        points=points,
        warnings=warnings,
    )
