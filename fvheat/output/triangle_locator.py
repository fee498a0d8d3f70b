"""Which triangle holds each of many points, for drawing.

The points of a lattice (a figure's pixels, a contour sample grid, or any point set with
few distinct coordinates) are found triangle by triangle (:meth:`TriangleLocator.
locate_lattice`): each triangle is tested against the lattice points in its bounding box,
which four searches give, so nothing is built but each triangle's barycentric frame.
Other point sets use a uniform bucket grid, built when first needed: every triangle is
listed in the buckets its bounding box touches (buckets about the size of a median
triangle, so each holds a few), and a point is tested against the triangles of its bucket
only. Both are exact, all in numpy, and give the same answer: barycentric coordinates
within :data:`EPS`, a point on a shared edge taking the first triangle listed. At a
million pixels on 400 000 triangles the lattice search is about four times faster than
building and querying the buckets.
"""

from __future__ import annotations

from functools import cached_property

import numpy as np

#: candidate (point, triangle) pairs tested at once (bounds their memory)
BATCH = 524_288
#: most buckets per triangle on average (bounds the table for very uneven meshes)
MOST_BUCKETS = 4
#: tolerance of the inside test, in barycentric units
EPS = 1e-12
#: point sets whose distinct x and y coordinates form a lattice of at most this many
#: points (or four times the set's size) are located on that lattice
LATTICE_MOST = 65_536


class TriangleLocator:
    """Point location on the triangles ``triangles`` (t, 3) of vertices ``points`` (n, 2), m."""

    def __init__(self, points: np.ndarray, triangles: np.ndarray) -> None:
        p = np.asarray(points, float)[np.asarray(triangles)]  # (t, 3, 2)
        # bounding boxes widened by the inside test's tolerance (m)
        pad = EPS * np.max(p.max(axis=1) - p.min(axis=1), axis=1, initial=0.0)[:, None]
        self.lo, self.hi = p.min(axis=1) - pad, p.max(axis=1) + pad
        d1, d2 = p[:, 1] - p[:, 0], p[:, 2] - p[:, 0]
        det = d1[:, 0] * d2[:, 1] - d1[:, 1] * d2[:, 0]
        det = np.where(det == 0.0, np.inf, det)  # a degenerate triangle holds no point
        # barycentric (l1, l2) = inv @ (q − p0)
        self.p0 = p[:, 0]
        self.inv = (
            np.stack(
                [np.column_stack([d2[:, 1], -d2[:, 0]]), np.column_stack([-d1[:, 1], d1[:, 0]])],
                axis=1,
            )
            / det[:, None, None]
        )

    def locate(self, x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """For points (``x``, ``y``) m (any shape): the triangle holding each (−1 outside)
        and its barycentric coordinates (..., 3) (0 outside)."""
        x, y = np.asarray(x, float), np.asarray(y, float)
        axes = _lattice_axes(x, y)
        if axes is not None:  # np.meshgrid(xs, ys): the lattice itself
            return self.locate_lattice(*axes)
        shape = np.broadcast(x, y).shape
        qx, qy = np.broadcast_to(x, shape).ravel(), np.broadcast_to(y, shape).ravel()
        xs, ys = np.unique(qx), np.unique(qy)
        if xs.size * ys.size <= max(LATTICE_MOST, 4 * qx.size):
            tri, bary = self.locate_lattice(xs, ys)
            row, col = np.searchsorted(ys, qy), np.searchsorted(xs, qx)
            return tri[row, col].reshape(shape), bary[row, col].reshape(*shape, 3)
        found = np.full(qx.size, -1, dtype=np.int64)
        bary = np.zeros((qx.size, 3))
        q = np.column_stack([qx, qy])
        for a in range(0, q.shape[0], BATCH // 4):
            b = a + BATCH // 4
            found[a:b], bary[a:b] = self._in_buckets(q[a:b])
        return found.reshape(shape), bary.reshape(*shape, 3)

    def locate_lattice(self, xs: np.ndarray, ys: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """For the lattice of increasing ``xs`` (cols,) × ``ys`` (rows,), m: the triangle
        holding each point, shape (rows, cols), −1 outside, and its barycentric
        coordinates (rows, cols, 3)."""
        cols = xs.size
        found = np.full(ys.size * cols, -1, dtype=np.int64)
        bary = np.zeros((ys.size * cols, 3))
        if found.size == 0:
            return found.reshape(ys.size, cols), bary.reshape(ys.size, cols, 3)
        lo, hi = self.lo, self.hi
        near = np.flatnonzero(
            (hi[:, 0] >= xs[0]) & (lo[:, 0] <= xs[-1]) & (hi[:, 1] >= ys[0]) & (lo[:, 1] <= ys[-1])
        )  # triangles whose box meets the lattice's
        i0 = np.searchsorted(xs, lo[near, 0], side="left")
        w = np.searchsorted(xs, hi[near, 0], side="right") - i0
        j0 = np.searchsorted(ys, lo[near, 1], side="left")
        count = w * (np.searchsorted(ys, hi[near, 1], side="right") - j0)
        # triangles in runs of about BATCH candidate points, the last run first: the first
        # triangle listed wins a shared point
        ends = np.searchsorted(np.cumsum(count), np.arange(BATCH, int(count.sum()), BATCH))
        bounds = np.unique(np.concatenate([[0], ends, [count.size]]))
        for a, b in zip(bounds[-2::-1], bounds[:0:-1], strict=True):
            c = count[a:b]
            at = np.repeat(np.arange(a, b), c)  # index into near
            k = np.arange(at.size) - np.repeat(np.cumsum(c) - c, c)
            col = i0[at] + k % w[at]
            row = j0[at] + k // w[at]
            q = np.column_stack([xs[col], ys[row]])
            self._test(found, bary, row * cols + col, near[at], q)
        return found.reshape(ys.size, cols), bary.reshape(ys.size, cols, 3)

    def _test(
        self, found: np.ndarray, bary: np.ndarray, pid: np.ndarray, tri: np.ndarray, q: np.ndarray
    ) -> None:
        """Test the candidate pairs (point ``pid`` at ``q`` m, triangle ``tri``) and write
        the hits into ``found`` and ``bary``, the first pair listed winning where several
        hit the same point."""
        rel = q - self.p0[tri]
        m = self.inv[tri]
        l1 = m[:, 0, 0] * rel[:, 0] + m[:, 0, 1] * rel[:, 1]
        l2 = m[:, 1, 0] * rel[:, 0] + m[:, 1, 1] * rel[:, 1]
        hit = (l1 >= -EPS) & (l2 >= -EPS) & (l1 + l2 <= 1.0 + EPS)
        first = np.flatnonzero(hit)[::-1]  # assigned last to first: the first hit stays
        found[pid[first]] = tri[first]
        bary[pid[first]] = np.column_stack([1.0 - l1[first] - l2[first], l1[first], l2[first]])

    @cached_property
    def _buckets(self) -> tuple[np.ndarray, float, tuple[int, int], np.ndarray, np.ndarray]:
        """The bucket grid: origin (m), bucket size (m), buckets in x and y, the triangles
        listed bucket by bucket and where each bucket's list starts."""
        lo, hi = self.lo, self.hi
        origin = lo.min(axis=0) if lo.size else np.zeros(2)
        span = np.maximum((hi.max(axis=0) if hi.size else origin) - origin, 1e-300)
        t = lo.shape[0]
        size = float(np.median(np.max(hi - lo, axis=1))) if t else 1.0
        h = max(size, float(np.sqrt(span[0] * span[1] / max(MOST_BUCKETS * t, 1))), 1e-300)
        nx, ny = (np.floor(span / h).astype(np.int64) + 1).tolist()
        i0 = np.clip(np.floor((lo - origin) / h).astype(np.int64), 0, [nx - 1, ny - 1])
        i1 = np.clip(np.floor((hi - origin) / h).astype(np.int64), 0, [nx - 1, ny - 1])
        w = i1 - i0 + 1
        count = w[:, 0] * w[:, 1]
        tri = np.repeat(np.arange(t), count)
        k = np.arange(tri.size) - np.repeat(np.cumsum(count) - count, count)
        bucket = (i0[tri, 1] + k // w[tri, 0]) * nx + i0[tri, 0] + k % w[tri, 0]
        order = np.argsort(bucket, kind="stable")
        start = np.searchsorted(bucket[order], np.arange(nx * ny + 1))
        return origin, h, (nx, ny), tri[order], start

    def _in_buckets(self, q: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Triangle and barycentric coordinates of the points ``q`` (k, 2) m."""
        origin, h, (nx, ny), tris, start = self._buckets
        ij = np.floor((q - origin) / h)
        ok = np.all((ij >= 0) & (ij < [nx, ny]), axis=1)
        b = np.where(ok, ij[:, 1] * nx + ij[:, 0], 0).astype(np.int64)
        s = start[b]
        c = np.where(ok, start[b + 1] - s, 0)
        pid = np.repeat(np.arange(q.shape[0]), c)
        k = np.arange(pid.size) - np.repeat(np.cumsum(c) - c, c)
        found = np.full(q.shape[0], -1, dtype=np.int64)
        bary = np.zeros((q.shape[0], 3))
        self._test(found, bary, pid, tris[s[pid] + k], q[pid])
        return found, bary


def _lattice_axes(x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray] | None:
    """(xs, ys) when the points (``x``, ``y``) are ``np.meshgrid(xs, ys)`` of increasing
    axes (a figure's pixels, a sample grid), else None."""
    if x.ndim != 2 or x.shape != y.shape or x.size == 0:
        return None
    xs, ys = x[0], y[:, 0]
    if not (np.all(np.diff(xs) > 0) and np.all(np.diff(ys) > 0)):
        return None
    same_rows = np.array_equal(x, np.broadcast_to(xs, x.shape))
    same_cols = np.array_equal(y.T, np.broadcast_to(ys, y.T.shape))
    return (xs, ys) if same_rows and same_cols else None
