"""Read a DXF drawing (ezdxf) into the flattened curves on each of its layers.

Model space only. Every entity becomes curves in world coordinates (x, y; z dropped), in
the drawing's own length unit, on its layer:

- LINE, ARC, open LWPOLYLINE / 2-D POLYLINE (bulges: arcs), 3-D POLYLINE: open curves;
- closed LWPOLYLINE / POLYLINE, CIRCLE, full ELLIPSE, closed SPLINE: closed curves
  (an elliptical arc or open spline is an open curve);
- HATCH: a :class:`Fill`, one closed loop per boundary path (polyline paths with bulges,
  edge paths of lines, arcs, elliptic arcs and splines);
- INSERT (and MINSERT arrays): the block's contents at their inserted position (insertion
  point, scale, rotation, nested blocks), each on its own layer, where layer "0" takes the
  layer of the INSERT that placed it (as CAD programs show it).

Arcs, circles and bulges are flattened to chords no further than ``sagitta`` from the true
curve (vertices on the curve: :mod:`fvheat.drawing.flatten`); ellipses and splines by
ezdxf's adaptive flattening to the same distance. Every other entity type (text,
dimensions, points, ...) is counted but not used.
"""

from __future__ import annotations

import hashlib
import logging
import math
from collections import Counter
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from fvheat.drawing.flatten import arc_points, polyline_points
from fvheat.errors import DrawingError

log = logging.getLogger(__name__)

#: entity types that give curves
CURVE_TYPES = ("LINE", "ARC", "CIRCLE", "ELLIPSE", "SPLINE", "LWPOLYLINE", "POLYLINE")
#: $INSUNITS header codes of the length units a case may use (DXF reference; from memory)
HEADER_UNITS = {1: "in", 2: "ft", 4: "mm", 5: "cm", 6: "m"}
#: deepest nesting of INSERTs followed (a block inserting itself would never end)
MAX_NESTING = 32


@dataclass(frozen=True)
class Curve:
    """A flattened curve of one entity: ``points`` (n, 2) in drawing units; a closed curve
    does not repeat its first point. ``entity`` names it for messages, e.g.
    ``"LWPOLYLINE #2F"`` or ``"CIRCLE in block 'DUCT' (INSERT #30)"``."""

    points: np.ndarray = field(repr=False)
    closed: bool
    entity: str


@dataclass(frozen=True)
class Fill:
    """A HATCH: each boundary path as the curves that join into one closed loop."""

    loops: tuple[tuple[Curve, ...], ...] = field(repr=False)
    entity: str


@dataclass
class Layer:
    """What one layer holds: its ``curves`` and ``fills`` (HATCHes), and the count of its
    entities by type (``entities``, INSERT contents counted by their own type)."""

    name: str
    curves: list[Curve] = field(default_factory=list)
    fills: list[Fill] = field(default_factory=list)
    entities: Counter[str] = field(default_factory=Counter)

    def extent(self) -> tuple[float, float, float, float] | None:
        """(x0, y0, x1, y1) of every curve and fill on the layer, drawing units; None when
        the layer has none."""
        pts = [c.points for c in self.curves]
        pts += [c.points for f in self.fills for loop in f.loops for c in loop]
        pts = [p for p in pts if len(p)]
        if not pts:
            return None
        allp = np.concatenate(pts)
        lo, hi = allp.min(axis=0), allp.max(axis=0)
        return float(lo[0]), float(lo[1]), float(hi[0]), float(hi[1])


@dataclass
class Drawing:
    """A read drawing: ``layers`` by name (the layer table's order, then layers only
    entities name), the header's length unit (``"mm"``, ...; None when unset or not a
    length) and the SHA-256 of the file's bytes."""

    path: Path
    layers: dict[str, Layer]
    header_units: str | None
    sha256: str
    sagitta: float


#: bytes: the largest drawing read (a junction detail's DXF is well under 10 MB; a whole
#: building's may be hundreds, and would take minutes and gigabytes to read)
MAX_DRAWING_BYTES = 200 * 1024**2


def read_drawing(path: str | Path, sagitta: float) -> Drawing:
    """Read the DXF file at ``path``, flattening curves to ``sagitta`` (drawing units).

    Raises :class:`~fvheat.errors.DrawingError` (naming the file) when the file is missing,
    not a regular file (a device, a pipe), larger than :data:`MAX_DRAWING_BYTES`,
    unreadable, not DXF (a DWG file is recognised and named) or damaged.
    """
    import ezdxf
    from ezdxf.lldxf.const import DXFError

    path = Path(path)
    file = str(path)
    try:
        if path.exists() and not path.is_dir() and not path.is_file():
            # a device (/dev/zero) or a pipe would be read for ever
            raise DrawingError("is not a regular file (a device or pipe)", file=file)
        size = path.stat().st_size
        if size > MAX_DRAWING_BYTES:
            raise DrawingError(
                f"is {size / 1024**2:.0f} MB; drawings up to {MAX_DRAWING_BYTES // 1024**2} MB "
                "are read (export only the detail's layers)",
                file=file,
            )
        raw = path.read_bytes()
    except FileNotFoundError:
        raise DrawingError("drawing file not found", file=file) from None
    except IsADirectoryError:
        raise DrawingError("is a folder, not a DXF drawing", file=file) from None
    except OSError as err:
        raise DrawingError(f"cannot read the drawing: {err.strerror}", file=file) from err
    if raw[:4] == b"AC10":
        raise DrawingError(
            "is a DWG drawing, not DXF: save or export it as DXF from the CAD program", file=file
        )
    try:
        doc = ezdxf.readfile(path)
    except DXFError as err:
        raise DrawingError(f"damaged or truncated DXF: {_one_line(err)}", file=file) from err
    except (OSError, UnicodeDecodeError, ValueError) as err:
        raise DrawingError("not a DXF drawing (ASCII or binary DXF expected)", file=file) from err
    layers = {layer.dxf.name: Layer(layer.dxf.name) for layer in doc.layers}
    reader = _Reader(layers, sagitta, file)
    for entity in doc.modelspace():
        reader.add(entity, None, "", 0)
    code = doc.header.get("$INSUNITS", 0)
    log.debug("read drawing %s: %d layers", path, len(layers))
    return Drawing(
        path=path,
        layers=layers,
        header_units=HEADER_UNITS.get(code),
        sha256=hashlib.sha256(raw).hexdigest(),
        sagitta=sagitta,
    )


def _one_line(err: BaseException) -> str:
    return " ".join(str(err).split())


class _Reader:
    """Sorts entities onto layers as curves; one instance per drawing."""

    def __init__(self, layers: dict[str, Layer], sagitta: float, file: str):
        self.layers = layers
        self.sagitta = sagitta
        self.file = file

    def layer(self, name: str) -> Layer:
        if name not in self.layers:
            self.layers[name] = Layer(name)
        return self.layers[name]

    def add(self, entity: Any, parent_layer: str | None, where: str, depth: int) -> None:
        """Put ``entity`` on its layer; ``parent_layer`` is the layer of the INSERT that placed
        it (None in model space), ``where`` says which block for messages."""
        kind = entity.dxftype()
        name = entity.dxf.get("layer", "0")
        if parent_layer is not None and name == "0":
            name = parent_layer
        label = f"{kind} #{entity.dxf.handle}" if entity.dxf.handle else f"{kind}{where}"
        layer = self.layer(name)
        layer.entities[kind] += 1
        if kind == "INSERT":
            self.insert(entity, name, label, depth)
            return
        try:
            if kind == "HATCH":
                layer.fills.append(Fill(tuple(self.hatch_loops(entity, label)), label))
            elif kind in CURVE_TYPES:
                layer.curves.extend(self.curves(entity, kind, label))
        except (ValueError, ArithmeticError) as err:
            raise DrawingError(
                f"cannot read its geometry: {_one_line(err)}",
                file=self.file,
                layer=name,
                entity=label,
            ) from err

    def insert(self, insert: Any, layer: str, label: str, depth: int) -> None:
        """The contents of a block reference (every cell of a MINSERT array)."""
        if depth >= MAX_NESTING:
            raise DrawingError(
                f"blocks nested deeper than {MAX_NESTING} levels (a block inserting itself?)",
                file=self.file,
                layer=layer,
                entity=label,
            )
        block = insert.dxf.get("name", "?")
        where = f" in block {block!r} ({label})"
        inserts = insert.multi_insert() if insert.mcount > 1 else (insert,)
        for one in inserts:
            try:
                contents = list(one.virtual_entities())
            except Exception as err:  # ezdxf raises several types for broken blocks
                raise DrawingError(
                    f"cannot place the contents of block {block!r}: {_one_line(err)}",
                    file=self.file,
                    layer=layer,
                    entity=label,
                ) from err
            for entity in contents:
                self.add(entity, layer, where, depth + 1)

    def curves(self, e: Any, kind: str, label: str) -> Iterator[Curve]:
        s = self.sagitta
        if kind == "LINE":
            yield Curve(_xy([e.dxf.start, e.dxf.end]), False, label)
        elif kind in ("ARC", "CIRCLE"):
            centre, r = e.dxf.center, abs(float(e.dxf.radius))
            if kind == "CIRCLE":
                start, sweep = 0.0, 2.0 * math.pi
            else:
                start = math.radians(e.dxf.start_angle)
                sweep = (math.radians(e.dxf.end_angle) - start) % (2.0 * math.pi)
                sweep = sweep or 2.0 * math.pi
            pts = arc_points((centre[0], centre[1]), r, start, sweep, s)
            closed = kind == "CIRCLE"
            if closed:
                pts = pts[:-1]
            yield Curve(_to_wcs(e.ocs(), pts, centre[2]), closed, label)
        elif kind == "ELLIPSE":
            span = (e.dxf.end_param - e.dxf.start_param) % (2.0 * math.pi)
            closed = span < 1e-12 or abs(span - 2.0 * math.pi) < 1e-12
            pts = _xy(e.flattening(s, segments=8))
            yield Curve(pts[:-1] if closed else pts, closed, label)
        elif kind == "SPLINE":
            pts = _xy(e.flattening(s, segments=4))
            closed = bool(e.closed) or (len(pts) > 2 and np.array_equal(pts[0], pts[-1]))
            if closed and len(pts) > 1 and np.array_equal(pts[0], pts[-1]):
                pts = pts[:-1]
            yield Curve(pts, closed, label)
        elif kind == "LWPOLYLINE":
            xyb = np.array(e.get_points("xyb"), float).reshape(-1, 3)
            closed = bool(e.closed)
            pts = polyline_points(xyb[:, :2], xyb[:, 2], closed, s)
            yield Curve(_to_wcs(e.ocs(), pts, float(e.dxf.elevation)), closed, label)
        elif kind == "POLYLINE":
            yield from self.polyline(e, label)

    def polyline(self, e: Any, label: str) -> Iterator[Curve]:
        """2-D polylines (bulges, in their OCS) and 3-D polylines; meshes are not curves."""
        closed = bool(e.is_closed)
        if e.is_2d_polyline:
            # skip the frame (control) points of a spline-fit polyline: flag 16
            verts = [v for v in e.vertices if not v.dxf.flags & 16]
            xy = np.array([(v.dxf.location[0], v.dxf.location[1]) for v in verts], float)
            bulge = np.array([v.dxf.get("bulge", 0.0) for v in verts], float)
            pts = polyline_points(xy.reshape(-1, 2), bulge, closed, self.sagitta)
            yield Curve(_to_wcs(e.ocs(), pts, float(e.dxf.elevation[2])), closed, label)
        elif e.is_3d_polyline:
            pts = _xy(v.dxf.location for v in e.vertices)
            yield Curve(pts, closed, label)

    def hatch_loops(self, h: Any, label: str) -> Iterator[tuple[Curve, ...]]:
        """Each boundary path of a HATCH as curves in world coordinates (edge paths: one curve
        per edge, joined later)."""
        from ezdxf.entities.boundary_paths import (
            ArcEdge,
            EllipseEdge,
            LineEdge,
            PolylinePath,
            SplineEdge,
        )

        ocs, z = h.ocs(), float(h.dxf.elevation[2])
        s = self.sagitta
        for k, path in enumerate(h.paths):
            name = f"{label}, boundary path {k}"
            if isinstance(path, PolylinePath):
                xyb = np.array(path.vertices, float).reshape(-1, 3)
                pts = polyline_points(xyb[:, :2], xyb[:, 2], True, s)
                yield (Curve(_to_wcs(ocs, pts, z), True, name),)
                continue
            pieces = []
            for edge in path.edges:
                if isinstance(edge, LineEdge):
                    pts = np.array([edge.start[:2], edge.end[:2]], float)
                elif isinstance(edge, ArcEdge):
                    start = math.radians(edge.start_angle)
                    sweep = (math.radians(edge.end_angle) - start) % (2.0 * math.pi)
                    sweep = sweep or 2.0 * math.pi
                    c = edge.center
                    pts = arc_points((c[0], c[1]), abs(edge.radius), start, sweep, s)
                elif isinstance(edge, EllipseEdge):
                    pts = _xy(edge.construction_tool().flattening(s, segments=8))
                elif isinstance(edge, SplineEdge):
                    pts = _xy(_spline_edge(edge).flattening(s, segments=4))
                else:  # pragma: no cover - ezdxf knows no other edge types
                    continue
                pieces.append(Curve(_to_wcs(ocs, pts, z), False, name))
            yield tuple(pieces)


def _spline_edge(edge: Any) -> Any:
    """The B-spline of a HATCH spline edge (control points, else fit points), in its OCS."""
    from ezdxf.math import BSpline, fit_points_to_cad_cv

    if len(edge.control_points):
        return BSpline(
            control_points=edge.control_points,
            order=edge.degree + 1,
            knots=edge.knot_values,
            weights=edge.weights if edge.weights else None,
        )
    tangents = None
    if edge.start_tangent and edge.end_tangent:
        tangents = (edge.start_tangent, edge.end_tangent)
    return fit_points_to_cad_cv(edge.fit_points, tangents=tangents)


def _xy(points: Any) -> np.ndarray:
    """(n, 2) array of the x, y of an iterable of 2-D or 3-D points."""
    pts = [(float(p[0]), float(p[1])) for p in points]
    return np.array(pts, float).reshape(-1, 2)


def _to_wcs(ocs: Any, pts: np.ndarray, elevation: float) -> np.ndarray:
    """Points (n, 2) of an entity's object coordinate system at ``elevation`` in world x, y."""
    if not ocs.transform or len(pts) == 0:
        return pts
    from ezdxf.math import Vec3

    return _xy(ocs.points_to_wcs(Vec3(x, y, elevation) for x, y in pts))
