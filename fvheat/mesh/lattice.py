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

The lattice's own triangles are that triangulation wherever no constraint touches them, so
:func:`lattice_seeds` also hands them over (the *patch*, found by index arithmetic on the
lattice rows) and ``triangle`` meshes only the band between the constraints and the patch
(:func:`fvheat.mesh.triangles._seeded`): at 200 000 nodes the final triangulation took
0.007 s instead of 0.17 s.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

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


def lattice_grid(lo: np.ndarray, hi: np.ndarray, spacing: float) -> tuple[np.ndarray, int, int]:
    """Nodes (rows·cols, 2) m of a hexagonal lattice of ``spacing`` (m) covering the box
    ``lo``–``hi`` (rows along x, every other row shifted by half a spacing; node i of row j
    at index j·cols + i), and the numbers of rows and columns."""
    dy = spacing * np.sqrt(3.0) / 2.0
    ys = lo[1] + dy * np.arange(int(np.ceil((hi[1] - lo[1]) / dy)) + 1)
    xs = lo[0] + spacing * np.arange(int(np.ceil((hi[0] - lo[0]) / spacing)) + 1)
    x = xs[None, :] + (np.arange(len(ys)) % 2)[:, None] * (0.5 * spacing)
    y = np.broadcast_to(ys[:, None], x.shape)
    return np.column_stack([x.ravel(), y.ravel()]), len(ys), len(xs)


def lattice_seeds(
    vertices: np.ndarray,
    segments: np.ndarray,
    spacing: float,
    paint: Callable[[np.ndarray], np.ndarray],
    size: Callable[[np.ndarray], np.ndarray],
    body: float,
    others: np.ndarray | None = None,
) -> Seeds:
    """Lattice nodes of ``spacing`` (m) to add to the graph ``vertices`` (m), ``segments``
    (index pairs): those on the meshed body (``paint``: the region index of each point,
    −1 outside it), at least
    :data:`CLEARANCE` spacings from every segment and vertex (and point of ``others``,
    (k, 2) m, nodes placed otherwise), and where the size function ``size`` (m) is at its
    largest (``spacing`` / :data:`SPACING`): nearer a corner, refinement grades the mesh.
    None when the lattice over the graph's box would have more than :data:`BOX_RATIO`
    times the nodes of one over the ``body``'s area (m², a thin sloped part in a large
    box): triangle then refines without seeds. With them, the patch of lattice triangles
    clear of every constraint (:class:`Seeds`)."""
    if len(vertices) == 0 or spacing <= 0.0:
        return Seeds.empty()
    lo, hi = vertices.min(axis=0), vertices.max(axis=0)
    if float(np.prod(hi - lo + spacing)) > BOX_RATIO * body:
        return Seeds.empty()
    pts, rows, cols = lattice_grid(lo, hi, spacing)
    idx = np.flatnonzero(np.asarray(size(pts)) >= spacing / SPACING * (1.0 - 1e-9))
    region = np.asarray(paint(pts[idx]))
    idx = idx[region >= 0]
    if len(idx) == 0:
        return Seeds.empty()
    label = np.full(rows * cols, -1, dtype=np.int64)
    label[idx] = region[region >= 0]
    # the constraints as points at most half a gap apart: a lattice point within a gap
    # of a sample lies within a gap of the constraint, and one within 0.96 gap of a
    # segment lies within a gap of a sample (a k-d tree query, O(n log m))
    gap = CLEARANCE * spacing
    isolated = vertices if others is None else np.vstack([vertices, others])
    samples = [isolated]
    if len(segments):
        a, b = vertices[segments[:, 0]], vertices[segments[:, 1]]
        count = np.ceil(np.hypot(*(b - a).T) / (0.5 * gap)).astype(np.int64) + 1
        seg = np.repeat(np.arange(len(segments)), count)
        first = np.cumsum(count) - count
        u = (np.arange(int(count.sum())) - first[seg]) / (count[seg] - 1)
        samples.append(a[seg] + u[:, None] * (b - a)[seg])
    every = np.concatenate(samples)
    # a point inside a lattice triangle lies within spacing/√3 of one of its corners, a
    # segment crossing it within 0.44 spacing (< 0.96 gap): the triangles of nodes farther
    # than ``reach`` from every vertex and point hold no constraint
    reach = POINT_CLEARANCE * spacing
    # most lattice points are far from every constraint: a raster leaves them out first
    near = idx[NearPoints(every, max(gap, reach))(pts[idx])]
    d, _ = cKDTree(every).query(pts[near], distance_upper_bound=gap)
    clear = np.zeros(rows * cols, dtype=bool)
    clear[idx] = True
    clear[near[np.isfinite(d)]] = False
    idx = idx[clear[idx]]
    if len(idx) == 0:
        return Seeds.empty()
    near = near[~np.isfinite(d)]
    d, _ = cKDTree(isolated).query(pts[near], distance_upper_bound=reach)
    clear[near[np.isfinite(d)]] = False
    return _patch(pts, rows, cols, idx, clear, label)


#: nodes of patch triangles lie farther than this many spacings from every isolated
#: point of the graph (above 1/√3, the distance from an equilateral triangle's centre to
#: its corners)
POINT_CLEARANCE = 0.6


@dataclass(frozen=True)
class Seeds:
    """The lattice nodes a triangle mesh is seeded with, and the patch of lattice
    triangles clear of every constraint, which can be taken as they are (their Delaunay
    triangulation is the lattice's own)."""

    #: (n, 2) m, every node
    points: np.ndarray
    #: (k, 3) node indices, counter-clockwise: the patch
    triangles: np.ndarray
    #: (n,) whether all six triangles around the node are in the patch
    inner: np.ndarray
    #: (e, 2) node indices: the patch's boundary edges, the patch on their left
    edges: np.ndarray
    #: (h, 2) m: the centroids of the patch triangles on its boundary
    holes: np.ndarray
    #: (k,) the region of each patch triangle (by ``paint``: no outline crosses it)
    region: np.ndarray

    @staticmethod
    def empty() -> Seeds:
        """No seeds."""
        none = np.zeros((0, 2))
        index = np.zeros((0, 3), dtype=np.int64)
        return Seeds(
            none, index, np.zeros(0, dtype=bool), index[:, :2], none, np.zeros(0, np.int64)
        )


def _patch(
    pts: np.ndarray, rows: int, cols: int, idx: np.ndarray, clear: np.ndarray, label: np.ndarray
) -> Seeds:
    """The :class:`Seeds` of the lattice ``pts`` (``rows`` × ``cols``, region ``label`` per
    node) keeping the nodes ``idx``: the patch is every lattice triangle of three
    ``clear`` nodes. O(nodes)."""
    base = (np.arange(rows - 1)[:, None] * cols + np.arange(cols - 1)[None, :]).ravel()
    even = (base // cols) % 2 == 0
    a, b, c, d = base, base + 1, base + cols, base + cols + 1
    # between an even row and the shifted odd row above it: (a, b, c) and (b, d, c); between
    # an odd row and the even row above: (a, b, d) and (a, d, c); all counter-clockwise
    third, other = np.where(even, c, d), np.where(even, b, a)
    one = clear[a] & clear[b] & clear[third]
    two = clear[other] & clear[d] & clear[c]
    first = np.column_stack([a[one], b[one], third[one]])
    tri = np.concatenate([first, np.column_stack([other[two], d[two], c[two]])])
    rank = np.full(rows * cols, -1, dtype=np.int64)
    rank[idx] = np.arange(len(idx))
    count = np.bincount(tri.ravel(), minlength=rows * cols)
    inner = count[idx] == 6
    # boundary edges: among the triangles touching a node outside the patch's inside, the
    # edges whose mirror triangle (apex reflected through the edge: a + b − c, a lattice
    # node) has a node out of the lattice or not clear
    low = count < 6
    cand = tri[low[tri[:, 0]] | low[tri[:, 1]] | low[tri[:, 2]]]
    j, i = np.divmod(cand, cols)
    q = i - (j >> 1)  # axial coordinates: position linear in (q, j)
    edges, holes = [], []
    for e in range(3):
        p, r = (e + 1) % 3, (e + 2) % 3
        jm = j[:, p] + j[:, r] - j[:, e]
        im = q[:, p] + q[:, r] - q[:, e] + (jm >> 1)
        ok = (jm >= 0) & (jm < rows) & (im >= 0) & (im < cols)
        ok[ok] = clear[jm[ok] * cols + im[ok]]
        edges.append(cand[~ok][:, [p, r]])
        holes.append(np.flatnonzero(~ok))
    at = np.unique(np.concatenate(holes))
    hole = (pts[cand[at, 0]] + pts[cand[at, 1]] + pts[cand[at, 2]]) / 3.0
    return Seeds(pts[idx], rank[tri], inner, rank[np.concatenate(edges)], hole, label[tri[:, 0]])
