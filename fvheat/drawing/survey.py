"""What each layer of a drawing holds and yields, without judging it (``fvheat layers``)."""

from __future__ import annotations

from dataclasses import dataclass

from fvheat.drawing.dxf import Drawing, Layer
from fvheat.drawing.outlines import Assembler, Snapper, region_shapes
from fvheat.errors import DrawingError


@dataclass(frozen=True)
class LayerSummary:
    """One layer: entity counts by type; the closed shapes it gives as a region layer and
    the open paths left after joining curve ends; the segments it gives as a boundary layer;
    its extent (x0, y0, x1, y1) in drawing units (None when it has no curves); and, for a
    layer with closed shapes, why it cannot be a region layer (None when it can; layers of
    open paths only are boundary lines, not judged)."""

    name: str
    entities: dict[str, int]
    closed: int
    open: int
    segments: int
    extent: tuple[float, float, float, float] | None
    problem: str | None


def survey(drawing: Drawing, snap: float, unit: str) -> list[LayerSummary]:
    """Every layer of ``drawing`` in table order; ``snap`` in drawing units, ``unit`` names
    them in the problem texts."""
    return [_layer(layer, snap, str(drawing.path), unit) for layer in drawing.layers.values()]


def _layer(layer: Layer, snap: float, file: str, unit: str) -> LayerSummary:
    asm = Assembler(layer, Snapper(snap), file, unit)
    curves = asm.snapped(layer.curves)
    open_curves = [c for c in curves if not c.closed]
    closed = sum(1 for c in curves if c.closed) + len(layer.fills)
    n_open = len(open_curves)
    segments = sum(len(c.points) - (0 if c.closed else 1) for c in curves)
    problem = None
    try:
        loops, chains = asm.chain(open_curves)
        closed, n_open = closed + len(loops), len(chains)
        closed = len(region_shapes(layer, Snapper(snap), file=file, unit=unit))
    except DrawingError as err:
        if closed or not n_open:
            problem = err.detail
    return LayerSummary(
        name=layer.name,
        entities=dict(sorted(layer.entities.items())),
        closed=closed,
        open=n_open,
        segments=segments,
        extent=layer.extent(),
        problem=problem,
    )
