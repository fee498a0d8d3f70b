"""The report's first section: the project, the key numbers with their verdicts, the
temperature map and the cautions, on about one screen."""

from __future__ import annotations

from typing import Any

from fvheat.cautions import CAUTION
from fvheat.output.report.blocks import Block, Figure, Para, Section, Table, hours, num, point

#: labels of the [project] keys, in the order they are shown
PROJECT_LABELS = {
    "name": "name",
    "reference": "reference",
    "client": "client",
    "author": "author",
    "checker": "checked by",
    "date": "date",
    "notes": "notes",
}
#: figures shown as "the temperature map", first found first
MAP_FIGURES = ("temperature_surface", "temperature")


def project_rows(project: dict[str, Any]) -> list[list[str]]:
    """The ``[project]`` entries of ``summary.json`` as (label, text) rows."""
    return [[label, str(project[k])] for k, label in PROJECT_LABELS.items() if project.get(k)]


def summary_section(s: dict[str, Any], figures: list[Figure]) -> Section:
    """The opening section: project, key numbers, verdicts, the map and the cautions."""
    blocks: list[Block] = []
    rows = project_rows(s.get("project") or {})
    if rows:
        blocks.append(Table(["project", ""], rows))
    blocks.append(Table(["key result", "value"], key_numbers(s)))
    blocks += _verdicts(s)
    fig = map_figure(figures)
    if fig is not None:
        blocks.append(fig)
    else:
        blocks.append(Para("No temperature map in this folder (run `fvheat plot DIR`).", "note"))
    blocks.append(Para(CAUTION, "caution"))
    j = s.get("junction") or {}
    # summaries written before the modelling checks hold only the junction's warnings
    for w in s.get("warnings", j.get("warnings", [])):
        blocks.append(Para(f"Warning: {w}", "caution"))
    if "warnings" in s and not s["warnings"]:
        blocks.append(Para("The modelling checks found nothing to warn about.", "note"))
    return Section("summary", "Summary", 2, blocks)


def map_figure(figures: list[Figure]) -> Figure | None:
    """The temperature map the summary shows (the surface-temperature solve's when there is
    one: θ_si,min is marked on it), None when the folder has no map."""
    return next((f for name in MAP_FIGURES for f in figures if _stem(f.png) == name), None)


def _stem(png: str) -> str:
    return png.rsplit("/", 1)[-1].rsplit(".", 1)[0]


def key_numbers(s: dict[str, Any]) -> list[list[str]]:
    """The key results as (label, value with unit) rows: junction quantities when there is
    a junction, the worst values over a transient run, else the boundaries' heat flows and
    lowest surface temperatures."""
    rows = [["run", _run_text(s)]]
    j = s.get("junction") or {}
    if "L2D" in j:
        rows += _junction_rows(j)
    elif j.get("coupling"):
        c = j["coupling"]
        rows.append(["environments coupled", ", ".join(c["environments"])])
    rows += _over_run_rows(s)
    if "L2D" not in j:
        rows += _boundary_rows(s)
    g = s.get("grid_check")
    if g is not None:
        verdict = "pass" if g["pass"] else "FAIL"
        text = f"Σ|Φ| changed {100 * g['change']:.3f} % ({verdict}, limit {100 * g['limit']:g} %)"
        psi = (g.get("junction") or {}).get("psi")
        if psi is not None and psi.get("relative_change") is not None:
            change = 100 * psi["relative_change"]
            text += f"; ψ {psi['value']:.4f} → {psi['refined']:.4f} ({change:+.2f} %)"
        rows.append(["grid check, cells halved", text])
    b = s.get("energy_balance") or {}
    if b and not b.get("isothermal"):
        closes = b.get("closes", b.get("relative", 1.0) < 1e-8)
        rows.append(
            [
                "energy balance",
                f"relative residual {b['relative']:.1e} "
                f"({'closes' if closes else 'does NOT close'})",
            ]
        )
    return rows


def _run_text(s: dict[str, Any]) -> str:
    if s.get("mode") != "transient":
        return "steady state"
    t = float(s.get("time_s") or 0.0)
    return f"transient, {hours(t)} simulated; values at the end time unless said otherwise"


def _junction_rows(j: dict[str, Any]) -> list[list[str]]:
    primary = str(j.get("dimensions", ""))
    rows = []
    for system, value in (j.get("psi_by_dimensions") or {primary: j["psi"]}).items():
        mark = " (as declared)" if system == primary and j.get("psi_by_dimensions") else ""
        rows.append(
            [f"ψ, {system.replace('_', ' ')} dimensions{mark}", num(value, ".4f", "W/(m·K)")]
        )
    if j.get("ground"):
        rows.append(["ψ_g (ground-floor edge)", num(j["ground"]["psi_g"], ".4f", "W/(m·K)")])
    rows.append(["L2D", num(j["L2D"], ".4f", "W/(m·K)")])
    if j.get("U_f") is not None:
        rows.append(["U_f", num(j["U_f"], ".3f", "W/(m²·K)")])
    f = num(j.get("f_Rsi"), ".3f")
    if j.get("f_Rsi_limit") is not None:
        f += f" (limit {j['f_Rsi_limit']:g}: {'pass' if j.get('f_Rsi_pass') else 'FAIL'})"
    rows.append(["f_Rsi", f])
    rows.append(
        [
            "θ_si,min",
            f"{num(j.get('theta_si_min'), '.2f', '°C')} at {point(j.get('theta_si_min_at'))}",
        ]
    )
    if j.get("dew_point") is not None:
        rows.append(["dew point of the room air", num(j["dew_point"], ".2f", "°C")])
        rh = j.get("surface_rh_at_theta_si_min")
        if rh is not None:
            rows.append(["surface RH at θ_si,min", f"{100 * rh:.0f} %"])
    if j.get("f_min_over_run") is not None:
        rows.append(
            [
                "lowest f(t) over the run",
                f"{j['f_min_over_run']:.4f} at {hours(j['f_min_over_run_time_s'])} on "
                f"{j['f_min_over_run_boundary']} {point(j.get('f_min_over_run_at'))}",
            ]
        )
    return rows


def _over_run_rows(s: dict[str, Any]) -> list[list[str]]:
    """The lowest surface temperature over every step (per boundary) and the largest
    frozen area, for transient runs."""
    rows = []
    for name, r in (s.get("boundaries") or {}).items():
        if "min_temperature_over_run" in r:
            rows.append(
                [
                    f"lowest θ_s over the run, {name}",
                    f"{r['min_temperature_over_run']:.2f} °C at "
                    f"{point(r.get('min_temperature_over_run_at'))}, "
                    f"t = {hours(r['min_temperature_over_run_time_s'])}",
                ]
            )
    frozen = (s.get("phase_change_max") or {}).get("frozen_area")
    if frozen:
        rows.append(
            [
                "largest frozen area over the run",
                f"{frozen['value']:.4g} m² at t = {hours(frozen['time_s'])}",
            ]
        )
    return rows


def _boundary_rows(s: dict[str, Any]) -> list[list[str]]:
    rows = []
    for name, r in (s.get("boundaries") or {}).items():
        rows.append(
            [
                f"boundary {name}",
                f"{num(r.get('heat_flow'), '.4f', 'W/m')}; lowest θ_s "
                f"{num(r.get('min_temperature'), '.2f', '°C')} at {point(r.get('min_at'))}",
            ]
        )
    return rows


def _verdicts(s: dict[str, Any]) -> list[Block]:
    j = s.get("junction") or {}
    out: list[Block] = []
    if j.get("f_Rsi_pass") is not None:
        ok = bool(j["f_Rsi_pass"])
        out.append(
            Para(
                f"f_Rsi = {j['f_Rsi']:.3f} {'meets' if ok else 'does NOT meet'} the limit "
                f"{j['f_Rsi_limit']:g}.",
                "pass" if ok else "fail",
            )
        )
    if j.get("condensation_at_theta_si_min"):
        out.append(Para("Surface condensation expected at θ_si,min (below the dew point).", "fail"))
    elif j.get("mould_risk_rh_80"):
        out.append(Para("Mould risk: surface relative humidity at θ_si,min ≥ 80 %.", "fail"))
    g = s.get("grid_check")
    if g is not None and not g["pass"]:
        out.append(Para("Grid check FAILED: refine the mesh before using these numbers.", "fail"))
    return out
