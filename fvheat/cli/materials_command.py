"""``fvheat materials``: the built-in material library."""

from __future__ import annotations

from typing import TYPE_CHECKING, cast

if TYPE_CHECKING:
    from rich.console import JustifyMethod


def print_library() -> None:
    """Print every library material with its design values and source."""
    from rich.console import Console
    from rich.markup import escape
    from rich.table import Table

    from fvheat.properties.library import library

    t = Table(
        title=escape(
            "built-in materials: use by name in a region, or [materials.X] library = NAME"
        ),
        title_justify="left",
    )
    for col, just in (
        ("name", "left"),
        ("λ W/(m·K)", "right"),
        ("ρ kg/m³", "right"),
        ("c J/(kg·K)", "right"),
        ("ε", "right"),
        ("source", "left"),
    ):
        t.add_column(col, justify=cast("JustifyMethod", just))
    for m in library().values():
        t.add_row(
            m.name,
            f"{m.conductivity:g}",
            f"{m.density:g}",
            f"{m.specific_heat:g}",
            "" if m.emissivity is None else f"{m.emissivity:g}",
            m.source,
        )
    Console().print(t)
