"""``fvheat layers DRAWING``: what each layer of a DXF drawing holds, to map layers in a case."""

from __future__ import annotations

from typing import TYPE_CHECKING, cast

if TYPE_CHECKING:
    from rich.console import JustifyMethod

from pathlib import Path

from fvheat.errors import CaseError


def list_layers(drawing: Path, units: str) -> None:
    """Print every layer of ``drawing`` with its entity counts, the closed shapes and open
    paths it yields, and its extent in drawing units and in metres (``units``: the unit the
    drawing is in). Raises :class:`CaseError` for bad ``units`` and
    :class:`~fvheat.errors.DrawingError` for a missing or unreadable drawing."""
    from rich.console import Console
    from rich.markup import escape
    from rich.table import Table

    from fvheat.case.geometry import SAGITTA, SNAP
    from fvheat.case.units import UNITS
    from fvheat.drawing.dxf import read_drawing
    from fvheat.drawing.survey import survey

    if units not in UNITS:
        options = ", ".join(UNITS)
        raise CaseError(f"must be one of {options}, got {units!r}", key="--units")
    per_metre = UNITS[units]
    d = read_drawing(drawing, SAGITTA * per_metre)
    rows = survey(d, SNAP * per_metre, units)
    header = f" (the file's header says {d.header_units})" if d.header_units else ""
    t = Table(
        title=escape(f"{drawing}: {len(rows)} layers, read as {units}{header}"),
        title_justify="left",
    )
    for col, just in (
        ("layer", "left"),
        ("entities", "left"),
        ("closed", "right"),
        ("open", "right"),
        (f"x range {units}", "right"),
        (f"y range {units}", "right"),
        ("size m", "right"),
    ):
        t.add_column(col, justify=cast("JustifyMethod", just))
    for r in rows:
        entities = ", ".join(f"{k} {n}" for k, n in r.entities.items()) or "-"
        if r.extent is None:
            xr = yr = size = "-"
        else:
            x0, y0, x1, y1 = r.extent
            xr, yr = f"{x0:.6g} … {x1:.6g}", f"{y0:.6g} … {y1:.6g}"
            size = f"{(x1 - x0) / per_metre:.4g} × {(y1 - y0) / per_metre:.4g}"
        t.add_row(escape(r.name), entities, str(r.closed), str(r.open), xr, yr, size)
    console = Console()
    if not console.is_terminal:  # piped: room for the table rather than 80 columns
        console = Console(width=max(console.width, 130))
    console.print(t)
    console.print(
        "closed: shapes a region with this layer paints; open: paths left unclosed after "
        "joining ends (boundary lines)"
    )
    for r in rows:
        if r.problem:
            console.print(escape(f"not usable as a region layer: {r.problem}"))
