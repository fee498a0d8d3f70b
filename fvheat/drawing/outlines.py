"""Closed shapes and boundary segments from the curves on a layer, for messy drawings.

Coordinates closer than the snap tolerance are made equal (x and y separately, by a
:class:`Snapper` shared by all layers a case uses, so that a boundary line drawn a hair off
an outline lands on it and two outlines meant to touch do touch); zero-length pieces are
dropped. On a region layer every closed curve is a shape; open curves (lines, arcs, open
polylines) are joined end to end into closed outlines; a HATCH gives shapes by even-odd
nesting of its boundary paths (an outer path is a shape, a path inside it a hole, a path
inside the hole a shape again). Every outline must be simple. On a boundary layer every
curve, open or closed, gives its chords as segments.

Errors (:class:`~fvheat.errors.DrawingError`) name the layer and entity and quote drawing
coordinates in the ``unit`` given.
"""

from __future__ import annotations

import itertools
import logging
from collections import defaultdict
from dataclasses import dataclass, field

import numpy as np

from fvheat.drawing.dxf import Curve, Layer
from fvheat.drawing.polygons import crossing_edges, meeting_point, signed_area
from fvheat.errors import DrawingError
from fvheat.mesh.geometry import points_in_polygon

log = logging.getLogger(__name__)


@dataclass(frozen=True)
class Shape:
    """A closed shape: ``outline`` (n, 2) counter-clockwise, minus ``holes`` (outlines of
    any orientation); drawing units. ``entity`` names the entity it came from."""

    outline: np.ndarray = field(repr=False)
    holes: tuple[np.ndarray, ...] = field(repr=False)
    entity: str


Segment = tuple[tuple[float, float], tuple[float, float]]


class Snapper:
    """Makes coordinates within ``tol`` of each other equal, x and y separately.

    A coordinate within ``tol`` of one already snapped becomes that one (so earlier layers
    anchor later ones); the remaining ones cluster in increasing order, each cluster taking
    its smallest value and reaching at most ``tol`` beyond it, so no point moves further
    than ``tol`` in x or in y.
    """

    def __init__(self, tol: float):
        self.tol = tol
        self.known: list[np.ndarray] = [np.zeros(0), np.zeros(0)]

    def snap(self, points: np.ndarray) -> np.ndarray:
        """``points`` (n, 2) with snapped coordinates (a new array)."""
        out = np.array(points, float, copy=True).reshape(-1, 2)
        for axis in (0, 1):
            out[:, axis] = self._snap_axis(out[:, axis], axis)
        return out

    def _snap_axis(self, v: np.ndarray, axis: int) -> np.ndarray:
        known = self.known[axis]
        result = v.copy()
        free = np.ones(v.size, dtype=bool)
        if known.size and v.size:
            k = np.clip(np.searchsorted(known, v), 1, known.size) - 1
            for cand in (k, np.minimum(k + 1, known.size - 1)):
                near = free & (np.abs(known[cand] - v) <= self.tol)
                result[near] = known[cand[near]]
                free &= ~near
        new = np.unique(v[free])
        if new.size:
            anchors = []
            start = new[0]
            anchors.append(start)
            for value in new[1:]:  # per distinct coordinate, not per cell
                if value - start > self.tol:
                    start = value
                    anchors.append(start)
            anchors_arr = np.array(anchors)
            idx = np.searchsorted(anchors_arr, v[free], side="right") - 1
            result[free] = anchors_arr[idx]
            self.known[axis] = np.union1d(known, anchors_arr)
        return result


def _clean(points: np.ndarray, closed: bool) -> np.ndarray:
    """Drop repeated consecutive points (and, closed, a last point equal to the first)."""
    if len(points) == 0:
        return points
    keep = np.ones(len(points), dtype=bool)
    keep[1:] = np.any(points[1:] != points[:-1], axis=1)
    p = points[keep]
    if closed and len(p) > 1 and np.array_equal(p[0], p[-1]):
        p = p[:-1]
    return p


class Assembler:
    """Builds shapes and segments of one layer; raises with the layer and entity named."""

    def __init__(self, layer: Layer, snapper: Snapper, file: str, unit: str):
        self.layer = layer
        self.snapper = snapper
        self.file = file
        self.unit = unit

    def fail(self, message: str, entity: str | None) -> DrawingError:
        """A :class:`DrawingError` naming the file, the layer and ``entity``."""
        return DrawingError(message, file=self.file, layer=self.layer.name, entity=entity)

    def at(self, p: np.ndarray | tuple[float, float]) -> str:
        """The point ``p`` for messages, in drawing units."""
        return f"({p[0]:.6g}, {p[1]:.6g}) {self.unit}"

    def snapped(self, curves: list[Curve]) -> list[Curve]:
        """The curves with snapped, cleaned points; zero-length ones dropped."""
        out = []
        for c in curves:
            p = _clean(self.snapper.snap(c.points), c.closed)
            if len(p) < 2 or (c.closed and len(p) < 3):
                log.debug("layer %s: %s has zero length; ignored", self.layer.name, c.entity)
                continue
            out.append(Curve(p, c.closed, c.entity))
        return out

    def ring(self, points: np.ndarray, entity: str) -> np.ndarray | None:
        """The simple closed outline ``points``, counter-clockwise; None when it has no area."""
        scale = float(np.ptp(points, axis=0).max()) if len(points) else 0.0
        if len(points) < 3 or (
            np.linalg.svd(points - points.mean(axis=0), compute_uv=False)[1] <= 1e-12 * scale
        ):
            log.debug("layer %s: %s lies on one line; ignored", self.layer.name, entity)
            return None
        crossing = crossing_edges(points, scale)
        if crossing is not None:
            where = meeting_point(points, *crossing)
            raise self.fail(
                f"the outline intersects itself at {self.at(where)}: a region outline must "
                "be a simple closed curve (redraw it without the crossing or loop)",
                entity,
            )
        return points if signed_area(points) > 0 else points[::-1].copy()

    def chain(self, curves: list[Curve]) -> tuple[list[tuple[np.ndarray, str]], list[dict]]:
        """Join open curves end to end: closed loops (points, entity names) and open chains
        (their two ends with the entity at each end). Raises where three or more curve ends
        meet at one point."""
        ends: dict[tuple[float, float], list[tuple[int, int]]] = defaultdict(list)
        for i, c in enumerate(curves):
            ends[tuple(c.points[0])].append((i, 0))
            ends[tuple(c.points[-1])].append((i, 1))
        for point, at in ends.items():
            if len(at) > 2:
                listed = ", ".join(sorted({curves[i].entity for i, _ in at}))
                raise self.fail(
                    f"{len(at)} line ends meet at {self.at(point)} ({listed}): an outline must "
                    "be one closed loop; draw each region as its own closed polyline",
                    curves[at[0][0]].entity,
                )
        used = np.zeros(len(curves), dtype=bool)
        loops: list[tuple[np.ndarray, str]] = []
        chains: list[dict] = []
        for first in range(len(curves)):
            if used[first]:
                continue
            used[first] = True
            pts = [curves[first].points]
            names = [curves[first].entity]
            closed = np.array_equal(pts[0][0], pts[-1][-1])
            # walk forward from the end, then backward from the start
            for direction in (1, 0):
                while not closed:
                    tip = tuple(pts[-1][-1]) if direction else tuple(pts[0][0])
                    nxt = [(i, e) for i, e in ends[tip] if not used[i]]
                    if not nxt:
                        break
                    i, e = nxt[0]
                    used[i] = True
                    p = curves[i].points
                    if direction:
                        pts.append(p if e == 0 else p[::-1])
                        names.append(curves[i].entity)
                    else:
                        pts.insert(0, p if e == 1 else p[::-1])
                        names.insert(0, curves[i].entity)
                    closed = np.array_equal(pts[0][0], pts[-1][-1])
            joined = np.concatenate([pts[0], *(q[1:] for q in pts[1:])])
            label = names[0] if len(names) == 1 else f"{names[0]} and {len(names) - 1} more"
            if closed:
                loops.append((joined[:-1], label))
            else:
                chains.append({"ends": (joined[0], joined[-1]), "entities": (names[0], names[-1])})
        return loops, chains

    def open_outline(self, chains: list[dict], what: str) -> DrawingError:
        """The error for open chains: the smallest gap between two loose ends."""
        ends = [(e, c["entities"][k]) for c in chains for k, e in enumerate(c["ends"])]
        best = None
        for a in range(len(ends)):
            for b in range(a + 1, len(ends)):
                gap = float(np.hypot(*(ends[a][0] - ends[b][0])))
                if best is None or gap < best[0]:
                    best = (gap, a, b)
        assert best is not None
        gap, a, b = best
        return self.fail(
            f"{what} is open: gap of {gap:.6g} {self.unit} between {self.at(ends[a][0])} "
            f"(end of {ends[a][1]}) and {self.at(ends[b][0])} (end of {ends[b][1]}); close "
            f"it (ends closer than the snap tolerance of {self.snapper.tol:.6g} {self.unit} "
            "join)",
            ends[a][1],
        )

    def fill_shapes(self, loops: list[tuple[np.ndarray, str]]) -> list[Shape]:
        """Shapes of one HATCH by even-odd nesting of its loops."""
        n = len(loops)
        if n == 1:
            return [Shape(loops[0][0], (), loops[0][1])]
        # inside[i, j]: loop i lies in loop j (most of its vertices do: loops may touch)
        inside = np.zeros((n, n), dtype=bool)
        for i in range(n):
            p = loops[i][0]
            for j in range(n):
                if i != j:
                    share = points_in_polygon(p[:, 0], p[:, 1], loops[j][0]).mean()
                    inside[i, j] = share > 0.5
        depth = inside.sum(axis=1)
        shapes: dict[int, Shape] = {}
        for i in np.flatnonzero(depth % 2 == 0).tolist():
            shapes[int(i)] = Shape(loops[i][0], (), loops[i][1])
        for i in np.flatnonzero(depth % 2 == 1).tolist():
            parents = [j for j in np.flatnonzero(inside[i]) if depth[j] == depth[i] - 1]
            if not parents:
                continue
            parent = int(parents[0])
            s = shapes[parent]
            shapes[parent] = Shape(s.outline, (*s.holes, loops[i][0]), s.entity)
        return [shapes[k] for k in sorted(shapes)]


def region_shapes(layer: Layer, snapper: Snapper, *, file: str, unit: str) -> list[Shape]:
    """Closed shapes of a region layer: HATCHes, then closed curves, then the outlines joined
    from open curves, each group in drawing order. A closed curve or joined outline that
    traces a path of one of the layer's hatches is that hatch's boundary (CAD programs keep
    it on the hatch's layer) and is not a shape of its own, so the hatch's holes stay
    holes. Raises for an open outline, a self-intersecting one or three curve ends meeting
    at a point."""
    asm = Assembler(layer, snapper, file, unit)
    shapes: list[Shape] = []
    traced: set[tuple] = set()  # the vertex sets of every hatch path
    for fill in layer.fills:
        loops = []
        for k, loop in enumerate(fill.loops):
            pieces = asm.snapped(list(loop))
            closed_pieces = [(p.points, p.entity) for p in pieces if p.closed]
            rings, chains = asm.chain([p for p in pieces if not p.closed])
            if chains:
                raise asm.open_outline(chains, f"boundary path {k} of the hatch")
            for points, _ in closed_pieces + rings:
                ring = asm.ring(points, fill.entity)
                if ring is not None:
                    loops.append((ring, fill.entity))
                    traced.add(_vertex_set(ring))
        shapes.extend(asm.fill_shapes(loops) if loops else [])
    curves = asm.snapped(layer.curves)
    rings, chains = asm.chain([c for c in curves if not c.closed])
    if chains:
        raise asm.open_outline(chains, "an outline")
    for points, entity in [(c.points, c.entity) for c in curves if c.closed] + rings:
        ring = asm.ring(points, entity)
        if ring is None:
            continue
        if _vertex_set(ring) in traced:
            log.debug("layer %s: %s traces a hatch path; not a shape", layer.name, entity)
            continue
        shapes.append(Shape(ring, (), entity))
    return shapes


def _vertex_set(ring: np.ndarray) -> tuple:
    """The vertices of a ring in sorted order: equal for the same ring traced from any
    vertex in either direction."""
    return tuple(sorted(map(tuple, ring.tolist())))


def boundary_segments(
    layer: Layer, snapper: Snapper, *, file: str, unit: str
) -> list[tuple[Segment, str]]:
    """The chords of every curve on a boundary layer (HATCHes are fills, not lines, and are
    not used), each with the entity it came from; drawing units."""
    asm = Assembler(layer, snapper, file, unit)
    out: list[tuple[Segment, str]] = []
    for c in asm.snapped(layer.curves):
        p = c.points
        if c.closed:
            p = np.vstack([p, p[:1]])
        for a, b in itertools.pairwise(p):
            out.append((((float(a[0]), float(a[1])), (float(b[0]), float(b[1]))), c.entity))
    return out
