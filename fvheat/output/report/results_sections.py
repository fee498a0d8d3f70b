"""The report's detailed results: heat flows and surface temperatures, extremes over a
transient run, probe temperatures, the grid check, the energy balance and any further
results in ``summary.json``."""

from __future__ import annotations

from typing import Any

from fvheat.output.report.blocks import Para, Section, Table, num, point
from fvheat.output.report.junction_section import junction_section

#: summary keys the sections above present
KNOWN_KEYS = {
    "title",
    "project",
    "geometry",
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
    "sensitivities",  # its own section: fvheat/output/report/sensitivities.py
    "sensitivity_seconds",
}


def result_sections(s: dict[str, Any]) -> list[Section]:
    """The detailed result sections (level 3), in reading order."""
    out: list[Section] = []
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
    out.append(junction_section(s.get("junction")))
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
            Table(["summary.json key", "value"], rows),
            Para("Values as stored in summary.json (SI units, temperatures in °C).", "note"),
        ],
    )


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
