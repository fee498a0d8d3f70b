"""Holes in typed regions (``holes = [[[x, y], ...], ...]`` beside ``box`` or
``polygon``): a hollow section typed as one region with a hole is the same model as the
same section typed as four boxes around the void, and the hole's edges are exterior faces
a boundary can take. Reference: the four-box model (no hole) on the same grid lines must
give the same heat flows to round-off; on the triangle mesh, within 0.5 % of it (two
different conforming meshes of one geometry, both second order)."""

from __future__ import annotations

import pytest
from casefiles import load

from fvheat.errors import CaseError
from fvheat.simulate import simulate

HEAD = """
title = "hollow block"
[mesh]
max_cell = 0.01
min_cell = 0.005
[materials.block]
conductivity = 0.8
"""
SIDES = """
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.3]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.3, 0.0], [0.3, 0.3]]]
air_temperature = -5.0
resistance = 0.04
"""
HOLE = """
[[regions]]
material = "block"
box = [0.0, 0.0, 0.3, 0.3]
holes = [[[0.1, 0.1], [0.2, 0.1], [0.2, 0.2], [0.1, 0.2]]]
"""
BOXES = "".join(
    f'\n[[regions]]\nmaterial = "block"\nbox = {box}\n'
    for box in (
        [0.0, 0.0, 0.3, 0.1],
        [0.0, 0.2, 0.3, 0.3],
        [0.0, 0.1, 0.1, 0.2],
        [0.2, 0.1, 0.3, 0.2],
    )
)
DUCT = """
[[boundaries]]
name = "duct"
edges = [[[0.1, 0.1], [0.2, 0.1]], [[0.2, 0.1], [0.2, 0.2]], [[0.2, 0.2], [0.1, 0.2]],
    [[0.1, 0.2], [0.1, 0.1]]]
air_temperature = 40.0
resistance = 0.1
"""


def _flows(tmp_path, regions: str, extra: str = "", kind: str = "rectilinear") -> dict:
    case = load(tmp_path, HEAD + regions + SIDES + extra, [f'mesh.kind="{kind}"'])
    sol = simulate(case)
    assert sol.balance.relative <= 1e-9
    return {name: s.heat_flow for name, s in sol.surfaces.items()}


@pytest.mark.parametrize("extra", ["", DUCT], ids=["void", "heated duct"])
def test_a_hole_is_the_void_four_boxes_leave(tmp_path, extra):
    hole, boxes = _flows(tmp_path, HOLE, extra), _flows(tmp_path, BOXES, extra)
    assert hole.keys() == boxes.keys()
    for name in hole:
        assert hole[name] == pytest.approx(boxes[name], rel=1e-12, abs=1e-12), name
    if extra:  # the duct really heats the block
        assert hole["duct"] > 1.0 and hole["outside"] < -1.0


def test_a_hole_on_the_triangle_mesh(tmp_path):
    hole = _flows(tmp_path, HOLE, DUCT, kind="triangles")
    boxes = _flows(tmp_path, BOXES, DUCT)
    for name in hole:
        assert hole[name] == pytest.approx(boxes[name], rel=5e-3), name


@pytest.mark.parametrize(
    ("holes", "words"),
    [
        ("[[[0.2, 0.2], [0.4, 0.2], [0.4, 0.25], [0.2, 0.25]]]", "inside the region's outline"),
        ("[[[0.0, 0.1], [0.1, 0.1], [0.1, 0.2], [0.0, 0.2]]]", "inside the region's outline"),
        (
            "[[[0.05, 0.05], [0.15, 0.05], [0.15, 0.15], [0.05, 0.15]],"
            " [[0.1, 0.1], [0.2, 0.1], [0.2, 0.2], [0.1, 0.2]]]",
            "meets hole 0",
        ),
        ("[]", "expected a list of polygons"),
        ("[[[0.1, 0.1], [0.2, 0.1]]]", "at least 3 vertices"),
    ],
)
def test_bad_holes_are_one_line_errors(tmp_path, holes, words):
    text = HEAD + HOLE.replace(HOLE.splitlines()[-1], f"holes = {holes}") + SIDES
    with pytest.raises(CaseError) as err:
        load(tmp_path, text)
    assert "regions.0.holes" in str(err.value) and words in str(err.value)
    assert "\n" not in str(err.value)
