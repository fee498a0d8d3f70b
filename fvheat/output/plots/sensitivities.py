"""Bar chart of the sensitivities in ``summary.json``: the elasticities of the lead quantity
(ψ with a junction) to every key, largest first."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from fvheat.output.plots import style

if TYPE_CHECKING:
    from matplotlib.figure import Figure

#: bars shown at most (the rest are in summary.json)
MOST = 12
LABELS = {"psi": "ψ", "theta_si_min": "θ_si,min"}


def lead_quantity(sens: dict[str, Any]) -> str | None:
    """The quantity the chart and tables lead with (ψ when present)."""
    names = [q for q in sens if q != "note"]
    return "psi" if "psi" in names else (names[0] if names else None)


def ranked_rows(sens: dict[str, Any], quantity: str) -> list[tuple[str, dict[str, Any]]]:
    """(key, entry) of ``quantity`` by decreasing |elasticity| (|derivative| without one)."""
    rows = list(sens[quantity].items())

    def size(item: tuple[str, dict[str, Any]]) -> float:
        e = item[1]
        v = e.get("elasticity")
        return abs(v if v is not None else e.get("derivative", 0.0))

    return sorted(rows, key=size, reverse=True)


def sensitivity_figure(summary: dict[str, Any], title: str) -> tuple[Figure, str] | None:
    """The bar chart (a matplotlib Figure) and its caption, or None when the summary has no
    sensitivities."""
    sens = summary.get("sensitivities")
    quantity = lead_quantity(sens) if sens else None
    if sens is None or quantity is None:
        return None
    rows = ranked_rows(sens, quantity)[:MOST]
    rows.reverse()  # largest at the top
    keys = [k for k, _ in rows]
    values = [e.get("elasticity") or 0.0 for _, e in rows]
    with style.style():
        fig = style.new_figure(style.PAGE_WIDTH, 1.2 + 0.28 * len(rows))
        ax = fig.add_subplot()
        colours = ["#b2182b" if v > 0 else "#2166ac" for v in values]
        ax.barh(range(len(rows)), values, color=colours)
        ax.set_yticks(range(len(rows)), keys, fontsize=7)
        ax.axvline(0.0, color="#333333", lw=0.6)
        label = LABELS.get(quantity, quantity)
        ax.set_xlabel(f"elasticity ∂{label}/∂p · p/{label}")
        style.headings(fig, ax, title, f"sensitivity of {label} (discrete adjoint, steady)")
    caption = (
        f"Elasticities of {label}: the relative change of {label} per relative change of each "
        "input (red: raises it, blue: lowers it); the largest first, at most "
        f"{MOST} shown (all in summary.json → sensitivities)."
    )
    return fig, caption
