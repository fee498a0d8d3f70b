"""The ranked sensitivity table ``fvheat run --sensitivities`` prints."""

from __future__ import annotations

from typing import TYPE_CHECKING

from fvheat.sensitivity.result import LABELS, UNITS, Sensitivities, describe

if TYPE_CHECKING:
    from rich.console import Console

#: rows of the table
ROWS = 8


def print_sensitivities(con: Console, s: Sensitivities) -> None:
    """'ψ is most sensitive to …' and the ranked table of the lead quantity on ``con`` (a
    rich Console); the other junction quantities as one line each."""
    from rich.table import Table

    lead = s.headline
    label = LABELS.get(lead, lead)
    unit = UNITS.get(lead, "W/m")
    value = s.quantities[lead][0]
    t = Table(
        title=f"sensitivities of {label} = {value:.5g} (discrete adjoint)", title_justify="left"
    )
    t.add_column("key", no_wrap=True, min_width=24)
    t.add_column("value", justify="right")
    t.add_column(f"∂{label}/∂key ({unit} per unit)", justify="right")
    t.add_column("elasticity", justify="right")
    for e in s.ranked(lead)[:ROWS]:
        el = "–" if e.elasticity is None else f"{e.elasticity:+.4f}"
        t.add_row(e.key, f"{e.value:.4g}", f"{e.derivative:.4g}", el)
    con.print(t)
    con.print("  " + describe(s, lead))
    for q in s.quantities:
        if q != lead and not q.startswith("heat_flow_"):
            con.print("  " + describe(s, q))
    if any(p.kind == "parameter" for p in s.parameters):
        con.print("  parameters.* keys: central differences of two full remeshed runs each")
    con.print("  (all quantities and keys: summary.json → sensitivities)")
