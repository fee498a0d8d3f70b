"""Thermal-bridge results of a solved junction: L2D, ψ, f_Rsi, θ_si,min, U_f, dew point.

ISO 10211: L2D = Φ / (θ_i − θ_e) with Φ the heat flow through the warm-side surfaces
(W/m); ψ = L2D − Σ U_j·l_j over the flanking elements; f_Rsi = (θ_si,min − θ_e)/(θ_i − θ_e).
ISO 10077-2: with the glazing replaced by an insulating panel, U_f = (L2D − U_p·b_p)/b_f,
i.e. ψ/b_f when the panel is the only flanking element.

Dimension systems (ISO 10211 / ISO 14683 terms): ψ depends on how the flanking lengths l_j
were measured (internal, overall internal or external dimensions); L2D does not. ψ is
computed for every system in which every flanking element has a length,
ψ_sys = L2D − Σ U_j·l_j,sys; ``psi`` is the one of the junction's ``dimensions``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, cast

import numpy as np

from fvheat.case.ground import FLOOR_FLANKING
from fvheat.case.junction import DIMENSIONS
from fvheat.case.model import Case, Junction
from fvheat.errors import CaseError
from fvheat.evaluate.ground import GroundFloor, ground_floor
from fvheat.evaluate.humidity import SATURATION_BASIS, dew_point, surface_relative_humidity
from fvheat.evaluate.layers import CutError, LayerCut, layer_cut
from fvheat.mesh.mesh import Mesh
from fvheat.simulate import Solution

#: surface relative humidity at which mould growth is assumed possible (ISO 13788 uses it
#: as the design criterion; common practice)
MOULD_RH = 0.8


@dataclass(frozen=True)
class FlankingResult:
    """U-value (W/(m²·K)) and length (m) of one flanking element; ``cut`` when from layers."""

    name: str
    u_value: float
    length: float
    cut: LayerCut | None = None
    lengths: dict[str, float] = field(default_factory=dict)
    u_from: str | None = None  # where U came from when neither given nor from layers

    @property
    def source(self) -> str:
        """Where the U-value came from: "layers", "given" or e.g. "ISO 13370"."""
        return self.u_from or ("layers" if self.cut is not None else "given")

    def as_dict(self) -> dict[str, Any]:
        """The flanking element as a JSON-ready dict (U W/(m²·K), lengths m)."""
        out: dict[str, Any] = {"name": self.name, "u_value": self.u_value, "length": self.length}
        out["lengths"] = dict(self.lengths or {})
        if self.cut is not None:
            out["u_from"] = "layers"
            out["layers"] = [
                {"material": m, "thickness": d, "conductivity": k} for m, d, k in self.cut.layers
            ]
            out["r_si"], out["r_se"] = self.cut.r_start, self.cut.r_end
        else:
            out["u_from"] = self.source
        return out


#: the junction quantities by the names summaries, sensitivities, target goals and the grid
#: check use → :class:`JunctionResult` attribute (the order they are shown in)
JUNCTION_QUANTITIES = {
    "psi": "psi",
    "L2D": "l2d",
    "U_f": "u_f",
    "f_Rsi": "f_rsi",
    "theta_si_min": "theta_si_min",
}


@dataclass
class JunctionResult:
    """Everything a thermal-bridge report states about one junction."""

    theta_i: float
    theta_e: float
    heat_flow: float
    l2d: float
    psi: float
    dimensions: str
    flanking: list[FlankingResult]
    f_rsi: float
    theta_si_min: float
    theta_si_min_at: tuple[float, float]
    f_rsi_from: str
    f_rsi_limit: float | None = None
    f_rsi_resistances: dict[str, float] | None = None
    f_rsi_default: bool = False
    separate_surface_solve: bool = False
    u_f: float | None = None
    dew_point: float | None = None
    surface_rh: float | None = None
    warnings: list[str] = field(default_factory=list)
    psi_by_dimensions: dict[str, float] = field(default_factory=dict)
    ground: GroundFloor | None = None

    @property
    def psi_note(self) -> str | None:
        """Which system ψ is in, when the flanking lengths are given in that one only."""
        if not self.flanking or len(self.psi_by_dimensions) > 1:
            return None
        return (
            f"ψ in {self.dimensions.replace('_', ' ')} dimensions only: no flanking length is "
            "given in another dimension system"
        )

    @property
    def f_rsi_pass(self) -> bool | None:
        """Whether f_Rsi reaches the limit; None without a limit."""
        return None if self.f_rsi_limit is None else bool(self.f_rsi >= self.f_rsi_limit)

    def as_dict(self) -> dict[str, Any]:
        """The junction result as a JSON-ready dict (L2D, ψ W/(m·K); θ °C)."""
        out: dict[str, Any] = {
            "L2D": self.l2d,
            "psi": self.psi,
            "f_Rsi": self.f_rsi,
            "theta_si_min": self.theta_si_min,
            "theta_si_min_at": list(self.theta_si_min_at),
            "f_Rsi_from": self.f_rsi_from,
            "f_Rsi_surface_resistances": self.f_rsi_resistances,
            "f_Rsi_resistance_default": self.f_rsi_default,
            "f_Rsi_separate_solve": self.separate_surface_solve,
            "f_Rsi_limit": self.f_rsi_limit,
            "f_Rsi_pass": self.f_rsi_pass,
            "theta_i": self.theta_i,
            "theta_e": self.theta_e,
            "heat_flow": self.heat_flow,
            "dimensions": self.dimensions,
            "psi_by_dimensions": dict(self.psi_by_dimensions),
            "flanking": [f.as_dict() for f in self.flanking],
        }
        if self.psi_note is not None:
            out["psi_dimensions_note"] = self.psi_note
        if self.ground is not None:
            out["ground"] = {"psi_g": self.psi, **self.ground.as_dict()}
        if self.u_f is not None:
            out["U_f"] = self.u_f
        if self.dew_point is not None:
            out["dew_point"] = self.dew_point
            out["dew_point_basis"] = SATURATION_BASIS
            out["surface_rh_at_theta_si_min"] = self.surface_rh
            out["condensation_at_theta_si_min"] = bool(self.theta_si_min < self.dew_point)
            out["mould_risk_rh_80"] = bool(
                self.surface_rh is not None and self.surface_rh >= MOULD_RH
            )
        out["warnings"] = list(self.warnings)
        return out


def side_temperature(case: Case, names: tuple[str, ...], side: str) -> float:
    """The common reference temperature (°C) of the boundaries ``names`` at t = 0 (the
    steady junction solves use the t = 0 conditions; see :func:`varying_sides`)."""
    temps = {}
    for n in names:
        b = case.boundary(n)
        sig = b.reference_temperature
        if sig is None:
            raise CaseError(
                f"boundary {n!r} needs an air or surface temperature for junction results",
                file=str(case.source),
                key=f"junction.{side}",
            )
        temps[n] = float(sig.at(0.0))
    if len(set(temps.values())) > 1:
        raise CaseError(
            f"the {side} boundaries must share one temperature for L2D, got {temps}",
            file=str(case.source),
            key=f"junction.{side}",
        )
    return next(iter(temps.values()))


def radiant_apart(case: Case) -> list[tuple[str, float, float]]:
    """(name, air °C, radiant °C) of the junction's side boundaries that radiate (emissivity
    > 0) to a temperature other than their air's at t = 0."""
    j = case.junction
    assert j is not None
    out = []
    for n in (*j.inside, *j.outside):
        b = case.boundary(n)
        if b.kind != "surface" or not b.emissivity or b.radiant_temperature is None:
            continue
        assert b.air_temperature is not None
        ta, tr = float(b.air_temperature.at(0.0)), float(b.radiant_temperature.at(0.0))
        if abs(tr - ta) > 1e-9:
            out.append((n, ta, tr))
    return out


def varying_sides(case: Case) -> list[str]:
    """The junction's side boundaries whose temperature changes with time."""
    j = case.junction
    assert j is not None
    return [
        n
        for n in (*j.inside, *j.outside)
        if (sig := case.boundary(n).reference_temperature) is not None and not sig.is_constant
    ]


def junction_temperatures(case: Case) -> tuple[float, float]:
    """The warm-side and cold-side temperatures θ_i, θ_e (°C) of the case's junction;
    :class:`CaseError` when a side has no common temperature at t = 0 or both are equal."""
    j = case.junction
    assert j is not None
    theta_i = side_temperature(case, j.inside, "inside")
    theta_e = side_temperature(case, j.outside, "outside")
    if theta_i == theta_e:
        raise CaseError(
            "inside and outside temperatures are equal; L2D needs a temperature difference",
            file=str(case.source),
            key="junction",
        )
    return theta_i, theta_e


def flanking_results(case: Case, mesh: Mesh) -> list[FlankingResult]:
    """U-values and lengths of the flanking elements (layer cuts read from the mesh)."""
    return _flanking(case, mesh)[0]


def _flanking(case: Case, mesh: Mesh) -> tuple[list[FlankingResult], GroundFloor | None]:
    """The flanking elements and the ``[ground]`` floor among them (None without one)."""
    j = case.junction
    assert j is not None
    aligned = [f.cut for f in j.flanking if f.cut is not None and _axis_aligned(f.cut)]
    if mesh.grid is None and (aligned or case.ground is not None):
        # layers and floors are read on the case's own grid: build it once, not per cut
        from fvheat.mesh.rectilinear import build_mesh

        mesh = build_mesh(case)
    out = []
    for k, f in enumerate(j.flanking):
        if f.cut is None:
            assert f.u_value is not None
            out.append(FlankingResult(f.name, f.u_value, f.length, None, dict(f.lengths)))
            continue
        try:
            cut = layer_cut(case, mesh, f.cut)
        except CutError as err:
            raise CaseError(
                str(err), file=str(case.source), key=f"junction.flanking.{k}.cut"
            ) from None
        out.append(FlankingResult(f.name, cut.u_value, f.length, cut, dict(f.lengths)))
    g = ground_floor(case, mesh) if case.ground is not None else None
    if g is not None:
        out.append(
            FlankingResult(FLOOR_FLANKING, g.u_value, g.length, None, g.lengths(), "ISO 13370")
        )
    return out, g


def _axis_aligned(cut: tuple[tuple[float, float], tuple[float, float]]) -> bool:
    """Whether a cut runs along x or y (read on a grid; a sloped one on the geometry)."""
    (x0, y0), (x1, y1) = cut
    return x0 == x1 or y0 == y1


def evaluate_junction(
    case: Case, heat_loss: Solution, surface: Solution | None = None
) -> JunctionResult:
    """Junction results from the heat-loss solution (ψ, L2D) and, when given, a separate
    surface-temperature solution (f_Rsi, θ_si,min) solved with the condensation R_si."""
    j: Junction | None = case.junction
    if j is None:
        raise ValueError("the case declares no [junction]")
    theta_i, theta_e = junction_temperatures(case)
    dtheta = theta_i - theta_e
    phi = sum(heat_loss.surfaces[n].heat_flow for n in j.inside)
    l2d = phi / dtheta
    flanks, ground = _flanking(case, heat_loss.mesh)
    psi = l2d - sum(f.u_value * f.length for f in flanks)
    by_dims = psi_by_dimensions(l2d, flanks, j.dimensions)

    src = surface if surface is not None else heat_loss
    coldest = min(j.f_rsi_boundaries or j.inside, key=lambda n: src.surfaces[n].min_temperature)
    theta_si = src.surfaces[coldest].min_temperature
    f_rsi = (theta_si - theta_e) / dtheta
    basis = j.surface_resistances.describe("junction.condensation_resistance")
    if surface is not None:
        f_from = f"surface-temperature solve with {basis}"
    elif j.surface_resistances.values is None:
        f_from = f"heat-loss solve, with {basis}"
    else:
        f_from = f"heat-loss solve, whose inside surface resistances are the asked {basis}"
    result = JunctionResult(
        theta_i=theta_i,
        theta_e=theta_e,
        heat_flow=phi,
        l2d=l2d,
        psi=psi,
        dimensions=j.dimensions,
        flanking=flanks,
        f_rsi=f_rsi,
        theta_si_min=theta_si,
        theta_si_min_at=src.surfaces[coldest].min_at,
        f_rsi_from=f_from,
        f_rsi_limit=j.f_rsi_limit,
        f_rsi_resistances=j.surface_resistances.values,
        f_rsi_default=bool(j.surface_resistances.defaulted),
        separate_surface_solve=surface is not None,
        psi_by_dimensions=by_dims,
        ground=ground,
    )
    if j.frame_width is not None:
        result.u_f = psi / j.frame_width
    if j.indoor_humidity is not None:
        result.dew_point = float(dew_point(theta_i, j.indoor_humidity))
        result.surface_rh = float(surface_relative_humidity(theta_i, j.indoor_humidity, theta_si))
    result.warnings += cutoff_warnings(case, heat_loss, flanks)
    if dtheta < 0:
        result.warnings.append(
            f"the inside ({theta_i:g} °C) is colder than the outside ({theta_e:g} °C): f_Rsi "
            "(ISO 13788) describes heat flowing out; here it is taken at the coldest inside "
            "point, the one nearest θ_i, and says nothing of the construction (L2D and ψ "
            "hold either way); swap the temperatures to assess f_Rsi"
        )
    varying = varying_sides(case)
    if varying:
        result.warnings.append(
            f"the temperatures of {', '.join(repr(n) for n in varying)} vary in time: L2D, ψ "
            f"and f_Rsi come from the steady field of the t = 0 conditions (θ_i = "
            f"{theta_i:g} °C, θ_e = {theta_e:g} °C)"
        )
    result.warnings += [
        f"boundary {n!r} radiates to {tr:g} °C but its air is at {ta:g} °C: L2D and ψ divide "
        "the heat flow both drive by the air temperatures' difference (ISO 10211 takes one "
        "temperature per environment), so they are not comparable with a catalogue value; "
        "give radiant_temperature = air_temperature for a ψ to compare"
        for n, ta, tr in radiant_apart(case)
    ]
    phi_out = sum(heat_loss.surfaces[n].heat_flow for n in j.outside)
    other = abs(phi + phi_out) / max(abs(phi), 1e-300)
    if other > 1e-6:
        result.warnings.append(
            f"the warm-side and cold-side heat flows differ by {100 * other:.2g} %: heat also "
            "crosses boundaries of neither side; L2D counts only the warm side"
        )
    return result


def psi_by_dimensions(l2d: float, flanks: list[FlankingResult], primary: str) -> dict[str, float]:
    """ψ (W/(m·K)) in every dimension system in which every flanking element has a length:
    L2D − Σ U·l_sys (ISO 10211), the ``primary`` system first. Without flanking elements
    ψ = L2D in the primary system only."""
    out = {}
    for system in (primary, *(d for d in DIMENSIONS if d != primary)):
        if system == primary:
            lengths: list[float | None] = [f.length for f in flanks]
        else:
            lengths = [f.lengths.get(system) for f in flanks]
        if flanks and any(v is None for v in lengths):
            continue
        if not flanks and system != primary:
            continue
        out[system] = l2d - sum(
            f.u_value * cast(float, v) for f, v in zip(flanks, lengths, strict=True)
        )
    return out


def cutoff_warnings(case: Case, solution: Solution, flanks: list[FlankingResult]) -> list[str]:
    """Warn when an adiabatic cut-off plane lies nearer the junction than ISO 10211's minimum
    distance (from memory: the larger of 1 m and three times the flanking thickness)."""
    j = case.junction
    assert j is not None
    if j.frame_width is not None:
        return _frame_panel_warnings(j, flanks)
    if j.centre is None:
        return ["cut-off plane distances not checked: give junction.centre = [x, y]"]
    thick = [f.thickness for f in j.flanking if f.thickness is not None]
    thick += [f.cut.thickness for f in flanks if f.cut is not None]
    need = max([1.0] + [3.0 * t for t in thick])
    mesh = solution.mesh
    adiabatic = mesh.b_boundary < 0
    if not adiabatic.any():
        return []
    dist = np.hypot(*(mesh.b_centre[adiabatic] - np.asarray(j.centre)).T)
    k = int(np.argmin(dist))
    if dist[k] < need - 1e-9:
        x, y = mesh.b_centre[adiabatic][k]
        return [
            f"an adiabatic cut-off plane at ({x:.3f}, {y:.3f}) m is {dist[k]:.2f} m from the "
            f"junction centre, less than the {need:.2f} m ISO 10211 asks for; ψ may be biased"
        ]
    return []


#: ISO 10077-2 (from memory): the insulating panel must show at least 190 mm beyond the frame
MIN_PANEL_WIDTH = 0.19


def _frame_panel_warnings(j: Junction, flanks: list[FlankingResult]) -> list[str]:
    """Frame sections follow ISO 10077-2's geometry rule instead of ISO 10211's cut-off
    distances: the visible panel width (the flanking length) must be at least 190 mm."""
    return [
        f"flanking element {f.name!r} is {1000 * f.length:.0f} mm wide; ISO 10077-2 asks for a "
        f"visible panel width of at least {1000 * MIN_PANEL_WIDTH:.0f} mm"
        for f in flanks
        if f.length < MIN_PANEL_WIDTH - 1e-9
    ]
