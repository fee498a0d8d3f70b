"""A complete run of a case: the solve, and when a junction is declared the extra solves it
needs (surface-temperature solve, refined-grid check) and its evaluation."""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any

from fvheat.case.model import Case
from fvheat.case.resistances import with_surface_resistances
from fvheat.case.signals import Constant
from fvheat.checks import check_model
from fvheat.evaluate.coupling import CouplingResult, coupling_coefficients
from fvheat.evaluate.junction import JUNCTION_QUANTITIES, JunctionResult, evaluate_junction
from fvheat.mesh.mesh import Mesh
from fvheat.mesh.rectilinear import check_refined_size
from fvheat.mesh.select import build_mesh
from fvheat.sensitivity.result import Sensitivities
from fvheat.simulate import Progress, Solution, simulate

#: ISO 10211 (from memory): the sum of absolute heat flows must change by less than 1 % when
#: the subdivisions are doubled
GRID_CHECK_LIMIT = 0.01
#: refinement factor per direction: halves every cell size, at least doubling the cell count
GRID_CHECK_REFINE = 2.0


#: junction quantities the grid check also shows on both grids (name, JunctionResult attribute)
GRID_QUANTITIES = tuple((k, JUNCTION_QUANTITIES[k]) for k in ("L2D", "psi", "U_f", "f_Rsi"))
#: a quantity that changes on the refined grid by more than this fraction of its value and
#: more than the absolute step it is quoted to (ψ, L2D, U_f to 0.01 W/(m·K) or W/(m²·K),
#: f_Rsi to 0.01: common practice) is named in a warning, even when Σ|Φ| passes
GRID_QUANTITY_STEP = 0.005


@dataclass(frozen=True)
class GridCheck:
    """Sum of absolute boundary heat flows (W/m) on the mesh and on a refined one, and the
    junction quantities (ψ, L2D, U_f, f_Rsi) on both: ``quantities`` name → (value on the
    mesh, value on the refined mesh). Only Σ|Φ| decides pass or fail (ISO 10211)."""

    cells: int
    cells_refined: int
    total: float
    total_refined: float
    quantities: dict[str, tuple[float, float]] = field(default_factory=dict)

    @property
    def change(self) -> float:
        """Relative change of the sum of absolute heat flows."""
        return abs(self.total_refined - self.total) / self.total_refined

    @property
    def passed(self) -> bool:
        """Whether Σ|Φ| changes less than the limit (1 %, ISO 10211)."""
        return self.change < GRID_CHECK_LIMIT

    @property
    def warnings(self) -> list[str]:
        """The junction quantities that moved on the refined grid by more than 1 % of their
        value and half the step they are quoted to, though Σ|Φ| may pass."""
        out = []
        for name, (a, b) in self.quantities.items():
            step = abs(b - a)
            if step > GRID_QUANTITY_STEP and step > GRID_CHECK_LIMIT * abs(b):
                verdict = "passes" if self.passed else "fails"
                out.append(
                    f"grid check: {name} changes from {a:.4g} to {b:.4g} on the refined grid "
                    f"({step / abs(b):.1%}) although the sum of heat flows {verdict} the 1 % "
                    "rule; refine the mesh (smaller max_cell / min_cell) until it settles"
                )
        return out

    def as_dict(self) -> dict[str, Any]:
        """The grid check as a JSON-ready dict (W/m; change as a fraction)."""
        return {
            "cells": self.cells,
            "cells_refined": self.cells_refined,
            "sum_abs_heat_flow": self.total,
            "sum_abs_heat_flow_refined": self.total_refined,
            "change": self.change,
            "limit": GRID_CHECK_LIMIT,
            "pass": self.passed,
            "junction": {
                name: {
                    "value": a,
                    "refined": b,
                    "change": b - a,
                    "relative_change": (b - a) / abs(b) if b != 0.0 else None,
                }
                for name, (a, b) in self.quantities.items()
            },
        }


@dataclass
class Study:
    """The main solution, the steady heat-loss solution of a junction (the main one when
    steady), its surface-temperature solution and results, and the grid check."""

    solution: Solution
    junction: JunctionResult | None = None
    surface_solution: Solution | None = None
    grid: GridCheck | None = None
    warnings: list[str] = field(default_factory=list)
    coupling: CouplingResult | None = None
    sensitivities: Sensitivities | None = None

    @property
    def all_warnings(self) -> list[str]:
        """The modelling checks' warnings, then the junction evaluation's, the grid check's
        and the coupling coefficients'."""
        out = self.warnings + (self.junction.warnings if self.junction is not None else [])
        out += self.grid.warnings if self.grid is not None else []
        return out + (self.coupling.warnings if self.coupling is not None else [])


def surface_case(case: Case) -> Case | None:
    """The junction's surface-temperature case (f_Rsi, θ_si,min), or None when it is the
    heat-loss case itself."""
    j = case.junction
    assert j is not None
    return with_surface_resistances(case, j.surface_resistances)


def steady_case(case: Case) -> Case:
    """The case without ``[time]``: the steady problem of its t = 0 conditions."""
    return replace(case, time=None)


def without_fluxes(case: Case) -> Case:
    """``case`` with every imposed heat flux left out (a flux-only boundary adiabatic): L2D,
    ψ and f_Rsi are those of the environments' temperatures alone (ISO 10211 defines L2D as
    the heat flow per kelvin between two environments; from memory)."""
    bounds = tuple(
        replace(b, heat_flux=Constant(0.0) if b.kind == "flux" else None)
        if b.heat_flux is not None
        else b
        for b in case.boundaries
    )
    return replace(case, boundaries=bounds)


def grid_check(case: Case, solution: Solution, junction: JunctionResult | None = None) -> GridCheck:
    """Solve again with every cell size halved and compare Σ|Φ| over all boundaries; with
    the ``junction`` results of ``solution``, evaluate the junction on the refined mesh too
    (its surface-temperature solve included) and show ψ, L2D, U_f and f_Rsi on both."""
    mesh = build_mesh(case, refine=GRID_CHECK_REFINE)
    fine = simulate(case, mesh=mesh, keep_fields=False)
    quantities: dict[str, tuple[float, float]] = {}
    if junction is not None:
        surf = surface_case(case)
        fine_surface = None if surf is None else simulate(surf, mesh=mesh, keep_fields=False)
        fine_j = evaluate_junction(case, fine, fine_surface)
        for name, attr in GRID_QUANTITIES:
            a, b = getattr(junction, attr), getattr(fine_j, attr)
            if a is not None and b is not None:
                quantities[name] = (float(a), float(b))
    return GridCheck(
        cells=solution.mesh.n_cells,
        cells_refined=fine.mesh.n_cells,
        total=sum(abs(r.heat_flow) for r in solution.surfaces.values()),
        total_refined=sum(abs(r.heat_flow) for r in fine.surfaces.values()),
        quantities=quantities,
    )


def run_study(
    case: Case,
    *,
    mesh: Mesh | None = None,
    progress: Progress | None = None,
    check_grid: bool | None = None,
    keep_fields: bool = True,
    warnings: list[str] | None = None,
) -> Study:
    """Solve ``case`` and, if it declares a junction, everything the junction needs.

    ``check_grid`` overrides the case's ``junction.grid_check`` (None: as the case says; a
    case without a junction is grid-checked only when asked). ``keep_fields``: keep the cell
    field of every saved time of a transient run (only field outputs need them).
    ``warnings``: the modelling checks' warnings when they have been run already
    (:func:`fvheat.checks.check_model`).
    """
    mesh = mesh if mesh is not None else build_mesh(case)
    if warnings is None:
        warnings = check_model(case, mesh)
    j = case.junction
    want_grid = check_grid if check_grid is not None else (j is not None and j.grid_check)
    if want_grid:  # a refined grid beyond [mesh] max_cells is refused before any solve
        check_refined_size(case, mesh, GRID_CHECK_REFINE)
    solution = simulate(case, mesh=mesh, progress=progress, keep_fields=keep_fields)
    study = Study(solution, warnings=warnings)
    if j is None and not want_grid:
        return study
    # the junction's solves: steady, t = 0 conditions, imposed heat fluxes left out
    fluxes = j is not None and j.pair and case.imposes_heat_flux
    jcase = without_fluxes(steady_case(case)) if fluxes else steady_case(case)
    base = solution if not (case.transient or fluxes) else simulate(jcase, mesh=mesh)
    if j is not None and j.environments:
        study.coupling = coupling_coefficients(steady_case(case), base.system)
    if j is not None and j.pair:
        surf = surface_case(jcase)
        if surf is not None:
            study.surface_solution = simulate(surf, mesh=mesh)
        study.junction = evaluate_junction(jcase, base, study.surface_solution)
        if fluxes:
            study.junction.warnings.append(
                "imposed heat fluxes are left out of L2D, ψ, f_Rsi and θ_si,min (ISO 10211: "
                "the two environments' temperatures alone); the boundary heat flows include "
                "them"
            )
    if want_grid:
        study.grid = grid_check(jcase, base, study.junction)
    return study
