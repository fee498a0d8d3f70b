"""Seed lattice and size function of the triangle mesher.

Sources: geometric identities (a hexagonal lattice's neighbours are all one spacing apart,
so its Delaunay triangles are equilateral; the size function is defined as a minimum of
cones, computed here point by point); the P1 matrix of equilateral triangles has equal,
negative off-diagonal entries (½·cot 60° per triangle, an M-matrix), common FEM practice.
"""

from __future__ import annotations

import numpy as np
from casefiles import load

from fvheat.assembly.system import System
from fvheat.mesh.lattice import SPACING, hex_lattice, seed_points
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
    pts = hex_lattice(np.array([0.0, 0.0]), np.array([1.0, 1.0]), 0.1)
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
    pts = seed_points(
        v,
        seg,
        0.001,
        lambda p: np.ones(len(p), bool),
        lambda p: np.full(len(p), 0.001 / SPACING),
        body,
    )
    assert len(pts) == 0
    square = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]])
    seg = np.column_stack([np.arange(4), (np.arange(4) + 1) % 4])
    inside = lambda p: np.all((p >= 0.0) & (p <= 1.0), axis=1)  # noqa: E731
    pts = seed_points(square, seg, 0.1, inside, lambda p: np.full(len(p), 0.125), 1.0)
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
