"""Seed lattice and size function of the triangle mesher.

Sources: geometric identities (a hexagonal lattice's neighbours are all one spacing apart,
so its Delaunay triangles are equilateral; the size function is defined as a minimum of
cones, computed here point by point); the P1 matrix of equilateral triangles has equal,
negative off-diagonal entries (½·cot 60° per triangle, an M-matrix), common FEM practice.
"""

from __future__ import annotations

import numpy as np
import pytest
from casefiles import load

from fvheat.assembly.system import System
from fvheat.mesh.lattice import SPACING, lattice_grid, lattice_seeds
from fvheat.mesh.select import build_mesh
from fvheat.mesh.triangle_sizes import SizeFunction

SQUARE = """
title = "uniform square"
[mesh]
max_cell = 0.02
min_cell = 0.02
kind = "triangles"
[materials.m]
conductivity = 1.0
[[regions]]
material = "m"
box = [0.0, 0.0, 1.0, 1.0]
[[boundaries]]
name = "a"
edges = [[[0.0, 0.0], [0.0, 1.0]]]
temperature = 1.0
[[boundaries]]
name = "b"
edges = [[[1.0, 0.0], [1.0, 1.0]]]
temperature = 0.0
"""


def _angles(v: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Interior angles (k, 3) in degrees."""
    p = v[t]
    out = []
    for i in range(3):
        a, b, c = p[:, i], p[:, (i + 1) % 3], p[:, (i + 2) % 3]
        u, w = b - a, c - a
        cos = np.einsum("ij,ij->i", u, w) / (np.hypot(*u.T) * np.hypot(*w.T))
        out.append(np.degrees(np.arccos(np.clip(cos, -1.0, 1.0))))
    return np.column_stack(out)


def test_hex_lattice_neighbours_are_one_spacing_apart():
    pts = lattice_grid(np.array([0.0, 0.0]), np.array([1.0, 1.0]), 0.1)[0]
    assert pts.min(axis=0).tolist() == [0.0, 0.0]
    assert np.all(pts.max(axis=0) >= 1.0)  # covers the box
    d = np.hypot(*(pts[:, None, :] - pts[None, :, :]).transpose(2, 0, 1))
    np.fill_diagonal(d, np.inf)
    # every point's nearest neighbours are one spacing away, none nearer
    assert abs(d.min() - 0.1) < 1e-12
    inner = (pts[:, 0] > 0.15) & (pts[:, 0] < 0.85) & (pts[:, 1] > 0.15) & (pts[:, 1] < 0.85)
    assert np.all(np.sum(np.abs(d[inner] - 0.1) < 1e-9, axis=1) == 6)


def test_uniform_square_is_mostly_equilateral(tmp_path):
    """Away from the outline the seeded mesh is the lattice's: equilateral triangles of
    edge SPACING × max_cell, equal off-diagonal matrix entries."""
    case = load(tmp_path, SQUARE)
    mesh = build_mesh(case)
    assert mesh.triangles is not None
    ang = _angles(mesh.centres, mesh.triangles)
    equilateral = np.all(np.abs(ang - 60.0) < 0.01, axis=1)
    assert equilateral.mean() > 0.8
    t = mesh.triangles[equilateral]
    edge = np.hypot(*(mesh.centres[t[:, 0]] - mesh.centres[t[:, 1]]).T)
    assert np.allclose(edge, SPACING * 0.02, rtol=1e-9)
    # node count about that of the refinement-only mesher: 1.8 per max_cell² (measured)
    assert 0.8 < mesh.n_cells / (1.8 / 0.02**2) < 1.2
    a = System.build(case, mesh).matrix.tocoo()
    off = a.data[a.row != a.col]
    # two equilateral triangles on an edge: −k·2·½·cot 60° = −1/√3 (k = 1)
    assert np.mean(np.abs(off + 1.0 / np.sqrt(3.0)) < 1e-9) > 0.7
    assert np.mean(off > 0.0) < 0.01  # obtuse pairs only in the band along the outline


def test_probes_stay_nodes_among_the_seeds(tmp_path):
    """Every probe is a vertex of the constraint graph, so a node of the mesh, also inside
    the lattice (where no segment holds it) and in a corner's graded zone."""
    probes = [[0.5037, 0.4983], [0.011, 0.013]]
    text = SQUARE.replace("min_cell = 0.02", "min_cell = 0.005") + "".join(
        f'[[probes]]\nname = "p{i}"\nat = {p}\n' for i, p in enumerate(probes)
    )
    mesh = build_mesh(load(tmp_path, text))
    for p in probes:
        assert np.hypot(*(mesh.centres - np.array(p)).T).min() < 1e-12


def test_no_seeds_in_a_box_far_larger_than_the_body():
    """A thin diagonal strip: the lattice over its box would be mostly outside it, so none
    is made (triangle refines alone)."""
    v = np.array([[0.0, 0.0], [0.01, 0.0], [1.0, 0.99], [1.0, 1.0], [0.99, 1.0], [0.0, 0.01]])
    seg = np.column_stack([np.arange(6), (np.arange(6) + 1) % 6])
    body = 0.014  # about √2 × 0.01
    pts = lattice_seeds(
        v,
        seg,
        0.001,
        lambda p: np.zeros(len(p), int),
        lambda p: np.full(len(p), 0.001 / SPACING),
        body,
    ).points
    assert len(pts) == 0
    square = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]])
    seg = np.column_stack([np.arange(4), (np.arange(4) + 1) % 4])

    def paint(p):  # region 0 on the square, −1 outside
        return np.where(np.all((p >= 0.0) & (p <= 1.0), axis=1), 0, -1)

    pts = lattice_seeds(square, seg, 0.1, paint, lambda p: np.full(len(p), 0.125), 1.0).points
    assert len(pts) > 0
    # clear of the outline by half a spacing
    assert np.all(np.minimum(pts, 1.0 - pts).min(axis=1) > 0.05 * 0.96)


def test_size_function_equals_its_definition():
    """The raster that skips far points changes no value: h(x) = min(largest, min over
    corners of s + (g − 1)·|x − c|), evaluated point by point."""
    rng = np.random.default_rng(3)
    groups = [(rng.uniform(0, 2, (3, 2)), 0.002), (rng.uniform(0, 2, (40, 2)), 0.0005)]
    size = SizeFunction(0.03, groups, 1.25)
    x = rng.uniform(-0.5, 2.5, (4000, 2))
    # points near the corners too, where the raster must let them through
    x = np.vstack([x, groups[1][0] + rng.normal(0, 0.05, (40, 2))])
    ref = np.full(len(x), 0.03)
    for p, s in groups:
        for c in p:
            ref = np.minimum(ref, s + 0.25 * np.hypot(*(x - c).T))
    assert np.allclose(size(x), ref, rtol=0, atol=1e-15)
    assert np.any(ref < 0.03) and np.any(ref == 0.03)


def test_patch_is_the_lattice_clear_of_every_constraint():
    """The patch (lattice triangles taken without triangle): equilateral, counter-clockwise,
    none touching a constraint (segment, vertex or extra point, checked with shapely), its
    boundary edges exactly the edges of one patch triangle (counted directly), its inner
    nodes exactly those with six patch triangles, a hole point inside a patch triangle."""
    import shapely

    from fvheat.mesh.lattice import lattice_seeds

    rng = np.random.default_rng(7)
    outline = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 0.6], [0.55, 1.0], [0.0, 1.0]])
    inner = np.array([[0.3, 0.3], [0.62, 0.41], [0.4, 0.72]])  # a sloped open polyline
    v = np.vstack([outline, inner])
    seg = np.array([[0, 1], [1, 2], [2, 3], [3, 4], [4, 0], [5, 6], [6, 7]])
    spacing = 0.03
    dy = spacing * np.sqrt(3.0) / 2.0
    # two at the centres of lattice triangles (the lattice starts at the graph's corner):
    # farther than half a spacing from their corners
    centres = np.array([[5.5 * spacing, (6 + 1 / 3) * dy], [26.5 * spacing, (24 + 1 / 3) * dy]])
    others = np.vstack([rng.uniform(0.05, 0.95, (6, 2)), centres])
    body = shapely.Polygon(outline)

    def paint(p: np.ndarray) -> np.ndarray:
        return np.where(shapely.contains_xy(body, p[:, 0], p[:, 1]), 0, -1)

    s = lattice_seeds(
        v, seg, spacing, paint, lambda p: np.full(len(p), spacing / SPACING), 0.8, others
    )
    t, p = s.triangles, s.points
    assert len(t) > 500
    a, b, c = p[t[:, 0]], p[t[:, 1]], p[t[:, 2]]
    cross = (b - a)[:, 0] * (c - a)[:, 1] - (b - a)[:, 1] * (c - a)[:, 0]
    assert np.allclose(cross, np.sqrt(3.0) / 2.0 * spacing**2, rtol=1e-9)  # equilateral, ccw
    polys = shapely.polygons(p[t])
    lines = shapely.linestrings(v[seg])
    points = shapely.points(np.vstack([v, others]))
    for geoms in (lines, points):
        tree = shapely.STRtree(geoms)
        hit, _ = tree.query(polys, predicate="intersects")
        assert hit.size == 0
    assert np.all(s.region == 0)
    count: dict[tuple[int, int], int] = {}
    for tri in t:
        for e in range(3):
            key = (int(tri[(e + 1) % 3]), int(tri[(e + 2) % 3]))
            count[key] = count.get(key, 0) + 1
    single = {k for k in count if (k[1], k[0]) not in count}
    assert {tuple(map(int, e)) for e in s.edges} == single and len(s.edges) == len(single)
    around = np.bincount(t.ravel(), minlength=len(p))
    np.testing.assert_array_equal(s.inner, around == 6)
    assert len(s.holes) and shapely.contains_xy(shapely.union_all(polys), *s.holes.T).all()


def test_mesh_with_a_patch_is_conforming(tmp_path, monkeypatch):
    """The band triangulated by triangle and the patch joined: every edge has one or two
    triangles, once in each direction (consistently oriented), the edges of one triangle
    lie on the outline, and the areas add up to the body's (geometric identities)."""
    text = SQUARE.replace(
        "[[boundaries]]",
        '[[regions]]\nmaterial = "m"\npolygon = [[0.2, 0.2], [0.7, 0.3], [0.4, 0.8]]\n'
        '[[probes]]\nname = "p"\nat = [0.811, 0.137]\n\n[[boundaries]]',
        1,
    )
    import fvheat.mesh.triangles as triangles

    joined = []
    seeded = triangles._seeded
    monkeypatch.setattr(triangles, "_seeded", lambda *a: joined.append(seeded(*a)) or joined[-1])
    mesh = build_mesh(load(tmp_path, text))
    assert joined and joined[0] is not None  # the patch taken as it is
    assert mesh.triangles is not None
    v, t = mesh.centres, mesh.triangles
    a, b, c = v[t[:, 0]], v[t[:, 1]], v[t[:, 2]]
    cross = (b - a)[:, 0] * (c - a)[:, 1] - (b - a)[:, 1] * (c - a)[:, 0]
    assert np.all(cross > 0.0)
    assert 0.5 * cross.sum() == pytest.approx(1.0, rel=1e-12)
    directed = np.concatenate([t[:, [1, 2]], t[:, [2, 0]], t[:, [0, 1]]])
    key = directed[:, 0] * len(v) + directed[:, 1]
    assert len(np.unique(key)) == len(key)  # no edge twice in one direction
    back = np.isin(directed[:, 1] * len(v) + directed[:, 0], key)
    ends = v[directed[~back]]
    on_outline = (np.abs(ends) < 1e-12) | (np.abs(ends - 1.0) < 1e-12)
    assert np.all(
        on_outline[:, 0, 0] & on_outline[:, 1, 0] | on_outline[:, 0, 1] & on_outline[:, 1, 1]
    )
    assert np.hypot(*(v - [0.811, 0.137]).T).min() < 1e-12


def test_without_the_patch_the_same_nodes(tmp_path, monkeypatch):
    """When triangle would split a patch edge, every seed goes into one triangulation: the
    mesh then has the same lattice nodes, and, the lattice's triangles being Delaunay,
    the same equilateral triangles (geometric identity), and the same heat flow to
    round-off where the band's triangles agree (here they do: a square)."""
    import fvheat.mesh.triangles as triangles
    from fvheat.simulate import simulate

    case = load(tmp_path, SQUARE)
    joined = build_mesh(case)
    monkeypatch.setattr(triangles, "_seeded", lambda *a: None)
    single = build_mesh(case)
    assert single.n_cells == joined.n_cells
    # numbered by position; a node triangle places in the band may differ by round-off
    np.testing.assert_allclose(single.centres, joined.centres, rtol=0.0, atol=1e-15)
    assert joined.triangles is not None and single.triangles is not None
    key = [np.unique(np.sort(m.triangles, axis=1), axis=0) for m in (joined, single)]
    np.testing.assert_array_equal(key[0], key[1])
    flows = [simulate(case, mesh=m).surfaces["a"].heat_flow for m in (joined, single)]
    assert flows[0] == pytest.approx(flows[1], rel=1e-9)
