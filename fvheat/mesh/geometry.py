"""Vectorised planar geometry helpers (coordinates in m)."""

from __future__ import annotations

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
