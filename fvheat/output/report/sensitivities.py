"""The report's sensitivity section, from ``summary.json`` → ``sensitivities``: one ranked
table per junction quantity (heat flows left to summary.json). Self-contained: the document
adds the sections this returns."""

from __future__ import annotations

from typing import Any

from fvheat.output.plots.sensitivities import LABELS, ranked_rows
from fvheat.output.report.blocks import Para, Section, Table

#: quantities with a table in the report, in order
SHOWN = ("psi", "L2D", "U_f", "f_Rsi", "theta_si_min")
#: rows per table
ROWS = 8


def sensitivity_sections(s: dict[str, Any]) -> list[Section]:
    """[] without sensitivities, else one section with a ranked table per quantity."""
    sens = s.get("sensitivities")
    if not sens:
        return []
    sec = Section("sensitivities", "Sensitivities", 3)
    shown = [q for q in SHOWN if q in sens] or [q for q in sens if q != "note"][:1]
    for q in shown:
        label = LABELS.get(q, q)
        rows = ranked_rows(sens, q)
        lead = ", ".join(k for k, _ in rows[:3])
        sec.blocks.append(Para(f"{label} is most sensitive to {lead}."))
        sec.blocks.append(
            Table(
                ["key", "value", f"∂{label}/∂key", "elasticity"],
                [
                    [
                        k,
                        f"{e['value']:.4g}",
                        f"{e['derivative']:.4g}",
                        "–" if e.get("elasticity") is None else f"{e['elasticity']:+.4f}",
                    ]
                    for k, e in rows[:ROWS]
                ],
                [False, True, True, True],
            )
        )
    sec.blocks.append(
        Para(
            "Elasticity: relative change of the quantity per relative change of the key. "
            + str(sens.get("note", "")),
            "note",
        )
    )
    return [sec]
