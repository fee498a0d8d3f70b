"""The report's junction section: ψ by dimension system, L2D, U_f, f_Rsi, θ_si,min and the
humidity checks, or the coupling coefficients between several environments."""

from __future__ import annotations

from typing import Any

from fvheat.output.report.blocks import Block, Para, Section, Table, num, point


def junction_section(j: dict[str, Any] | None) -> Section:
    """The junction results of ``summary.json``'s "junction" entry (None: no junction)."""
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
    sec.blocks.append(Table(["quantity", "value"], rows))
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
