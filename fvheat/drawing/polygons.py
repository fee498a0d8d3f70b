"""Planar polygon checks shared by typed polygons and drawn outlines (any length unit)."""

from __future__ import annotations

import numpy as np


def signed_area(p: np.ndarray) -> float:
    """Area of the closed ring ``p`` (n, 2) by the shoelace formula; positive when
    counter-clockwise."""
    x, y = p[:, 0], p[:, 1]
    return 0.5 * float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))


def crossing_edges(p: np.ndarray, scale: float) -> tuple[int, int] | None:
    """The first pair of edges (i, j), i < j, of the closed ring ``p`` that cross, touch or
    overlap other than at the vertex two neighbouring edges share; None for a simple ring.
    Edge i runs from vertex i to vertex i + 1; ``scale`` is the ring's size (round-off).

    Short rings test all pairs at once; long ones only the pairs whose bounding boxes
    overlap (an R-tree), so outlines of thousands of vertices are checked in milliseconds.
    """
    n = len(p)
    if n > 64:  # only edges whose bounding boxes overlap can meet (an R-tree query)
        import shapely

        segments = shapely.linestrings(np.stack([p, np.roll(p, -1, axis=0)], axis=1))
        assert isinstance(segments, np.ndarray)
        a, b = shapely.STRtree(segments).query(segments)
        keep = a < b
        order = np.lexsort((b[keep], a[keep]))
        i, j = a[keep][order], b[keep][order]
        found = np.flatnonzero(_edges_meet(p, i, j, scale))
        return (int(i[found[0]]), int(j[found[0]])) if found.size else None
    rows = max(1, 2_000_000 // n)
    for first_row in range(0, n, rows):
        i, j = _pairs(n, first_row, rows)
        hit = _edges_meet(p, i, j, scale)
        found = np.flatnonzero(hit)
        if found.size:
            return int(i[found[0]]), int(j[found[0]])
    return None


def meeting_point(p: np.ndarray, i: int, j: int) -> tuple[float, float]:
    """A point edges i and j of the ring ``p`` have in common (as found by
    :func:`crossing_edges`): their crossing, or an end of one lying on the other."""
    n = len(p)
    a0, a1, b0, b1 = p[i], p[(i + 1) % n], p[j], p[(j + 1) % n]
    da, db = a1 - a0, b1 - b0
    den = da[0] * db[1] - da[1] * db[0]
    if den != 0.0:
        t = ((b0[0] - a0[0]) * db[1] - (b0[1] - a0[1]) * db[0]) / den
        if 0.0 <= t <= 1.0:
            q = a0 + t * da
            return float(q[0]), float(q[1])
    # parallel (overlapping) or touching: the end of one edge nearest the other edge
    best, where = np.inf, a0
    for q, s0, d in ((a0, b0, db), (a1, b0, db), (b0, a0, da), (b1, a0, da)):
        u = np.clip(np.dot(q - s0, d) / max(np.dot(d, d), 1e-300), 0.0, 1.0)
        gap = float(np.hypot(*(q - (s0 + u * d))))
        if gap < best:
            best, where = gap, q
    return float(where[0]), float(where[1])


def _pairs(n: int, first_row: int, rows: int) -> tuple[np.ndarray, np.ndarray]:
    """Index pairs (i, j), i < j < n, for i in first_row ... first_row + rows - 1."""
    i, j = np.meshgrid(np.arange(first_row, min(n, first_row + rows)), np.arange(n), indexing="ij")
    keep = j > i
    return i[keep], j[keep]


def _edges_meet(p: np.ndarray, i: np.ndarray, j: np.ndarray, scale: float) -> np.ndarray:
    """Whether edge i and edge j (i < j) of the ring ``p`` have a point in common beyond the
    vertex shared by neighbouring edges."""
    n = len(p)
    b = np.roll(p, -1, axis=0)
    ai, bi, aj, bj = p[i], b[i], p[j], b[j]

    def side(q: np.ndarray, r: np.ndarray, s: np.ndarray) -> np.ndarray:
        """Sign of the turn q -> r -> s, 0 when collinear to within round-off."""
        rq, sq = r - q, s - q
        cross = rq[:, 0] * sq[:, 1] - rq[:, 1] * sq[:, 0]
        return np.where(np.abs(cross) <= 1e-12 * scale**2, 0.0, np.sign(cross))

    def on(q: np.ndarray, r: np.ndarray, s: np.ndarray, turn: np.ndarray) -> np.ndarray:
        """Whether s lies on segment q-r (given its turn sign)."""
        tol = 1e-12 * scale
        inside = (s >= np.minimum(q, r) - tol) & (s <= np.maximum(q, r) + tol)
        return (turn == 0) & inside.all(axis=1)

    s1, s2, s3, s4 = side(ai, bi, aj), side(ai, bi, bj), side(aj, bj, ai), side(aj, bj, bi)
    proper = (s1 * s2 < 0) & (s3 * s4 < 0)
    follows = j == i + 1  # edge j starts where edge i ends: aj is bi
    wraps = (i == 0) & (j == n - 1)  # edge i starts where edge j ends: ai is bj
    return (
        proper
        | (on(ai, bi, aj, s1) & ~follows)
        | (on(aj, bj, bi, s4) & ~follows)
        | (on(ai, bi, bj, s2) & ~wraps)
        | (on(aj, bj, ai, s3) & ~wraps)
    )
