"""Which triangle holds each of many points, for drawing: a uniform bucket grid.

Every triangle is listed in the buckets its bounding box touches (buckets about the size
of a median triangle, so each holds a few); a point is tested against the triangles of
its bucket only (barycentric coordinates), all in numpy, points in batches. Exact (a
point on a shared edge takes the first triangle listed), O(triangles) to build and
O(points) to query, so a figure's million pixels cost well under a second.
"""

from __future__ import annotations

import numpy as np

#: points tested per batch (bounds the memory of the candidate pairs)
BATCH = 131_072
#: most buckets per triangle on average (bounds the table for very uneven meshes)
MOST_BUCKETS = 4
#: tolerance of the inside test, in barycentric units
EPS = 1e-12


class TriangleLocator:
    """Point location on the triangles ``triangles`` (t, 3) of vertices ``points`` (n, 2), m."""

    def __init__(self, points: np.ndarray, triangles: np.ndarray) -> None:
        p = np.asarray(points, float)[np.asarray(triangles)]  # (t, 3, 2)
        lo, hi = p.min(axis=1), p.max(axis=1)
        self.origin = lo.min(axis=0)
        span = np.maximum(hi.max(axis=0) - self.origin, 1e-300)
        t = p.shape[0]
        size = float(np.median(np.max(hi - lo, axis=1))) if t else 1.0
        h = max(size, float(np.sqrt(span[0] * span[1] / max(MOST_BUCKETS * t, 1))), 1e-300)
        self.h = h
        self.shape = (np.floor(span / h).astype(np.int64) + 1).tolist()  # buckets in x, y
        nx, ny = self.shape
        i0 = np.clip(np.floor((lo - self.origin) / h).astype(np.int64), 0, [nx - 1, ny - 1])
        i1 = np.clip(np.floor((hi - self.origin) / h).astype(np.int64), 0, [nx - 1, ny - 1])
        w = i1 - i0 + 1
        count = w[:, 0] * w[:, 1]
        tri = np.repeat(np.arange(t), count)
        k = np.arange(tri.size) - np.repeat(np.cumsum(count) - count, count)
        bucket = (i0[tri, 1] + k // w[tri, 0]) * nx + i0[tri, 0] + k % w[tri, 0]
        order = np.argsort(bucket, kind="stable")
        self.tris = tri[order]
        self.start = np.searchsorted(bucket[order], np.arange(nx * ny + 1))
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
        shape = np.broadcast(np.asarray(x), np.asarray(y)).shape
        q = np.column_stack(
            [np.broadcast_to(x, shape).ravel(), np.broadcast_to(y, shape).ravel()]
        ).astype(float)
        tri = np.full(q.shape[0], -1, dtype=np.int64)
        bary = np.zeros((q.shape[0], 3))
        for a in range(0, q.shape[0], BATCH):
            tri[a : a + BATCH], bary[a : a + BATCH] = self._batch(q[a : a + BATCH])
        return tri.reshape(shape), bary.reshape(*shape, 3)

    def _batch(self, q: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        nx, ny = self.shape
        ij = np.floor((q - self.origin) / self.h)
        ok = np.all((ij >= 0) & (ij < [nx, ny]), axis=1)
        b = np.where(ok, ij[:, 1] * nx + ij[:, 0], 0).astype(np.int64)
        s = self.start[b]
        c = np.where(ok, self.start[b + 1] - s, 0)
        pid = np.repeat(np.arange(q.shape[0]), c)
        k = np.arange(pid.size) - np.repeat(np.cumsum(c) - c, c)
        tri = self.tris[s[pid] + k]
        rel = q[pid] - self.p0[tri]
        m = self.inv[tri]
        l1 = m[:, 0, 0] * rel[:, 0] + m[:, 0, 1] * rel[:, 1]
        l2 = m[:, 1, 0] * rel[:, 0] + m[:, 1, 1] * rel[:, 1]
        hit = (l1 >= -EPS) & (l2 >= -EPS) & (l1 + l2 <= 1.0 + EPS)
        out = np.full(q.shape[0], -1, dtype=np.int64)
        bary = np.zeros((q.shape[0], 3))
        first = np.flatnonzero(hit)[::-1]  # assigned last to first: the first hit stays
        out[pid[first]] = tri[first]
        bary[pid[first]] = np.column_stack([1.0 - l1[first] - l2[first], l1[first], l2[first]])
        return out, bary
