"""Point location on triangles (figures of triangle meshes): the lattice search and the
bucket grid give the same triangles as matplotlib's own trapezoid-map finder (an
independent implementation), and barycentric coordinates that rebuild each point."""

from __future__ import annotations

import numpy as np
import pytest
from matplotlib.tri import Triangulation
from scipy.spatial import Delaunay

from fvheat.output.triangle_locator import TriangleLocator


@pytest.fixture(scope="module")
def mesh():
    rng = np.random.default_rng(7)
    pts = np.vstack([rng.random((3000, 2)) * [2.0, 1.0], [[0, 0], [2, 0], [2, 1], [0, 1]]])
    tri = Delaunay(pts).simplices
    keep = pts[tri].mean(axis=1)[:, 0] < 1.6  # a concave-free body with part of the box empty
    return pts, tri[keep]


def _reference(pts, tri, x, y):
    """matplotlib's TrapezoidMapTriFinder (−1 outside), on the same triangles."""
    return Triangulation(pts[:, 0], pts[:, 1], tri).get_trifinder()(x, y)


def _near_an_edge(found, bary, tol=1e-9):
    """Points whose barycentric coordinates put them on an edge (ties: any side is right)."""
    return (found >= 0) & (bary.min(axis=-1) < tol)


def test_lattice_points_are_found_as_matplotlib_finds_them(mesh):
    pts, tri = mesh
    xs, ys = np.linspace(-0.05, 2.05, 311), np.linspace(-0.03, 1.03, 157)
    gx, gy = np.meshgrid(xs, ys)
    loc = TriangleLocator(pts, tri)
    found, bary = loc.locate(gx, gy)
    assert "_buckets" not in loc.__dict__  # the lattice search, no bucket grid built
    ref = _reference(pts, tri, gx, gy)
    clear = ~_near_an_edge(found, bary)
    assert np.array_equal(found[clear], ref[clear])
    assert (found >= 0).sum() > 0.5 * found.size and (found < 0).sum() > 0.1 * found.size
    inside = found >= 0  # the coordinates rebuild the point (to round-off)
    corners = pts[tri[found[inside]]]  # (k, 3, 2)
    rebuilt = np.einsum("kv,kvd->kd", bary[inside], corners)
    assert rebuilt == pytest.approx(np.column_stack([gx[inside], gy[inside]]), abs=1e-12)


def test_scattered_points_take_the_buckets_and_agree_with_the_lattice(mesh):
    """More distinct coordinates than a lattice would hold: the bucket grid answers, with
    the same triangles and coordinates as the lattice search for the same points."""
    pts, tri = mesh
    rng = np.random.default_rng(11)
    n = 40_000
    q = rng.random((n, 2)) * [2.1, 1.06] - [0.05, 0.03]
    loc = TriangleLocator(pts, tri)
    found, bary = loc.locate(q[:, 0], q[:, 1])
    assert "_buckets" in loc.__dict__
    ref = _reference(pts, tri, q[:, 0], q[:, 1])
    clear = ~_near_an_edge(found, bary)
    assert np.array_equal(found[clear], ref[clear])
    # a few of them as their own small lattice: the lattice search, same answer
    few = q[:50]
    f2, b2 = loc.locate(few[:, 0], few[:, 1])
    assert np.array_equal(f2, found[:50]) and np.array_equal(b2, bary[:50])


def test_vertices_take_the_first_triangle_listed_in_both_searches(mesh):
    """Points on vertices (on several triangles at once): the lowest-numbered triangle
    that holds them, the rule the two searches share."""
    pts, tri = mesh
    loc = TriangleLocator(pts, tri)
    owners = np.full(pts.shape[0], tri.shape[0])
    np.minimum.at(owners, tri.ravel(), np.repeat(np.arange(tri.shape[0]), 3))
    used = np.unique(tri)
    few = used[:: used.size // 60]  # 60 × 60 distinct coordinates: the lattice search
    assert np.array_equal(loc.locate(pts[few, 0], pts[few, 1])[0], owners[few])
    assert "_buckets" not in loc.__dict__
    # all of them: too many distinct coordinates for a lattice, the bucket grid
    assert np.array_equal(loc.locate(pts[used, 0], pts[used, 1])[0], owners[used])
    assert "_buckets" in loc.__dict__


def test_no_points_no_work(mesh):
    pts, tri = mesh
    found, bary = TriangleLocator(pts, tri).locate(np.empty(0), np.empty(0))
    assert found.shape == (0,) and bary.shape == (0, 3)
