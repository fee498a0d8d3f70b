"""Arcs as chords: vertices on the true circle, no chord further than a sagitta from it."""

from __future__ import annotations

import math

import numpy as np

#: fewest chords per full turn, however coarse the sagitta (a circle stays round)
MIN_CHORDS_PER_TURN = 8


def arc_chords(radius: float, sweep: float, sagitta: float) -> int:
    """Number of equal chords for an arc of ``radius`` sweeping ``sweep`` radians so that no
    chord lies further than ``sagitta`` from the arc (same length unit as ``radius``): each
    chord subtends at most 2·acos(1 − s/r), and a full turn gets at least
    :data:`MIN_CHORDS_PER_TURN` chords."""
    turn = abs(sweep) / (2.0 * math.pi)
    least = max(1, math.ceil(MIN_CHORDS_PER_TURN * turn - 1e-9))
    if not (radius > sagitta > 0.0):
        return least
    per_chord = 2.0 * math.acos(1.0 - sagitta / radius)
    return max(least, math.ceil(abs(sweep) / per_chord - 1e-9))


def arc_points(
    centre: tuple[float, float], radius: float, start: float, sweep: float, sagitta: float
) -> np.ndarray:
    """Vertices (k + 1, 2) of the arc around ``centre`` from angle ``start`` through the
    signed ``sweep`` (radians; positive counter-clockwise), both ends included."""
    n = arc_chords(radius, sweep, sagitta)
    t = start + sweep * np.arange(n + 1) / n
    return np.column_stack([centre[0] + radius * np.cos(t), centre[1] + radius * np.sin(t)])


def bulge_points(p0: np.ndarray, p1: np.ndarray, bulge: float, sagitta: float) -> np.ndarray:
    """Vertices from ``p0`` to ``p1`` (both included, exactly) of a polyline segment with the
    DXF ``bulge`` = tan(θ/4), θ the included angle (positive: counter-clockwise arc from
    ``p0`` to ``p1``); a straight segment for bulge 0."""
    p0, p1 = np.asarray(p0, float), np.asarray(p1, float)
    chord = p1 - p0
    c = float(np.hypot(*chord))
    if bulge == 0.0 or c == 0.0:
        return np.array([p0, p1])
    theta = 4.0 * math.atan(bulge)
    radius = c / (2.0 * abs(math.sin(theta / 2.0)))
    # the centre lies on the chord's perpendicular bisector, at distance r·cos(θ/2) on the
    # left of p0 → p1 for a counter-clockwise arc of less than half a turn
    mid = 0.5 * (p0 + p1)
    left = np.array([-chord[1], chord[0]]) / c
    centre = mid + left * (radius * math.cos(theta / 2.0)) * math.copysign(1.0, theta)
    start = math.atan2(p0[1] - centre[1], p0[0] - centre[0])
    pts = arc_points((float(centre[0]), float(centre[1])), radius, start, theta, sagitta)
    pts[0], pts[-1] = p0, p1
    return pts


def polyline_points(
    vertices: np.ndarray, bulges: np.ndarray, closed: bool, sagitta: float
) -> np.ndarray:
    """The flattened polyline through ``vertices`` (n, 2) whose segment from vertex i carries
    ``bulges[i]``; closed: the segment from the last vertex back to the first is included and
    the first vertex is not repeated at the end."""
    v = np.asarray(vertices, float)
    n = len(v)
    if n == 0:
        return np.zeros((0, 2))
    count = n if closed else n - 1
    parts = [v[:1]]
    for i in range(count):
        seg = bulge_points(v[i], v[(i + 1) % n], float(bulges[i]), sagitta)
        parts.append(seg[1:])
    pts = np.concatenate(parts)
    if closed and len(pts) > 1:
        pts = pts[:-1]
    return pts
