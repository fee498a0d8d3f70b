"""The size function of a triangle mesh: target edge lengths from ``[mesh]`` (``max_cell``,
``min_cell``, ``corner_cell``, ``growth``), shrinking towards outline corners, boundary-segment
ends and (finest) re-entrant corners of surfaces tied to a temperature."""

from __future__ import annotations

import numpy as np
from scipy.spatial import cKDTree

from fvheat.case.model import Case
from fvheat.mesh.rectilinear import CORNER_TURN_DEG, on_body

#: edges at a re-entrant corner of a surface tied to a temperature are ``corner_cell``
#: divided by this. The box method reads the surface temperature at the corner node itself,
#: and the node's two half-edges exchange heat at the node value (lumped), so the corner
#: value's error falls about linearly with the corner edge (measured on
#: cases/wall_window_junction.toml, glass meets frame, against the scikit-fem reference of
#: tests/validation/test_corner_points.py: +0.064, +0.023, −0.005 K at 1, 0.5, 0.25 mm),
#: where the grid extrapolates to the corner from a face centre half a cell away.
REENTRANT_DIVISOR = 4.0


#: corner groups up to this many points are measured point by point, larger ones by a tree
FEW_CORNERS = 4


class SizeFunction:
    """Target edge length h(x) = min(max_cell, min over corners c of s_c + (g − 1)·|x − c|)
    (m), with s_c the corner's first size and g the growth ratio."""

    def __init__(self, largest: float, groups: list[tuple[np.ndarray, float]], growth: float):
        self.largest = largest
        self.growth = growth
        # a group whose size is not below the largest cannot lower h anywhere
        self.groups = [(np.asarray(p, float), s) for p, s in groups if len(p) and s < largest]
        self.trees = [cKDTree(p) if len(p) > FEW_CORNERS else None for p, _ in self.groups]
        slope = growth - 1.0
        # beyond (largest − s)/slope of every corner a group cannot lower h
        self.reach = [(largest - s) / slope if slope > 0.0 else np.inf for _, s in self.groups]
        self.near = [
            NearPoints(p, r) if np.isfinite(r) else None
            for (p, _), r in zip(self.groups, self.reach, strict=True)
        ]

    @property
    def graded(self) -> bool:
        """Whether any corner asks for edges shorter than the largest."""
        return bool(self.groups)

    def __call__(self, x: np.ndarray) -> np.ndarray:
        """h (m) at the points ``x`` (n, 2) m."""
        h = np.full(len(x), self.largest)
        slope = self.growth - 1.0
        for k, (p, s) in enumerate(self.groups):
            tree, reach, near = self.trees[k], self.reach[k], self.near[k]
            # most points of a large mesh lie beyond the reach of every corner: a raster
            # lookup leaves them out before any distance is measured
            idx = np.flatnonzero(near(x)) if near is not None else np.arange(len(x))
            if idx.size == 0:
                continue
            xi = x[idx]
            if tree is not None:
                d, _ = tree.query(xi, distance_upper_bound=reach * (1.0 + 1e-9))
            else:  # a few corners: all distances, vectorised, cheaper than the tree
                d = np.full(len(xi), np.inf)
                for c in p:
                    d = np.minimum(d, np.hypot(xi[:, 0] - c[0], xi[:, 1] - c[1]))
            h[idx] = np.minimum(h[idx], s + slope * d)
        return h


class NearPoints:
    """Which points may lie within ``reach`` (m) of some of the ``corners`` (k, 2) m: a
    raster of square cells no smaller than ``reach`` marks each corner's cell and its eight
    neighbours (a point within ``reach`` of a corner lies in one of them). O(points)."""

    def __init__(self, corners: np.ndarray, reach: float, cells: int = 512):
        self.lo = corners.min(axis=0) - reach
        span = float(np.max(corners.max(axis=0) + reach - self.lo))
        self.cell = max(reach, span / cells)
        self.shape = (int(span / self.cell) + 2, int(span / self.cell) + 2)
        self.marked = np.zeros(self.shape, dtype=bool)
        ij = np.floor((corners - self.lo) / self.cell).astype(np.int64)
        for di in (-1, 0, 1):
            for dj in (-1, 0, 1):
                i = np.clip(ij[:, 0] + di, 0, self.shape[0] - 1)
                j = np.clip(ij[:, 1] + dj, 0, self.shape[1] - 1)
                self.marked[i, j] = True

    def __call__(self, x: np.ndarray) -> np.ndarray:
        """Whether each point (n, 2) m may lie within reach (False: it certainly does not)."""
        ij = np.floor((x - self.lo) / self.cell)
        ok = (ij[:, 0] >= 0) & (ij[:, 0] < self.shape[0]) & (ij[:, 1] >= 0)
        ok &= ij[:, 1] < self.shape[1]
        out = np.zeros(len(x), dtype=bool)
        i = ij[ok].astype(np.int64)
        out[ok] = self.marked[i[:, 0], i[:, 1]]
        return out


def size_function(case: Case, refine: float = 1.0) -> SizeFunction:
    """The size function of the case's ``[mesh]`` settings (see :class:`SizeFunction`)."""
    s = case.mesh
    corners, tied = corner_points(case)
    sharp = tied & reentrant(case, corners)
    groups = [
        (corners[~tied], s.min_cell / refine),
        (corners[tied & ~sharp], s.corner_size / refine),
        (corners[sharp], s.corner_size / REENTRANT_DIVISOR / refine),
    ]
    return SizeFunction(s.max_cell / refine, groups, s.growth ** (1.0 / refine))


def corner_points(case: Case) -> tuple[np.ndarray, np.ndarray]:
    """Corner points (k, 2) m: outline vertices turning by more than
    :data:`~fvheat.mesh.rectilinear.CORNER_TURN_DEG` and boundary-segment ends on the body;
    and whether each lies on a boundary tying the surface to a temperature."""
    pts = []
    for ring in outline_rings(case):
        e_in = ring - np.roll(ring, 1, axis=0)
        e_out = np.roll(ring, -1, axis=0) - ring
        cos = np.einsum("ij,ij->i", e_in, e_out) / np.maximum(
            np.hypot(*e_in.T) * np.hypot(*e_out.T), 1e-300
        )
        pts.append(ring[cos < np.cos(np.radians(CORNER_TURN_DEG))])
    ends = np.array([p for b in case.boundaries for e in b.edges for p in e], float).reshape(-1, 2)
    if len(ends):
        pts.append(ends[on_body(case, ends)])
    corners = np.unique(np.concatenate(pts), axis=0) if pts else np.zeros((0, 2))
    segs = [e for b in case.boundaries if b.ties_temperature for e in b.edges]
    tied = np.zeros(len(corners), dtype=bool)
    scale = case_scale(case)
    for p0, p1 in segs:
        tied |= _distance_to_segment(corners, np.asarray(p0), np.asarray(p1)) <= 1e-9 * scale
    return corners, tied


#: directions sampled around a corner point to tell whether it is re-entrant
_AROUND = 64


def reentrant(case: Case, points: np.ndarray) -> np.ndarray:
    """Whether the body covers more than half of a small circle around each point (n, 2) m
    (a re-entrant corner: the inside surface is coldest there). Vectorised over points and
    directions."""
    if len(points) == 0:
        return np.zeros(0, dtype=bool)
    angle = (np.arange(_AROUND) + 0.5) * (2.0 * np.pi / _AROUND)
    step = 1e-6 * case_scale(case) * np.column_stack([np.cos(angle), np.sin(angle)])
    around = (points[:, None, :] + step[None, :, :]).reshape(-1, 2)
    covered = on_body(case, around).reshape(len(points), _AROUND).mean(axis=1)
    return covered > 0.5 + 1.0 / _AROUND


def outline_rings(case: Case) -> list[np.ndarray]:
    """Every region outline and hole of the case, (k, 2) arrays of vertices (m)."""
    return [r.vertices for r in case.regions] + [h for r in case.regions for h in r.holes]


def case_scale(case: Case) -> float:
    """The larger side (m) of the box around every outline, at least 1 (the scale of the
    geometric tolerances)."""
    allpts = np.concatenate(outline_rings(case))
    return max(float(np.max(np.ptp(allpts, axis=0))), 1.0)


def _distance_to_segment(p: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    d = b - a
    u = np.clip(((p - a) @ d) / max(float(d @ d), 1e-300), 0.0, 1.0)
    return np.hypot(*(p - a - u[:, None] * d).T)
