"""The content of a run report, independent of its format (HTML or Markdown).

:func:`build_document` reads a results folder (``summary.json``, ``inputs.json``, the
figure index) and returns sections of paragraphs, tables and figures.
"""

from __future__ import annotations

import logging
import platform
from dataclasses import dataclass, field
from typing import Any

from fvheat import __version__
from fvheat.cautions import CAUTION
from fvheat.output.results import ResultsFolder

log = logging.getLogger(__name__)


@dataclass(frozen=True)
class Para:
    """A paragraph; ``kind`` is "text", "note", "caution", "pass" or "fail"."""

    text: str
    kind: str = "text"


@dataclass(frozen=True)
class Table:
    """A table of strings; ``numeric`` marks right-aligned columns."""

    header: list[str]
    rows: list[list[str]]
    numeric: list[bool] | None = None


@dataclass(frozen=True)
class Figure:
    """An image file relative to the results folder, with its caption."""

    png: str
    caption: str


@dataclass(frozen=True)
class Code:
    """Preformatted text shown folded, e.g. the case file."""

    text: str
    label: str


Block = Para | Table | Figure | Code


@dataclass
class Section:
    """A headed section: ``ident`` is its anchor, ``level`` 2 or 3."""

    ident: str
    title: str
    level: int = 2
    blocks: list[Block] = field(default_factory=list)


@dataclass
class Document:
    title: str
    subtitle: str
    sections: list[Section]


#: section anchors every report has, in order
SECTION_IDS = (
    "case",
    "inputs",
    "materials",
    "boundaries",
    "mesh",
    "results",
    "heat-flows",
    "junction",
    "grid-check",
    "energy-balance",
    "plots",
    "software",
    "cautions",
)


def num(v: Any, fmt: str = ".4g", unit: str = "") -> str:
    """A number formatted with ``fmt`` and ``unit``, or '–' for None."""
    if v is None:
        return "–"
    if isinstance(v, bool):
        return "yes" if v else "no"
    return f"{v:{fmt}}" + (f" {unit}" if unit else "")


def point(p: Any) -> str:
    """'(x, y) m' with millimetre resolution."""
    return "–" if p is None else f"({p[0]:.3f}, {p[1]:.3f}) m"


def build_document(folder: ResultsFolder) -> Document:
    """All sections of the report of ``folder``."""
    from fvheat.output.plots.figures import read_index

    s = folder.summary
    inputs = folder.inputs() or _inputs_from_case(s)
    when = (
        f"transient, results at t = {s.get('time_s', 0.0) / 3600:.4g} h"
        if folder.transient
        else "steady state"
    )
    doc = Document(
        title=str(s.get("title") or "fvheat results"),
        subtitle=f"2-D heat transfer, {when}",
        sections=[],
    )
    add = doc.sections.append
    add(_case_section(s))
    add(Section("inputs", "Inputs"))
    doc.sections += _input_sections(s, inputs)
    add(Section("results", "Results"))
    doc.sections += _result_sections(s)
    figures = read_index(folder)
    plots = Section("plots", "Plots")
    if figures:
        plots.blocks = [Figure(r.png, r.caption) for r in figures]
    else:
        plots.blocks = [
            Para(
                "No figures in this folder (run without --no-plots, or `fvheat plot DIR`).", "note"
            )
        ]
    add(plots)
    add(_software_section(s))
    add(_cautions_section(s))
    return doc


def _inputs_from_case(s: dict[str, Any]) -> dict[str, Any] | None:
    """Inputs rebuilt from the case file named in the summary (older folders)."""
    from fvheat.case.load import load_case
    from fvheat.errors import FvheatError
    from fvheat.mesh.rectilinear import build_mesh
    from fvheat.output.inputs import case_inputs

    path = s.get("case_file")
    if not path:
        return None
    try:
        case = load_case(path, tuple(s.get("overrides") or ()))
        return case_inputs(case, build_mesh(case))
    except (FvheatError, OSError) as err:
        log.warning("inputs not available: %s", err)
        return None


def _case_section(s: dict[str, Any]) -> Section:
    rows = [
        ["case file", str(s.get("case_file", "–"))],
        ["SHA-256 (file and overrides)", str(s.get("case_sha256") or "–")],
        ["overrides", ", ".join(s.get("overrides") or []) or "none"],
        ["run", _run_text(s)],
        ["computed with", f"fvheat {s.get('fvheat_version', '?')}"],
    ]
    if s.get("solve_seconds") is not None:
        rows.append(["solve time", num(s["solve_seconds"], ".2f", "s")])
    return Section("case", "Case", 2, [Table(["item", "value"], rows)])


def _run_text(s: dict[str, Any]) -> str:
    if s.get("mode") != "transient":
        return str(s.get("mode", "–"))
    t = float(s.get("time_s") or 0.0)
    return f"transient, results at t = {t / 3600:.4g} h ({t:g} s)"


def _input_sections(s: dict[str, Any], inputs: dict[str, Any] | None) -> list[Section]:
    mats = Section("materials", "Materials", 3)
    bnds = Section("boundaries", "Boundaries", 3)
    mesh = Section("mesh", "Mesh", 3)
    out = [mats, bnds]
    if inputs is None:
        mats.blocks.append(Para("Material inputs not available for this folder.", "note"))
        bnds.blocks.append(Para("Boundary inputs not available for this folder.", "note"))
    else:
        mats.blocks.append(
            Table(
                [
                    "material",
                    "λ W/(m·K)",
                    "ρ kg/m³",
                    "c J/(kg·K)",
                    "latent heat J/kg",
                    "cells",
                    "area m²",
                ],
                [
                    [
                        m["name"],
                        num(m["conductivity"]),
                        num(m["density"]),
                        num(m["specific_heat"]),
                        num(m.get("latent_heat")),
                        str(m["cells"]),
                        num(m["area"], ".4f"),
                    ]
                    for m in inputs["materials"]
                ],
                [False, True, True, True, True, True, True],
            )
        )
        bsum = s.get("boundaries", {})
        bnds.blocks.append(
            Table(
                ["boundary", "kind", "condition", "faces", "length m"],
                [
                    [
                        b["name"],
                        b["kind"],
                        b["condition"],
                        str(b["faces"]),
                        num(bsum.get(b["name"], {}).get("length", b.get("length")), ".4f"),
                    ]
                    for b in inputs["boundaries"]
                ],
                [False, False, False, True, True],
            )
        )
        if inputs.get("adiabatic_faces"):
            bnds.blocks.append(
                Para(
                    f"{inputs['adiabatic_faces']} exterior faces lie on no boundary and are "
                    "adiabatic (cut-off planes of the model)."
                )
            )
        if inputs.get("probes"):
            probes = Section("probes", "Probes", 3)
            probes.blocks.append(
                Table(["probe", "at"], [[p["name"], point(p["at"])] for p in inputs["probes"]])
            )
            out.append(probes)
    stats = s.get("mesh") or {"cells": s.get("cells")}
    labels = {
        "kind": ("mesh", "s", ""),
        "triangles": ("triangles", "d", ""),
        "min_angle_deg": ("smallest triangle angle", ".1f", "°"),
        "cells": ("cells", "d", ""),
        "interior_faces": ("interior faces", "d", ""),
        "boundary_faces": ("exterior faces", "d", ""),
        "columns": ("columns", "d", ""),
        "rows": ("rows", "d", ""),
        "smallest_cell": ("smallest cell edge", ".4g", "m"),
        "largest_cell": ("largest cell edge", ".4g", "m"),
        "max_neighbour_ratio": ("largest neighbour size ratio", ".3f", ""),
    }
    rows = [
        [labels.get(k, (k,))[0], _stat(v, *labels.get(k, (k, ".4g", ""))[1:])]
        for k, v in stats.items()
    ]
    if inputs is not None and inputs.get("mesh_settings"):
        ms = inputs["mesh_settings"]
        rows.append(
            [
                "settings",
                f"max_cell {num(ms['max_cell'], 'g', 'm')}, "
                f"min_cell {num(ms['min_cell'], 'g', 'm')}, growth {num(ms['growth'], 'g')}"
                + (
                    f", corner cells {num(ms['corner_cell'], 'g', 'm')}"
                    if ms.get("corner_cell") is not None
                    else ""
                ),
            ]
        )
    mesh.blocks.append(Table(["mesh", "value"], rows, [False, True]))
    out.append(mesh)
    if inputs is not None and inputs.get("time"):
        t = inputs["time"]
        out.append(
            Section(
                "time",
                "Time stepping",
                3,
                [
                    Table(
                        ["setting", "value"],
                        [
                            ["duration", num(t["duration"], "g", "s")],
                            ["step", num(t["step"], "g", "s")],
                            ["saved every", num(t["save_every"], "g", "s")],
                            [
                                "initial temperature",
                                str(t["initial_temperature"])
                                + ("" if t["initial_temperature"] == "steady" else " °C"),
                            ],
                            ["scheme", str(t["scheme"])],
                        ],
                    )
                ],
            )
        )
    if inputs is not None and inputs.get("case_text"):
        out.append(
            Section(
                "case-file",
                "Case file",
                3,
                [Code(inputs["case_text"], f"case file as run: {inputs.get('case_file', '')}")],
            )
        )
    return out


def _stat(v: Any, fmt: str, unit: str) -> str:
    if isinstance(v, str):
        return v
    if isinstance(v, int) and not isinstance(v, bool):
        return str(v)
    return num(v, fmt if fmt != "d" else "g", unit)


def _result_sections(s: dict[str, Any]) -> list[Section]:
    out = []
    when = " at the end time" if s.get("mode") == "transient" else ""
    flows = Section("heat-flows", "Heat flows and surface temperatures", 3)
    flows.blocks.append(
        Table(
            ["boundary", "heat flow W/m", "min θ_s °C", "at", "max θ_s °C", "at"],
            [
                [
                    name,
                    num(r["heat_flow"], ".4f"),
                    num(r["min_temperature"], ".2f"),
                    point(r.get("min_at")),
                    num(r.get("max_temperature"), ".2f"),
                    point(r.get("max_at")),
                ]
                for name, r in s["boundaries"].items()
            ],
            [False, True, True, False, True, False],
        )
    )
    flows.blocks.append(
        Para(
            f"Heat flows{when} per metre of junction length, positive when heat enters the "
            "body; surface temperatures are face values."
        )
    )
    out.append(flows)
    over = _over_run_section(s)
    if over is not None:
        out.append(over)
    if s.get("probes"):
        out.append(
            Section(
                "probe-results",
                "Probe temperatures",
                3,
                [
                    Table(
                        ["probe", "temperature °C"],
                        [[k, num(v, ".2f")] for k, v in s["probes"].items()],
                        [False, True],
                    )
                ],
            )
        )
    out.append(_junction_section(s.get("junction")))
    grid = Section("grid-check", "Grid check", 3)
    g = s.get("grid_check")
    if g is None:
        grid.blocks.append(
            Para(
                "Not run. Enable it with `--grid-check` or `junction.grid_check = true` "
                "(ISO 10211: Σ|Φ| must change by less than 1 % when the cells are halved).",
                "note",
            )
        )
    else:
        grid.blocks.append(
            Table(
                ["quantity", "value"],
                [
                    ["cells", f"{g['cells']} → {g['cells_refined']}"],
                    [
                        "Σ|Φ| W/m",
                        f"{g['sum_abs_heat_flow']:.5g} → {g['sum_abs_heat_flow_refined']:.5g}",
                    ],
                    ["change", f"{100 * g['change']:.3f} % (limit {100 * g['limit']:g} %)"],
                    *(
                        [
                            f"{'ψ' if name == 'psi' else name} (shown, not judged)",
                            f"{q['value']:.5g} → {q['refined']:.5g} (change {q['change']:+.3g}"
                            + (
                                f", {100 * q['relative_change']:+.3f} %)"
                                if q.get("relative_change") is not None
                                else ")"
                            ),
                        ]
                        for name, q in (g.get("junction") or {}).items()
                    ),
                ],
                [False, True],
            )
        )
        grid.blocks.append(
            Para(
                "Grid check passed." if g["pass"] else "Grid check FAILED: refine the mesh.",
                "pass" if g["pass"] else "fail",
            )
        )
    out.append(grid)
    out.append(_balance_section(s))
    other = _other_results(s)
    if other is not None:
        out.append(other)
    return out


#: summary keys the sections above present
KNOWN_KEYS = {
    "title",
    "case_file",
    "case_sha256",
    "overrides",
    "fvheat_version",
    "mode",
    "time_s",
    "cells",
    "mesh",
    "boundaries",
    "probes",
    "temperature_range",
    "energy_balance",
    "caution",
    "solve_seconds",
    "junction",
    "grid_check",
    "phase_change_max",
}


def _over_run_section(s: dict[str, Any]) -> Section | None:
    """Lowest and highest surface temperatures, the lowest f(t) and the largest frost
    measures over every step of a transient run."""
    bounds = s.get("boundaries") or {}
    rows = [
        [
            name,
            num(r["min_temperature_over_run"], ".2f"),
            point(r.get("min_temperature_over_run_at")),
            num(r["min_temperature_over_run_time_s"] / 3600, ".4g", "h"),
            num(r["max_temperature_over_run"], ".2f"),
            point(r.get("max_temperature_over_run_at")),
            num(r["max_temperature_over_run_time_s"] / 3600, ".4g", "h"),
        ]
        for name, r in bounds.items()
        if "min_temperature_over_run" in r
    ]
    if not rows:
        return None
    sec = Section("over-run", "Extremes over the run", 3)
    sec.blocks.append(
        Table(
            ["boundary", "lowest θ_s °C", "at", "time", "highest θ_s °C", "at", "time"],
            rows,
            [False, True, False, True, True, False, True],
        )
    )
    sec.blocks.append(
        Para(
            "Sampled at every time step (the initial state included; the last cycle of a "
            "periodic run), over face centres and face end points as the steady results."
        )
    )
    j = s.get("junction") or {}
    if j.get("f_min_over_run") is not None:
        sec.blocks.append(
            Para(
                f"Lowest temperature factor over the run f(t) = {j['f_min_over_run']:.4f} at "
                f"t = {j['f_min_over_run_time_s'] / 3600:.4g} h on "
                f"{j['f_min_over_run_boundary']} {point(j.get('f_min_over_run_at'))} "
                f"(θ_si = {j['f_min_over_run_theta_si']:.2f} °C, θ_i = "
                f"{j['f_min_over_run_theta_i']:.2f} °C, θ_e = {j['f_min_over_run_theta_e']:.2f}"
                f" °C). {j.get('f_over_run_basis', '')}; "
                f"{j.get('f_over_run_skipped_steps', 0)} of {j.get('f_over_run_steps', 0)} "
                "steps skipped. Not the steady f_Rsi: a massive construction lags the air "
                "temperatures."
            )
        )
    elif "f_min_over_run" in j:
        sec.blocks.append(
            Para("No step had warm and cold sides 1 K apart or more: no f(t).", "note")
        )
    phase = s.get("phase_change_max") or {}
    if phase:
        sec.blocks.append(
            Table(
                ["largest over the run", "value", "time"],
                [
                    [
                        k,
                        num(v["value"], ".4g", "m²" if k == "frozen_area" else "m"),
                        num(v["time_s"] / 3600, ".4g", "h"),
                    ]
                    for k, v in phase.items()
                ],
                [False, True, True],
            )
        )
    return sec


def _flat(prefix: str, value: Any, rows: list[list[str]]) -> None:
    if isinstance(value, dict):
        for k, v in value.items():
            _flat(f"{prefix}.{k}" if prefix else str(k), v, rows)
    elif isinstance(value, list) and all(not isinstance(v, dict | list) for v in value):
        rows.append(
            [prefix, ", ".join(num(v, ".5g") if isinstance(v, float) else str(v) for v in value)]
        )
    elif isinstance(value, float | int | bool) or value is None:
        rows.append([prefix, num(value, ".5g") if isinstance(value, float) else num(value, "")])
    else:
        rows.append([prefix, str(value)])


def _other_results(s: dict[str, Any]) -> Section | None:
    """Further results in the summary (e.g. from phase-change or condensation evaluation),
    listed as they are stored, with the summary's key names (SI units, °C)."""
    rows: list[list[str]] = []
    for key in s:
        if key not in KNOWN_KEYS:
            _flat(key, s[key], rows)
    if not rows:
        return None
    return Section(
        "other-results",
        "Further results",
        3,
        [
            Table(["summary.json key", "value"], rows, [False, True]),
            Para("Values as stored in summary.json (SI units, temperatures in °C).", "note"),
        ],
    )


def _coupling_blocks(c: dict[str, Any]) -> list[Block]:
    """The coupling-coefficient matrix, its checks and the weighting factors."""
    names = list(c["environments"])
    blocks: list[Block] = [
        Table(
            ["L W/(m·K)", *names],
            [[n, *(f"{v:.5f}" for v in row)] for n, row in zip(names, c["L"], strict=True)],
            [False, *([True] * len(names))],
        ),
        Para(
            "Thermal coupling coefficients (ISO 10211) from one steady solve per environment "
            "(that environment at 1 K, the others at 0). Off the diagonal L[i][j] ≥ 0: the heat "
            "flow from environment i to j is L[i][j]·(θ_i − θ_j); the diagonal is the heat flow "
            "into the body from i alone at 1 K, the sum of the rest of its row. "
            f"Largest asymmetry {c['symmetry_error']:.1e} and row-sum deviation "
            f"{c['row_sum_error']:.1e} (relative to the largest entry).",
            "pass" if c.get("checks_pass") else "fail",
        ),
    ]
    temps = ", ".join(
        f"{n} {t:g} °C" for n, t in zip(names, c.get("temperatures", []), strict=False)
    )
    rows = [
        [
            p["environment"],
            f"{p['temperature']:.2f} °C at {point(p['at'])} ({p['boundary']})",
            ", ".join(f"{v:.4f}" for v in p["g"]),
        ]
        for p in c.get("weighting_factors", [])
    ]
    if rows:
        blocks.append(
            Table(
                ["environment", f"coldest surface point ({temps})", f"g ({', '.join(names)})"],
                rows,
            )
        )
        blocks.append(
            Para(
                "Temperature weighting factors: the surface temperature at the point is "
                "θ = Σ g_j·θ_j for any environment temperatures θ_j; from the "
                f"{c.get('weighting_factors_from', 'heat-loss solve')}.",
                "note",
            )
        )
    return blocks


def _junction_section(j: dict[str, Any] | None) -> Section:
    sec = Section("junction", "Junction: ψ, L2D, f_Rsi", 3)
    if j is None:
        sec.blocks.append(
            Para("No [junction] declared: ψ, L2D, f_Rsi and U_f are not evaluated.", "note")
        )
        return sec
    if j.get("coupling"):
        sec.blocks += _coupling_blocks(j["coupling"])
        for w in j["coupling"].get("warnings", []):
            sec.blocks.append(Para(f"Warning: {w}", "caution"))
    if "L2D" not in j:
        sec.blocks.append(
            Para("No inside and outside declared: ψ, L2D and f_Rsi are not evaluated.", "note")
        )
        return sec
    rows = [
        ["θ_i / θ_e", f"{j['theta_i']:g} / {j['theta_e']:g} °C"],
        ["heat flow through the warm side Φ", num(j.get("heat_flow"), ".4f", "W/m")],
        ["L2D", num(j["L2D"], ".4f", "W/(m·K)")],
    ]
    primary = str(j.get("dimensions", ""))
    for f in j.get("flanking", []):
        src = {"layers": "from the model's layers", None: "given"}.get(
            f.get("u_from"), str(f.get("u_from"))
        )
        others = [
            f"{v:g} m {k.replace('_', ' ')}"
            for k, v in (f.get("lengths") or {}).items()
            if k != primary
        ]
        more = f"; {', '.join(others)}" if others else ""
        rows.append(
            [
                f"U·l {f['name']}",
                f"{f['u_value']:.4f} W/(m²·K) × {f['length']:g} m ({src}{more})",
            ]
        )
    by_dims = j.get("psi_by_dimensions") or {primary: j["psi"]}
    for system, value in by_dims.items():
        mark = ", as declared" if system == primary and len(by_dims) > 1 else ""
        rows.append(
            [
                f"ψ, {system.replace('_', ' ')} dimensions{mark}",
                num(value, ".4f", "W/(m·K)"),
            ]
        )
    g = j.get("ground")
    if g:
        rows.append(
            [
                "ground floor U (ISO 13370, from memory)",
                f"{g['U_floor']:.4f} W/(m²·K): B' {g['B_prime']:g} m, λ_g "
                f"{g['soil_conductivity']:g} W/(m·K), w {g['wall_thickness']:.3g} m, R_si "
                f"{g['R_si']:g}, R_f {g['R_f']:.3f} ({g['R_f_from']}), R_se {g['R_se']:g} "
                f"m²·K/W, d_t {g['d_t']:.3f} m; {g['U_floor_formula']}",
            ]
        )
        rows.append(["ψ_g", num(g["psi_g"], ".4f", "W/(m·K)") + " (ψ of the ground-floor edge)"])
    if j.get("psi_dimensions_note"):
        rows.append(["dimension system", str(j["psi_dimensions_note"])])
    if j.get("U_f") is not None:
        rows.append(["U_f", num(j["U_f"], ".3f", "W/(m²·K)")])
    verdict = ""
    if j.get("f_Rsi_limit") is not None:
        verdict = f" (limit {j['f_Rsi_limit']:g}: {'pass' if j.get('f_Rsi_pass') else 'FAIL'})"
    rows.append(["f_Rsi", num(j["f_Rsi"], ".3f") + verdict])
    rows.append(["θ_si,min", f"{j['theta_si_min']:.2f} °C at {point(j.get('theta_si_min_at'))}"])
    if j.get("f_Rsi_from"):
        rows.append(["f_Rsi and θ_si,min from", str(j["f_Rsi_from"])])
    if j.get("dew_point") is not None:
        rows.append(["dew point of the room air", num(j["dew_point"], ".2f", "°C")])
        basis = j.get("dew_point_basis", "over water (results from before the basis was stated)")
        rows.append(["dew point basis", str(basis)])
        rh = j.get("surface_rh_at_theta_si_min")
        rows.append(["surface RH at θ_si,min", "–" if rh is None else f"{100 * rh:.0f} %"])
        rows.append(["condensation at θ_si,min", num(j.get("condensation_at_theta_si_min"))])
        rows.append(["mould risk (surface RH ≥ 80 %)", num(j.get("mould_risk_rh_80"))])
    sec.blocks.append(Table(["quantity", "value"], rows, [False, True]))
    if j.get("f_Rsi_separate_solve"):
        sec.blocks.append(
            Para(
                "ψ and L2D come from the heat-loss solve (the boundaries' own surface "
                "resistances); f_Rsi and θ_si,min from a second, surface-temperature solve "
                "with the inside resistances above. The figures show both temperature maps; "
                "θ_si,min is marked on the surface-temperature map.",
                "note",
            )
        )
    if j.get("f_Rsi_resistance_default"):
        sec.blocks.append(
            Para(
                "The case sets no condensation surface resistance for some inside surfaces; "
                "they were given 0.25 m²·K/W (ISO 13788, opaque surfaces). Glazing and frames "
                "are usually assessed at 0.13 m²·K/W: set junction.condensation_resistance "
                "per surface.",
                "caution",
            )
        )
    if j.get("f_Rsi_pass") is not None:
        ok = bool(j["f_Rsi_pass"])
        sec.blocks.append(
            Para(
                f"f_Rsi = {j['f_Rsi']:.3f} {'meets' if ok else 'does NOT meet'} the limit "
                f"{j['f_Rsi_limit']:g}.",
                "pass" if ok else "fail",
            )
        )
    for w in j.get("warnings", []):
        sec.blocks.append(Para(f"Warning: {w}", "caution"))
    return sec


def _balance_section(s: dict[str, Any]) -> Section:
    sec = Section("energy-balance", "Energy balance", 3)
    b = s.get("energy_balance")
    if not b:
        sec.blocks.append(Para("No energy balance in this summary.", "note"))
        return sec
    unit = "J/m" if s.get("mode") == "transient" else "W/m"
    sec.blocks.append(
        Table(
            ["quantity", "value"],
            [
                ["heat in", num(b["heat_in"], ".6g", unit)],
                ["heat out", num(b["heat_out"], ".6g", unit)],
                ["change of stored heat", num(b["stored"], ".6g", unit)],
                ["residual (in − out − stored)", num(b["residual"], ".3e", unit)],
                ["relative residual", num(b["relative"], ".2e")],
            ],
            [False, True],
        )
    )
    if b.get("isothermal"):
        sec.blocks.append(
            Para("Isothermal: no heat flows, so the relative residual means nothing.", "note")
        )
        return sec
    closes = b.get("closes", b["relative"] < 1e-8)
    sec.blocks.append(
        Para(
            "The balance closes to round-off."
            if closes
            else "The balance does not close to round-off: check the solver settings.",
            "pass" if closes else "fail",
        )
    )
    return sec


def _software_section(s: dict[str, Any]) -> Section:
    import matplotlib
    import meshio
    import numpy
    import scipy

    rows = [
        ["computed with", f"fvheat {s.get('fvheat_version', '?')}"],
        ["report written with", f"fvheat {__version__}"],
        ["Python", platform.python_version()],
        ["NumPy / SciPy", f"{numpy.__version__} / {scipy.__version__}"],
        ["matplotlib / meshio", f"{matplotlib.__version__} / {meshio.__version__}"],
    ]
    return Section(
        "software",
        "Software",
        2,
        [
            Table(["component", "version"], rows),
            Para(
                "Cell-centred finite volumes on a rectilinear grid, harmonic-mean face "
                "conductances; heat flows, surface temperatures and heat-flux vectors come from "
                "the same face fluxes the solver balanced."
            ),
        ],
    )


def _cautions_section(s: dict[str, Any]) -> Section:
    blocks: list[Block] = [Para(CAUTION, "caution")]
    j = s.get("junction") or {}
    # summaries written before the modelling checks hold only the junction's warnings
    for w in s.get("warnings", j.get("warnings", [])):
        blocks.append(Para(f"Warning: {w}", "caution"))
    if "warnings" in s and not s["warnings"]:
        blocks.append(Para("The modelling checks found nothing to warn about.", "note"))
    return Section("cautions", "Cautions", 2, blocks)
