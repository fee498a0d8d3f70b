"""Polygons with thousands of vertices: cells painted by scan lines agree with the
point-by-point even-odd test, and a 3 000-vertex corrugated outline with a boundary on
every one of its segments meshes (not timed; it took minutes before the scan lines)."""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from casefiles import write_case

from fvheat.case.load import load_case
from fvheat.cli.main import main
from fvheat.mesh.geometry import grid_in_polygon, points_in_polygon, points_on_segments
from fvheat.mesh.rectilinear import build_mesh


@pytest.mark.parametrize("seed", range(40))
def test_scan_lines_agree_with_the_even_odd_test(seed):
    """Random star-shaped polygons, half of them with vertices on the grid's lattice so
    cell centres fall on edges and vertices (on the outline counts as inside)."""
    rng = np.random.default_rng(seed)
    n = int(rng.integers(3, 40))
    angle = np.sort(rng.uniform(0, 2 * np.pi, n))
    radius = rng.uniform(0.3, 1.0, n)
    v = np.column_stack([radius * np.cos(angle), radius * np.sin(angle)])
    if seed % 2:
        v = np.round(v * 4) / 4
        v = v[np.concatenate([[True], np.any(np.diff(v, axis=0) != 0, axis=1)])]
        if len(v) > 1 and np.all(v[0] == v[-1]):
            v = v[:-1]
        if len(v) < 3:
            v = np.array([[0.0, 0.0], [1.0, 0.0], [0.5, 0.75]])
    xc = np.unique(np.round(rng.uniform(-1.2, 1.2, 60) * 8) / 8)
    yc = np.unique(np.round(rng.uniform(-1.2, 1.2, 50) * 8) / 8)
    px, py = np.meshgrid(xc, yc)
    expected = points_in_polygon(px, py, v)
    np.testing.assert_array_equal(grid_in_polygon(xc, yc, v), expected)


def test_points_on_segments():
    segs = [((0.0, 0.0), (1.0, 1.0)), ((2.0, 0.0), (2.0, 1.0))]
    pts = np.array([[0.5, 0.5], [0.5, 0.6], [2.0, 0.3], [2.0, 1.2], [1.0, 1.0]])
    np.testing.assert_array_equal(
        points_on_segments(pts, segs, 1e-9), [True, False, True, False, True]
    )


def corrugated(teeth: int) -> str:
    """A slab 0.2 m thick under a saw-tooth top (1 mm pitch, 10 mm high): 2·teeth + 3
    vertices, every one a corner of the outline, and the top surface one boundary made of
    all 2·teeth + 1 segments of the saw tooth."""
    pitch, high = 0.001, 0.01
    top = [(0.0, 0.2)]
    for k in range(teeth):
        top += [(round((k + 0.5) * pitch, 9), 0.2 + high), (round((k + 1) * pitch, 9), 0.2)]
    width = top[-1][0]
    outline = [(0.0, 0.0), (width, 0.0), *top[::-1]]
    poly = ", ".join(f"[{x!r}, {y!r}]" for x, y in outline)
    edges = ", ".join(
        f"[[{a[0]!r}, {a[1]!r}], [{b[0]!r}, {b[1]!r}]]" for a, b in itertools.pairwise(top)
    )
    return f"""
        [mesh]
        max_cell = 0.05
        [materials.c]
        conductivity = 1.0
        [[regions]]
        material = "c"
        polygon = [{poly}]
        [[boundaries]]
        name = "top"
        edges = [{edges}]
        air_temperature = 20.0
        resistance = 0.13
        [[boundaries]]
        name = "bottom"
        edges = [[[0.0, 0.0], [{width!r}, 0.0]]]
        air_temperature = 0.0
        resistance = 0.04
        """


def test_three_thousand_vertices_mesh(tmp_path):
    path = write_case(tmp_path, corrugated(1499))
    case = load_case(path)
    assert len(case.regions[0].vertices) == 3001
    mesh = build_mesh(case)
    top = mesh.boundary_names.index("top")
    # every tooth is meshed: at least one column per 1 mm of the 1.499 m wide slab
    assert mesh.grid.x.size > 1499
    # every face along the top is claimed by the boundary of 2 999 segments
    top_faces = mesh.b_normal[:, 1] > 0.5
    assert np.all(mesh.b_boundary[top_faces] == top)
    # the painted area is the outline's (shoelace formula), within a cell row's worth
    v = case.regions[0].vertices
    area = 0.5 * abs(np.sum(v[:, 0] * np.roll(v[:, 1], -1) - np.roll(v[:, 0], -1) * v[:, 1]))
    assert mesh.volumes.sum() == pytest.approx(area, rel=0.01)
    assert main(["check", str(path)]) == 0
