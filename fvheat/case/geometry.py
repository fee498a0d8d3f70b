"""The ``[geometry]`` table and the shapes regions and boundaries take from its drawing.

```toml
[geometry]
drawing = "details/slab_edge.dxf"   # DXF, relative to the case file
units = "mm"                        # m (default), cm or mm: the drawing and the case file
```

The drawing is read once (curves flattened to a sagitta of :data:`SAGITTA` m); a
``[[regions]]`` entry with ``layer`` gets the closed shapes of that layer, a
``[[boundaries]]`` entry the segments of its curves (:mod:`fvheat.drawing.outlines`), all
converted to metres. Ends and corners closer than :data:`SNAP` m are one point, across all
layers the case uses (regions first, in order, then boundaries). A drawing whose used
layers span more than :data:`MAX_EXTENT` or less than :data:`MIN_EXTENT`, or with a shape
thicker than :data:`MAX_THICKNESS`, is taken to be in the wrong unit.
"""

from __future__ import annotations

import difflib
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from fvheat.case.fields import Context, Invalid, check_coordinates, describe, string, table
from fvheat.case.model import Geometry
from fvheat.case.units import UNITS
from fvheat.errors import DrawingError

if TYPE_CHECKING:  # the drawing modules load with the first drawing (ezdxf is slow to import)
    from fvheat.drawing.dxf import Drawing, Layer
    from fvheat.drawing.outlines import Snapper

#: m: largest distance of a flattened chord from the true arc, circle, ellipse or spline
SAGITTA = 1e-4
#: m: coordinates (x and y separately) closer than this are made equal
SNAP = 5e-5
#: m: used layers spanning more than this suggest a drawing in a smaller unit
MAX_EXTENT = 100.0
#: m: used layers spanning less than this suggest a drawing in a larger unit (a 3 m detail
#: drawn in metres but read as millimetres spans 3 mm)
MIN_EXTENT = 0.01
#: m: no layer of a building junction is thicker than this
MAX_THICKNESS = 20.0

_SOURCE = "geometry.drawing"  # ctx.cache key of the read drawing


@dataclass
class _Source:
    """The case's drawing as read, how the case names it, and the snapper all layers share."""

    drawing: Drawing
    name: str
    units: str
    snapper: Snapper

    @property
    def per_metre(self) -> int:
        return UNITS[self.units]


def parse_geometry(value: Any, ctx: Context) -> Geometry | None:
    """Validate ``[geometry]`` and read its drawing (None when the table is absent)."""
    if value is None:
        return None
    tbl = table(value, "geometry", allowed=("drawing", "units"))
    units = string(tbl, "units", "geometry", required=False, default="m", choices=tuple(UNITS))
    if "drawing" not in tbl:
        return Geometry(units=units)
    from fvheat.drawing.dxf import read_drawing
    from fvheat.drawing.outlines import Snapper

    name = string(tbl, "drawing", "geometry")
    path = ctx.folder / name
    per_metre = UNITS[units]
    try:
        drawing = read_drawing(path, SAGITTA * per_metre)
    except DrawingError as err:
        where = f" (looked for {path})" if not path.exists() else ""
        raise Invalid("geometry.drawing", f"{name}: {err.detail}{where}") from None
    ctx.cache[_SOURCE] = _Source(drawing, name, units, Snapper(SNAP * per_metre))
    return Geometry(units=units, drawing=path, drawing_sha256=drawing.sha256)


def _source(ctx: Context, key: str) -> _Source:
    source = ctx.cache.get(_SOURCE)
    if source is None:
        raise Invalid(
            key,
            'a layer needs a drawing: add [geometry] drawing = "FILE.dxf" (and units), or '
            "give the shape by coordinates instead",
        )
    return source


def _layer(source: _Source, value: Any, key: str) -> Layer:
    """The drawing's layer named ``value`` (exact name, else the one name that differs only
    in letter case)."""
    if not isinstance(value, str):
        raise Invalid(key, f"expected a layer name (string), got {describe(value)}")
    layers = source.drawing.layers
    if value in layers:
        return layers[value]
    same = [n for n in layers if n.casefold() == value.casefold()]
    if len(same) == 1:
        return layers[same[0]]
    names = list(layers)
    close = difflib.get_close_matches(value, names, n=1, cutoff=0.6)
    if not close:
        upper = {n.upper(): n for n in names}
        close = [upper[c] for c in difflib.get_close_matches(value.upper(), list(upper), n=1)]
    hint = f" (did you mean {close[0]!r}?)" if close else ""
    raise Invalid(
        key,
        f"{source.name}: no layer {value!r} in the drawing{hint}; its layers: "
        f"{', '.join(names) if names else 'none'}",
    )


def _holds(layer: Layer) -> str:
    """What a layer holds, for messages: 'TEXT 2, DIMENSION 1' or 'no entities'."""
    if not layer.entities:
        return "no entities"
    return ", ".join(f"{k} {n}" for k, n in sorted(layer.entities.items()))


def check_drawing_scale(ctx: Context, entries: Sequence[tuple[str, Any]]) -> None:
    """Reject a drawing whose region layers span more than :data:`MAX_EXTENT` or less than
    :data:`MIN_EXTENT` in metres; ``entries`` are (key path, layer name) of the regions
    taking shapes from layers (unknown names are left for the entries to report)."""
    source = ctx.cache.get(_SOURCE)
    if source is None:
        return
    boxes, first_key = [], None
    for key, value in entries:
        layer = source.drawing.layers.get(value) if isinstance(value, str) else None
        box = layer.extent() if layer is not None else None
        if box is not None:
            boxes.append(box)
            first_key = first_key or key
    if not boxes:
        return
    b = np.array(boxes)
    width = (b[:, 2].max() - b[:, 0].min()) / source.per_metre
    height = (b[:, 3].max() - b[:, 1].min()) / source.per_metre
    size = max(width, height)
    if MIN_EXTENT <= size <= MAX_EXTENT:
        return
    assert first_key is not None
    raise Invalid(
        first_key,
        f"{source.name}: the shapes on the layers this case paints span {width:.4g} m × "
        f"{height:.4g} m with units = {source.units!r}: {_unit_hint(source, size)}",
    )


def _unit_hint(source: _Source, size_m: float) -> str:
    """'is it in mm? set [geometry] units = "mm"' for the unit that gives a plausible size
    (the drawing header's unit first, then mm, cm, m)."""
    drawn = size_m * source.per_metre
    order = [source.drawing.header_units, "mm", "cm", "m"]
    for unit in order:
        if unit in UNITS and unit != source.units:
            if MIN_EXTENT <= drawn / UNITS[unit] <= MAX_EXTENT:
                return f'is the drawing in {unit}? set [geometry] units = "{unit}"'
    return "check the drawing's scale and [geometry] units"


@dataclass(frozen=True)
class LayerShape:
    """A closed shape from a drawing layer in metres: counter-clockwise ``vertices``,
    ``holes``, and whether it is an upright rectangle."""

    vertices: np.ndarray
    holes: tuple[np.ndarray, ...]
    is_box: bool


def layer_shapes(ctx: Context, value: Any, key: str) -> list[LayerShape]:
    """The closed shapes on the drawing layer ``value`` (a region's ``layer`` at ``key``)."""
    from fvheat.drawing.outlines import region_shapes

    source = _source(ctx, key)
    layer = _layer(source, value, key)
    try:
        shapes = region_shapes(
            layer, source.snapper, file=str(source.drawing.path), unit=source.units
        )
    except DrawingError as err:
        raise Invalid(key, f"{source.name}: {err.detail}") from None
    if not shapes:
        raise Invalid(
            key,
            f"{source.name}: layer {layer.name!r} has no closed shapes to paint (it holds "
            f"{_holds(layer)}); regions need closed polylines, circles, closed splines, "
            "hatches or lines joined into closed outlines",
        )
    out = []
    for s in shapes:
        vertices = s.outline / source.per_metre
        check_coordinates(vertices, key, f"{source.name}: layer {layer.name!r}, {s.entity}")
        thickness = float(np.ptp(vertices, axis=0).min())
        if thickness > MAX_THICKNESS:
            raise Invalid(
                key,
                f"{source.name}: layer {layer.name!r}, {s.entity}: the shape is "
                f"{thickness:.4g} m thick with units = {source.units!r}: "
                f"{_unit_hint(source, float(np.ptp(vertices, axis=0).max()))}",
            )
        vertices.flags.writeable = False
        holes = tuple(h / source.per_metre for h in s.holes)
        for h in holes:
            h.flags.writeable = False
        out.append(LayerShape(vertices, holes, _is_box(vertices) and not holes))
    return out


def layer_segments(
    ctx: Context, value: Any, key: str
) -> tuple[tuple[tuple[float, float], tuple[float, float]], ...]:
    """The segments (m) of every curve on the drawing layer ``value`` (a boundary's
    ``layer`` at ``key``)."""
    from fvheat.drawing.outlines import boundary_segments

    source = _source(ctx, key)
    layer = _layer(source, value, key)
    try:
        found = boundary_segments(
            layer, source.snapper, file=str(source.drawing.path), unit=source.units
        )
    except DrawingError as err:  # pragma: no cover - boundary layers raise nothing today
        raise Invalid(key, f"{source.name}: {err.detail}") from None
    if not found:
        raise Invalid(
            key,
            f"{source.name}: layer {layer.name!r} has no lines for a boundary (it holds "
            f"{_holds(layer)}); boundaries need lines, arcs, polylines, circles, ellipses or "
            "splines",
        )
    k = source.per_metre
    segments = tuple(((a[0] / k, a[1] / k), (b[0] / k, b[1] / k)) for (a, b), _ in found)
    check_coordinates(segments, key, f"{source.name}: layer {layer.name!r}")
    return segments


def _is_box(v: np.ndarray) -> bool:
    """Whether the closed ring ``v`` is an upright rectangle of four corners."""
    if len(v) != 4:
        return False
    edge = np.roll(v, -1, axis=0) - v
    return bool(np.all((edge[:, 0] == 0) | (edge[:, 1] == 0)))
