"""Reading drawings: INSERT transforms, layer inheritance, object coordinate systems,
hatch paths, snapping of messy ends; and layers in cases (names, cavities, edges + layer)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from casefiles import load
from drawings import line, new_drawing, rectangle, save

from fvheat.drawing.dxf import read_drawing
from fvheat.drawing.outlines import Snapper, boundary_segments, region_shapes
from fvheat.drawing.polygons import signed_area

BLOCK_RECT = np.array([[0.0, 0.0], [10.0, 0.0], [10.0, 4.0], [0.0, 4.0]])


def placed(points, at, scale, degrees):
    """A block's points placed by an INSERT: scaled about the block base point (0, 0), then
    rotated, then moved to the insertion point (DXF INSERT definition, from memory)."""
    a = math.radians(degrees)
    rot = np.array([[math.cos(a), -math.sin(a)], [math.sin(a), math.cos(a)]])
    return (np.asarray(points) * np.asarray(scale)) @ rot.T + np.asarray(at)


def same_ring(got, expected, tol=1e-9):
    """Whether two closed rings have the same vertices (any start, any direction)."""
    got, expected = np.asarray(got), np.asarray(expected)
    if got.shape != expected.shape:
        return False
    for ring in (got, got[::-1]):
        for k in range(len(ring)):
            if np.allclose(np.roll(ring, k, axis=0), expected, atol=tol, rtol=0):
                return True
    return False


def shapes(drawing, layer, unit="mm", tol=0.05):
    return region_shapes(drawing.layers[layer], Snapper(tol), file="d.dxf", unit=unit)


def test_insert_twice_with_scale_and_rotation(tmp_path):
    """A block inserted twice (non-uniform scale, rotation) and inside another block: its
    closed outline lands at the transformed coordinates (computed here with numpy), on the
    INSERT's layer for block layer 0, on its own layer otherwise."""
    doc, msp = new_drawing()
    block = doc.blocks.new("FIX")
    block.add_lwpolyline(BLOCK_RECT.tolist(), close=True)  # layer 0
    block.add_line((0, 2), (10, 2), dxfattribs={"layer": "AXIS"})
    first = ((100.0, 50.0), (2.0, 3.0), 30.0)
    second = ((-20.0, 10.0), (0.5, 0.5), -90.0)
    for at, (sx, sy), deg in (first, second):
        msp.add_blockref(
            "FIX", at, dxfattribs={"layer": "FIXING", "xscale": sx, "yscale": sy, "rotation": deg}
        )
    outer = doc.blocks.new("PAIR")
    outer.add_blockref("FIX", (5, 0), dxfattribs={"rotation": 90})  # layer 0 inside a block
    msp.add_blockref("PAIR", (1000, 0), dxfattribs={"layer": "NEST", "xscale": 2, "yscale": 2})
    d = read_drawing(save(doc, tmp_path / "d.dxf"), 0.1)

    got = [s.outline for s in shapes(d, "FIXING")]
    assert len(got) == 2
    for g, (at, sc, deg) in zip(got, (first, second), strict=True):
        assert same_ring(g, placed(BLOCK_RECT, at, sc, deg))
    nested = placed(placed(BLOCK_RECT, (5, 0), (1, 1), 90), (1000, 0), (2, 2), 0)
    (only,) = shapes(d, "NEST")
    assert same_ring(only.outline, nested)
    assert "in block 'FIX'" in only.entity
    # the AXIS line keeps its own layer in every placement
    assert d.layers["AXIS"].entities["LINE"] == 3
    ends = [c.points for c in d.layers["AXIS"].curves]
    np.testing.assert_allclose(ends[0], placed([(0, 2), (10, 2)], *first), atol=1e-9)


def test_minsert_array(tmp_path):
    """A MINSERT (2 columns) places the block at each cell of its array."""
    doc, msp = new_drawing()
    doc.blocks.new("FIX").add_lwpolyline(BLOCK_RECT.tolist(), close=True)
    ref = msp.add_blockref("FIX", (0, 0), dxfattribs={"layer": "FIXING"})
    ref.grid(size=(1, 2), spacing=(0, 50))
    d = read_drawing(save(doc, tmp_path / "d.dxf"), 0.1)
    got = sorted(tuple(s.outline.min(axis=0)) for s in shapes(d, "FIXING"))
    assert got == [(0.0, 0.0), (50.0, 0.0)]


def test_mirrored_polyline(tmp_path):
    """A polyline with extrusion (0, 0, −1) is mirrored: its object x axis is the world's −x
    (arbitrary axis algorithm of the DXF reference, from memory)."""
    doc, msp = new_drawing()
    msp.add_lwpolyline(
        [(10, 0), (20, 0), (20, 5), (10, 5)],
        close=True,
        dxfattribs={"layer": "M", "extrusion": (0, 0, -1)},
    )
    d = read_drawing(save(doc, tmp_path / "d.dxf"), 0.1)
    (s,) = shapes(d, "M")
    assert same_ring(s.outline, [(-10, 0), (-20, 0), (-20, 5), (-10, 5)])


def test_hatch_even_odd(tmp_path):
    """A hatch's paths nest even-odd: outer square, a hole in it, an island in the hole."""
    doc, msp = new_drawing()
    h = msp.add_hatch(dxfattribs={"layer": "H"})
    for box in ((0, 0, 100, 100), (20, 20, 80, 80), (40, 40, 60, 60)):
        x0, y0, x1, y1 = box
        h.paths.add_polyline_path([(x0, y0), (x1, y0), (x1, y1), (x0, y1)], is_closed=True)
    ep = h.paths.add_edge_path()  # a second, round hole drawn as an edge path
    ep.add_arc((90, 10), 5, 0, 360)
    d = read_drawing(save(doc, tmp_path / "d.dxf"), 0.01)
    outer, island = shapes(d, "H")
    assert same_ring(outer.outline, [(0, 0), (100, 0), (100, 100), (0, 100)])
    assert len(outer.holes) == 2
    assert same_ring(outer.holes[0], [(20, 20), (80, 20), (80, 80), (20, 80)])
    # the round hole: area of a circle of radius 5 less the flattening (chord × sagitta
    # bounds the area between each chord and its arc)
    round_hole = abs(signed_area(outer.holes[1]))
    assert 0 <= math.pi * 25 - round_hole <= 0.01 * 2 * math.pi * 5
    assert same_ring(island.outline, [(40, 40), (60, 40), (60, 60), (40, 60)])
    assert island.holes == ()


def test_hatch_boundary_objects_on_its_layer(tmp_path):
    """A hatch drawn with its boundary objects on the same layer (a closed polyline tracing
    its outer path, a circle tracing its hole, as CAD keeps an associative hatch): one shape
    with its hole, not the union that would fill the hole; an unrelated closed polyline on
    the layer is still a shape."""
    doc, msp = new_drawing()
    rectangle(msp, "H", (0, 0, 100, 100))
    msp.add_circle((50, 50), 10, dxfattribs={"layer": "H"})
    rectangle(msp, "H", (200, 0, 300, 100))
    h = msp.add_hatch(dxfattribs={"layer": "H"})
    h.paths.add_polyline_path([(0, 0), (100, 0), (100, 100), (0, 100)], is_closed=True)
    h.paths.add_edge_path().add_arc((50, 50), 10, 0, 360)
    d = read_drawing(save(doc, tmp_path / "d.dxf"), 0.1)
    hatch, other = shapes(d, "H")
    assert same_ring(hatch.outline, [(0, 0), (100, 0), (100, 100), (0, 100)])
    assert len(hatch.holes) == 1
    assert same_ring(other.outline, [(200, 0), (300, 0), (300, 100), (200, 100)])


def test_messy_ends_are_snapped(tmp_path):
    """Four lines whose ends miss by 0.03 mm join into one closed outline; no vertex moves by
    more than the snap tolerance; a zero-length line is ignored."""
    doc, msp = new_drawing()
    for a, b in (
        ((0, 0), (200, 0.02)),
        ((200.03, 0), (200, 100)),
        ((199.98, 100.01), (0, 100)),
        ((0.01, 100), (0, 0.03)),
        ((50, 50), (50, 50)),
    ):
        line(msp, "W", a, b)
    d = read_drawing(save(doc, tmp_path / "d.dxf"), 0.1)
    (s,) = shapes(d, "W")
    assert same_ring(s.outline, [(0, 0), (200, 0), (200, 100), (0, 100)], tol=0.05)
    segs = boundary_segments(d.layers["W"], Snapper(0.05), file="d.dxf", unit="mm")
    assert len(segs) == 4


def test_closed_curves(tmp_path):
    """An ellipse and a closed spline are closed shapes; the ellipse's area is πab less at
    most chord × sagitta over its perimeter (Ramanujan's perimeter, from memory, bounds it
    well enough); an unflagged polyline ending on its start is closed; a 2-D POLYLINE with
    bulges has the area of its straight and round parts (closed form)."""
    doc, msp = new_drawing()
    msp.add_ellipse((0, 0), major_axis=(40, 0), ratio=0.5, dxfattribs={"layer": "E"})
    msp.add_spline(
        fit_points=[(0, 0), (50, 30), (100, 0), (50, -30), (0, 0)], dxfattribs={"layer": "S"}
    )
    msp.add_lwpolyline([(0, 0), (10, 0), (10, 10), (0, 0)], dxfattribs={"layer": "P"})
    # a 2-D POLYLINE stadium: 100 long, semicircular ends of radius 20 (bulge 1: a half turn)
    msp.add_polyline2d(
        [(0, 0, 0), (100, 0, 1), (100, 40, 0), (0, 40, 1)],
        format="xyb",
        close=True,
        dxfattribs={"layer": "STADIUM"},
    )
    d = read_drawing(save(doc, tmp_path / "d.dxf"), 0.1)
    (st,) = shapes(d, "STADIUM")
    exact = 100 * 40 + math.pi * 20**2  # rectangle and two half discs
    assert 0 <= exact - signed_area(st.outline) <= 0.1 * 2 * math.pi * 20
    assert st.outline[:, 0].max() == pytest.approx(120, abs=0.1)
    (e,) = shapes(d, "E")
    a, b = 40.0, 20.0
    perimeter = math.pi * (3 * (a + b) - math.sqrt((3 * a + b) * (a + 3 * b)))
    assert 0 <= math.pi * a * b - signed_area(e.outline) <= 0.1 * perimeter
    assert len(shapes(d, "S")) == 1 and len(shapes(d, "P")) == 1


CASE = """
[geometry]
drawing = "d.dxf"
units = "mm"
[mesh]
max_cell = 50
[[regions]]
name = "wall"
layer = "wall"
material = "clay_brick"
[[regions]]
name = "voids"
layer = "VOID"
cavity = {{ heat_flow = "+x" }}
[[boundaries]]
name = "in"
layer = "IN"
edges = [[[0, 1000], [200, 1000]]]
air_temperature = 20
resistance = 0.13
[[boundaries]]
name = "out"
layer = "OUT"
air_temperature = 0
resistance = 0.04
"""


def test_layers_in_a_case(tmp_path):
    """Names, a case-insensitive layer match, one cavity material per shape (each sized by
    its own box), boundary edges and layer segments together, arcs as chords (m)."""
    doc, msp = new_drawing()
    rectangle(msp, "WALL", (0, 0, 200, 1000))
    rectangle(msp, "VOID", (50, 100, 150, 200))
    rectangle(msp, "VOID", (50, 400, 150, 700))
    line(msp, "IN", (0, 0), (0, 1000))
    msp.add_arc((200, 500), 100, -90, 90, dxfattribs={"layer": "OUT"})
    save(doc, tmp_path / "d.dxf")
    case = load(tmp_path, CASE.format())
    assert [(r.name, r.entry) for r in case.regions] == [
        ("wall", 0),
        ("voids", 1),
        ("voids", 1),
    ]
    assert case.regions[0].is_box and case.regions[0].bounds == (0.0, 0.0, 0.2, 1.0)
    m1, m2 = case.regions[1].material, case.regions[2].material
    assert (m1, m2) == ("regions.1.cavity.0", "regions.1.cavity.1")
    assert case.materials[m1].conductivity != case.materials[m2].conductivity
    inside = case.boundary("in").edges
    assert inside[0] == ((0.0, 1.0), (0.2, 1.0))  # typed edges first, then the layer's
    assert inside[1] == ((0.0, 0.0), (0.0, 1.0))
    arc = np.array(case.boundary("out").edges)
    assert len(arc) == math.ceil(math.pi / (2 * math.acos(1 - 0.1 / 100)))
    np.testing.assert_allclose(np.hypot(arc[..., 0] - 0.2, arc[..., 1] - 0.5), 0.1, rtol=1e-12)


def test_region_names_unique(tmp_path):
    """Region names follow the boundary name rules: unique."""
    doc, msp = new_drawing()
    rectangle(msp, "WALL", (0, 0, 200, 1000))
    rectangle(msp, "VOID", (50, 100, 150, 200))
    line(msp, "IN", (0, 0), (0, 1000))
    msp.add_arc((200, 500), 100, -90, 90, dxfattribs={"layer": "OUT"})
    save(doc, tmp_path / "d.dxf")
    with pytest.raises(Exception, match=r"regions\.1\.name: name 'wall' is already used"):
        load(tmp_path, CASE.format(), ["regions.1.name=wall"])
