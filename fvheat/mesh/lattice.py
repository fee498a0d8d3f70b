"""Seed points of a triangle mesh: a hexagonal lattice wherever the size function allows
edges of the lattice's spacing.

Delaunay refinement alone (``triangle`` inserting Steiner points until every triangle meets
the area bound) leaves irregular triangles of about half the bound's area, with nodes of
five to eight neighbours. Seeded with the nodes of a hexagonal lattice away from every
constraint, the triangulation is equilateral there and the refinement works only along
outlines and near corners. Measured on the benchmark section (``scripts/bench.py
--triangles 200000``, same node count): triangulation 0.5 → 0.12 s, and Ruge–Stüben
AMG-CG needs 18 iterations instead of 33 on the regular P1 matrix (its off-diagonals are
equal and negative away from the outlines: nearly an M-matrix, like the grid's).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
from scipy.spatial import cKDTree

from fvheat.mesh.triangle_sizes import NearPoints

#: lattice spacing as a fraction of the largest edge. Delaunay refinement to the area of
#: an equilateral triangle of edge h made about 1.8 nodes per h² (measured on the
#: benchmark section); a hexagonal lattice of spacing s has 2/(√3·s²) nodes per area, the
#: same count at s = 0.8·h. Every lattice edge is then below the largest edge, as
#: ``max_cell`` asks, and the node count (and the cost) is what it was.
SPACING = 0.8
#: lattice points closer than this many spacings to a constraint (outline, boundary
#: segment, cut, probe) are left out; triangle then fills the band along it
CLEARANCE = 0.5
#: no lattice when the graph's box is more than this many times the body's area
BOX_RATIO = 8.0


def hex_lattice(lo: np.ndarray, hi: np.ndarray, spacing: float) -> np.ndarray:
    """Nodes (n, 2) m of a hexagonal lattice of ``spacing`` (m) covering the box ``lo``–``hi``
    (rows along x, every other row shifted by half a spacing)."""
    dy = spacing * np.sqrt(3.0) / 2.0
    ys = lo[1] + dy * np.arange(int(np.ceil((hi[1] - lo[1]) / dy)) + 1)
    xs = lo[0] + spacing * np.arange(int(np.ceil((hi[0] - lo[0]) / spacing)) + 1)
    x = xs[None, :] + (np.arange(len(ys)) % 2)[:, None] * (0.5 * spacing)
    y = np.broadcast_to(ys[:, None], x.shape)
    return np.column_stack([x.ravel(), y.ravel()])


def seed_points(
    vertices: np.ndarray,
    segments: np.ndarray,
    spacing: float,
    inside: Callable[[np.ndarray], np.ndarray],
    size: Callable[[np.ndarray], np.ndarray],
    body: float,
    others: np.ndarray | None = None,
) -> np.ndarray:
    """Lattice nodes (n, 2) m of ``spacing`` (m) to add to the graph ``vertices`` (m),
    ``segments`` (index pairs): those that ``inside`` accepts (on the meshed body), at least
    :data:`CLEARANCE` spacings from every segment and vertex (and point of ``others``,
    (k, 2) m, nodes placed otherwise), and where the size function
    ``size`` (m) is at its largest (``spacing`` / :data:`SPACING`): nearer a corner,
    refinement grades the mesh. None when the lattice over the graph's box would have more
    than :data:`BOX_RATIO` times the nodes of one over the ``body``'s area (m², a thin
    sloped part in a large box): triangle then refines without seeds."""
    if len(vertices) == 0 or spacing <= 0.0:
        return np.zeros((0, 2))
    lo, hi = vertices.min(axis=0), vertices.max(axis=0)
    if float(np.prod(hi - lo + spacing)) > BOX_RATIO * body:
        return np.zeros((0, 2))
    pts = hex_lattice(lo, hi, spacing)
    keep = np.asarray(size(pts)) >= spacing / SPACING * (1.0 - 1e-9)
    pts = pts[keep]
    pts = pts[inside(pts)]
    if len(pts) == 0:
        return pts
    # the constraints as points at most half a gap apart: a lattice point within a gap
    # of a sample lies within a gap of the constraint, and one within 0.96 gap of a
    # segment lies within a gap of a sample (a k-d tree query, O(n log m))
    gap = CLEARANCE * spacing
    samples = [vertices] if others is None else [vertices, others]
    if len(segments):
        a, b = vertices[segments[:, 0]], vertices[segments[:, 1]]
        count = np.ceil(np.hypot(*(b - a).T) / (0.5 * gap)).astype(np.int64) + 1
        seg = np.repeat(np.arange(len(segments)), count)
        first = np.cumsum(count) - count
        u = (np.arange(int(count.sum())) - first[seg]) / (count[seg] - 1)
        samples.append(a[seg] + u[:, None] * (b - a)[seg])
    every = np.concatenate(samples)
    # most lattice points are far from every constraint: a raster leaves them out first
    near = np.flatnonzero(NearPoints(every, gap)(pts))
    d, _ = cKDTree(every).query(pts[near], distance_upper_bound=gap)
    return np.delete(pts, near[np.isfinite(d)], axis=0)
