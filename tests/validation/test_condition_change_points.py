"""The lowest surface temperature where a surface's temperature condition changes.

A brick wall insulated outside has a heated room (20 °C) on its lower half and an
unheated stair (5 °C) on its upper half, both R_si = 0.13 (invented case). The heated
surface is coldest at the point where the stair's surface begins, where the surface
temperature changes steeply. Reference: scikit-fem (P2 on a tensor mesh graded to
0.1 mm at every key line, :func:`fem_reference.solve_boxes`), 11.498 °C there. Both of
fvheat's meshes at their default sizes must give it within 0.1 K (the grid: +0.06 K, with
its cells shrunk towards the point; +0.22 K before, when only re-entrant corners were
refined; triangles −0.002 K).
"""

from __future__ import annotations

import pytest
from fem_reference import solve_boxes

from fvheat.case.load import load_case
from fvheat.mesh.rectilinear import build_mesh, condition_changes, key_lines
from fvheat.study import run_study

SPLIT_WALL = """
title = "wall beside an unheated stair"
[mesh]
max_cell = 0.02
[materials.brick]
conductivity = 0.8
[materials.eps]
conductivity = 0.04
[[regions]]
material = "brick"
box = [0.0, 0.0, 0.2, 2.0]
[[regions]]
material = "eps"
box = [0.2, 0.0, 0.3, 2.0]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 1.0]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "stair"
edges = [[[0.0, 1.0], [0.0, 2.0]]]
air_temperature = 5.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.3, 0.0], [0.3, 2.0]]]
air_temperature = -10.0
resistance = 0.04
"""


@pytest.fixture(scope="module")
def reference(tmp_path_factory):
    path = tmp_path_factory.mktemp("split") / "case.toml"
    path.write_text(SPLIT_WALL, encoding="utf-8")
    fem = solve_boxes(load_case(path))
    return path, fem.surface_minimum("inside")


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_coldest_point_where_the_condition_changes(reference, kind):
    path, (t_ref, at_ref) = reference
    surfaces = run_study(load_case(path, [f'mesh.kind="{kind}"'])).solution.surfaces
    inside = surfaces["inside"]
    assert inside.min_at == pytest.approx(tuple(at_ref), abs=1e-9)
    assert inside.min_temperature == pytest.approx(t_ref, abs=0.1)


def test_surfaces_tied_to_two_csv_series_mesh(tmp_path):
    """Two meeting surfaces whose air temperatures come from two CSV columns: the grid
    refines where they meet (the series differ) and does not fail comparing them (a
    series holds arrays)."""
    (tmp_path / "air.csv").write_text("time,room,stair\n0,20,5\n7200,21,4\n", encoding="utf-8")
    text = SPLIT_WALL.replace(
        "air_temperature = 20.0", 'air_temperature = { file = "air.csv", column = "room" }'
    ).replace("air_temperature = 5.0", 'air_temperature = { file = "air.csv", column = "stair" }')
    assert text.count("air.csv") == 2
    path = tmp_path / "case.toml"
    path.write_text(text, encoding="utf-8")
    case = load_case(path)

    points = condition_changes(case, key_lines(case)[1])
    assert [0.0, 1.0] in points.tolist()
    build_mesh(case)
