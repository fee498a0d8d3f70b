"""Painted areas of drawn curves against closed-form areas: a circle (πr²) and a rectangle
with rounded corners drawn with bulges (W·H − (4 − π)ρ²); a hatch with a hole."""

from __future__ import annotations

import math

import numpy as np
import pytest
from casefiles import load
from drawings import line, new_drawing, rectangle, save

from fvheat.case.geometry import SAGITTA
from fvheat.drawing.polygons import signed_area
from fvheat.mesh.rectilinear import build_mesh, paint_regions

#: mm: circle radius; rounded rectangle width, height and corner radius
R = 2000.0
W, H, RHO = 4000.0, 2000.0, 500.0
EXACT = {"circle": math.pi * R**2 / 1e6, "rounded": (W * H - (4 - math.pi) * RHO**2) / 1e6}
#: m: curve lengths, for the flattening bound
ARC_LENGTH = {"circle": 2 * math.pi * R / 1e3, "rounded": 2 * math.pi * RHO / 1e3}

CASE = """
[geometry]
drawing = "d.dxf"
units = "mm"
[mesh]
max_cell = 250
[[regions]]
layer = "CIRCLE"
material = "clay_brick"
[[regions]]
layer = "ROUNDED"
material = "eps"
[[boundaries]]
name = "s"
layer = "S"
temperature = 0
"""


@pytest.fixture(scope="module")
def case(tmp_path_factory):
    folder = tmp_path_factory.mktemp("area")
    doc, msp = new_drawing()
    msp.add_circle((0, 0), R, dxfattribs={"layer": "CIRCLE"})
    q = math.tan(math.pi / 8)  # bulge of a quarter circle: tan(90°/4)
    x0, y0 = 3000.0, -1000.0
    corners = [
        (x0 + RHO, y0, 0),
        (x0 + W - RHO, y0, q),
        (x0 + W, y0 + RHO, 0),
        (x0 + W, y0 + H - RHO, q),
        (x0 + W - RHO, y0 + H, 0),
        (x0 + RHO, y0 + H, q),
        (x0, y0 + H - RHO, 0),
        (x0, y0 + RHO, q),
    ]
    msp.add_lwpolyline(corners, format="xyb", close=True, dxfattribs={"layer": "ROUNDED"})
    line(msp, "S", (x0 + RHO, y0), (x0 + W - RHO, y0))  # the rounded shape's bottom edge
    save(doc, folder / "d.dxf")
    return load(folder, CASE)


def test_flattening_within_the_sagitta(case):
    """The flattened outlines are inscribed: their area falls short of the exact one by at
    most chord × sagitta per chord, so by at most sagitta × arc length (plane geometry)."""
    for name, region in zip(("circle", "rounded"), case.regions, strict=True):
        deficit = EXACT[name] - signed_area(region.vertices)
        assert 0 <= deficit <= SAGITTA * ARC_LENGTH[name], name


def test_painted_area_converges(case):
    """Cells painted on uniform grids of spacing h = R/4 … R/64 (eight grid offsets each,
    fixed): the root-mean-square relative error against the exact area decreases with every
    refinement and the finest is below 1e-3 (the flattening alone accounts for ≤ 1e-4)."""
    phi = (math.sqrt(5) - 1) / 2
    rms = {"circle": [], "rounded": []}
    for k in range(2, 7):
        h = R / 1e3 / 2**k
        errors = []
        for j in range(1, 9):  # offsets of the grid by fractions of a cell (golden ratio)
            ox, oy = (j * phi) % 1, (1.7 * j * phi * phi) % 1
            x = np.arange(-2.5 - ox * h, 7.5, h)
            y = np.arange(-2.5 - oy * h, 2.5, h)
            owner = paint_regions(case, x, y)
            area = np.outer(np.diff(y), np.diff(x))
            errors.append(
                [area[owner == k].sum() / EXACT[n] - 1 for k, n in enumerate(("circle", "rounded"))]
            )
        e = np.sqrt(np.mean(np.square(errors), axis=0))
        rms["circle"].append(e[0])
        rms["rounded"].append(e[1])
    for name, errs in rms.items():
        assert np.all(np.diff(errs) < 0), (name, errs)
        assert errs[-1] < 1e-3, (name, errs)


def test_tool_mesh_paints_the_exact_area(case):
    """On the tool's own mesh the chords of a curve add no grid lines (the cells stay at
    max_cell = 250 mm); the painted areas are within 0.5 % of the exact ones, and within
    1e-3 with the cells halved twice (staircase error of order h/R)."""
    for refine, tolerance in ((1.0, 5e-3), (4.0, 1e-3)):
        mesh = build_mesh(case, refine=refine)
        for name, region in zip(("circle", "rounded"), case.regions, strict=True):
            k = mesh.material_names.index(region.material)
            painted = mesh.volumes[mesh.material == k].sum()
            assert painted == pytest.approx(EXACT[name], rel=tolerance), (name, refine)
    assert build_mesh(case).n_cells < 2000  # a grid line per chord made it 10 times more


HATCH_CASE = """
[geometry]
drawing = "d.dxf"
units = "mm"
[mesh]
max_cell = 100
[[regions]]
layer = "BASE"
material = "clay_brick"
[[regions]]
layer = "FILL"
material = "eps"
[[boundaries]]
name = "s"
layer = "S"
temperature = 0
"""


def test_hatch_hole_is_not_painted(tmp_path):
    """A hatch (square 1 m, square hole 0.5 m) over an earlier region: the cells centred in
    the hole keep the earlier material; the hatch paints 1 − 0.25 m² exactly (the hole's
    corners are grid lines because the earlier region's second outline has them)."""
    doc, msp = new_drawing()
    rectangle(msp, "BASE", (0, 0, 1000, 1000))
    rectangle(msp, "BASE", (250, 250, 750, 750))
    h = msp.add_hatch(dxfattribs={"layer": "FILL"})
    h.paths.add_polyline_path([(0, 0), (1000, 0), (1000, 1000), (0, 1000)], is_closed=True)
    h.paths.add_polyline_path([(250, 250), (750, 250), (750, 750), (250, 750)], is_closed=True)
    line(msp, "S", (0, 0), (0, 1000))
    save(doc, tmp_path / "d.dxf")
    case = load(tmp_path, HATCH_CASE)
    assert len(case.regions[-1].holes) == 1
    mesh = build_mesh(case)
    fill = mesh.material == mesh.material_names.index("eps")
    assert mesh.volumes[fill].sum() == pytest.approx(1.0 - 0.25, rel=1e-12)
    x, y = mesh.centres.T
    in_hole = (x > 0.25) & (x < 0.75) & (y > 0.25) & (y < 0.75)
    assert in_hole.any() and not (fill & in_hole).any()
    assert np.all(mesh.material[in_hole] == mesh.material_names.index("clay_brick"))
