"""Vectorised planar geometry helpers (coordinates in m)."""

from __future__ import annotations

import itertools
from collections.abc import Sequence

import numpy as np


def points_in_polygon(px: np.ndarray, py: np.ndarray, vertices: np.ndarray) -> np.ndarray:
    """Even-odd test of points (``px``, ``py``, any equal shapes) against a closed polygon;
    points on an edge (within 1e-12 of the polygon's size) count as inside, whatever the
    edge's orientation, so a mirrored polygon paints the mirrored cells.

    Vectorised over the points; loops only over the polygon's edges.
    """
    inside = np.zeros(np.broadcast(px, py).shape, dtype=bool)
    on_edge = np.zeros_like(inside)
    xv, yv = vertices[:, 0], vertices[:, 1]
    xw, yw = np.roll(xv, -1), np.roll(yv, -1)
    tol = 1e-12 * max(float(np.ptp(xv)), float(np.ptp(yv)), 1.0)
    for x0, y0, x1, y1 in zip(xv, yv, xw, yw, strict=True):
        dx, dy = x1 - x0, y1 - y0
        length2 = dx * dx + dy * dy
        u = np.clip(((px - x0) * dx + (py - y0) * dy) / length2, 0.0, 1.0)
        on_edge |= np.hypot(px - (x0 + u * dx), py - (y0 + u * dy)) <= tol
        if y0 == y1:
            continue
        crosses = (y0 > py) != (y1 > py)
        x_at = x0 + (py - y0) * dx / dy
        inside ^= crosses & (px < x_at)
    return inside | on_edge


def segment_frame(p0: np.ndarray, p1: np.ndarray) -> tuple[np.ndarray, np.ndarray, float]:
    """Unit tangent, unit normal (tangent rotated −90°) and length of segment p0 → p1."""
    d = np.asarray(p1, float) - np.asarray(p0, float)
    length = float(np.hypot(*d))
    t = d / length
    return t, np.array([t[1], -t[0]]), length


def grid_in_polygon(xc: np.ndarray, yc: np.ndarray, vertices: np.ndarray) -> np.ndarray:
    """:func:`points_in_polygon` for the points of a grid: whether each (``xc[i]``,
    ``yc[j]``) (sorted 1-D coordinates, m) lies inside the closed polygon or on its
    outline, as an array of shape (``yc.size``, ``xc.size``).

    Scan lines instead of one pass over all points per edge: every edge yields its
    crossings with the rows it spans, each crossing flips the parity of the row's points
    left of it (a difference array summed along the rows), so the work is
    O(points + crossings), not O(points × edges).
    """
    xc, yc = np.asarray(xc, float), np.asarray(yc, float)
    ny, nx = yc.size, xc.size
    v = np.asarray(vertices, float)
    x0, y0 = v[:, 0], v[:, 1]
    x1, y1 = np.roll(x0, -1), np.roll(y0, -1)
    tol = 1e-12 * max(float(np.ptp(x0)), float(np.ptp(y0)), 1.0)
    # crossings: rows j with min(y0, y1) <= yc[j] < max(y0, y1) (the even-odd rule of
    # points_in_polygon: (y0 > y) != (y1 > y)), counted for points strictly left of them
    lo, hi = np.minimum(y0, y1), np.maximum(y0, y1)
    edge, row = _edge_rows(np.searchsorted(yc, lo, "left"), np.searchsorted(yc, hi, "left"))
    x_at = x0[edge] + (yc[row] - y0[edge]) * (x1 - x0)[edge] / (y1 - y0)[edge]
    flips = np.zeros((ny, nx + 1), dtype=np.int32)
    np.add.at(flips, (row, np.zeros_like(row)), 1)
    np.add.at(flips, (row, np.searchsorted(xc, x_at, "left")), -1)
    inside = (np.cumsum(flips[:, :nx], axis=1) & 1).astype(bool)
    # points on an edge (within tol of it) count as inside, as in points_in_polygon
    edge, row = _edge_rows(
        np.searchsorted(yc, lo - tol, "left"), np.searchsorted(yc, hi + tol, "right")
    )
    dx, dy = (x1 - x0)[edge], (y1 - y0)[edge]
    flat = dy == 0.0
    t = np.where(flat, 0.0, (yc[row] - y0[edge]) / np.where(flat, 1.0, dy)).clip(0.0, 1.0)
    x_on = x0[edge] + t * dx
    # x range of the edge at this row: the whole edge when horizontal, else its crossing,
    # widened by the tolerance measured across the edge
    length = np.hypot(dx, dy)
    reach = np.where(flat, tol, tol * length / np.maximum(np.abs(dy), 1e-300))
    xmin = np.minimum(x0[edge], x1[edge]) - tol
    xmax = np.maximum(x0[edge], x1[edge]) + tol
    left = np.maximum(np.where(flat, xmin, x_on - reach), xmin)
    right = np.minimum(np.where(flat, xmax, x_on + reach), xmax)
    first = np.searchsorted(xc, left, "left")
    last = np.searchsorted(xc, right, "right")
    edge_row, cols = _edge_rows(first, last)
    on_edge = np.zeros((ny, nx), dtype=bool)
    on_edge[row[edge_row], cols] = True
    return inside | on_edge


def _edge_rows(start: np.ndarray, stop: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Pairs (k, j) for every k and every j in ``start[k] <= j < stop[k]``, flattened."""
    count = np.maximum(stop - start, 0)
    k = np.repeat(np.arange(count.size), count)
    offsets = np.arange(k.size) - np.repeat(np.cumsum(count) - count, count)
    return k, np.repeat(start, count) + offsets


def points_on_segments(
    points: np.ndarray, segments: Sequence[Sequence[Sequence[float]]], tol: float
) -> np.ndarray:
    """Whether each point (n, 2) m lies within ``tol`` m of one of the ``segments``
    (((x0, y0), (x1, y1)) m each).

    The points are sorted by x once and each segment tests only those inside its
    bounding box, so thousands of segments against thousands of points stay cheap.
    """
    pts = np.asarray(points, float).reshape(-1, 2)
    hit = np.zeros(len(pts), dtype=bool)
    order = np.argsort(pts[:, 0], kind="stable")
    xs = pts[order, 0]
    for (x0, y0), (x1, y1) in segments:
        lo, hi = np.searchsorted(xs, [min(x0, x1) - tol, max(x0, x1) + tol])
        cand = order[lo:hi]
        cand = cand[(pts[cand, 1] >= min(y0, y1) - tol) & (pts[cand, 1] <= max(y0, y1) + tol)]
        if cand.size == 0:
            continue
        a = np.array([x0, y0], float)
        d = np.array([x1, y1], float) - a
        rel = pts[cand] - a
        dd = float(d @ d)
        u = np.clip(rel @ d / dd, 0.0, 1.0) if dd > 0 else np.zeros(cand.size)
        gap = np.hypot(*(rel - u[:, None] * d).T)
        hit[cand[gap <= tol]] = True
    return hit


def coincident_ids(keys: np.ndarray, shifted: int | None = None) -> np.ndarray:
    """One id per row of ``keys`` (n, d), the same for rows less than a quarter apart in
    every coordinate, never for rows 1 or more apart in one. Only the first ``shifted``
    columns (default all) are rounded shifted too; the others must agree once rounded
    (e.g. a face's normal, computed the same way for both rows).

    ``keys`` are coordinates already divided by their tolerance (points in units of
    1e-9 of the model's size, say). Rounding them to integers once would split a pair lying
    on either side of a half-unit by round-off (a dyadic coordinate such as
    0.0953515625 m sits exactly on one); rounding them with each coordinate shifted by 0
    or ½ (2^d roundings) puts every such pair in one cell of at least one of them, and the
    cells' members are joined. numpy and scipy.sparse only (no k-d tree: scipy.spatial
    costs a run 0.1–0.2 s of imports)."""
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    n, d = keys.shape
    if n == 0:
        return np.zeros(0, dtype=np.int64)
    rows, cols = [], []
    k = d if shifted is None else shifted
    for shift in itertools.product((0.0, 0.5), repeat=k):
        cell = np.rint(keys + np.concatenate([shift, np.zeros(d - k)]))
        order = np.lexsort(cell.T[::-1])
        ranked = cell[order]
        start = np.concatenate([[True], np.any(ranked[1:] != ranked[:-1], axis=1)])
        head = order[np.flatnonzero(start)][np.cumsum(start) - 1]  # each row's cell's first
        rows.append(order)
        cols.append(head)
    r, c = np.concatenate(rows), np.concatenate(cols)
    graph = coo_matrix((np.ones(r.size), (r, c)), shape=(n, n))
    return connected_components(graph, directed=False)[1].astype(np.int64)
