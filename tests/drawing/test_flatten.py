"""Arcs and bulges as chords, checked against circle geometry in closed form."""

from __future__ import annotations

import math

import numpy as np
import pytest

from fvheat.drawing.flatten import MIN_CHORDS_PER_TURN, arc_chords, arc_points, bulge_points

SAGITTA = 0.1


def circle_of_bulge(p0, p1, bulge):
    """Centre and radius of a bulged segment: included angle θ = 4·atan(bulge), radius
    r = c / (2 sin(θ/2)) for the chord c, centre on the chord's perpendicular bisector at
    r·cos(θ/2) (DXF polyline bulge definition, from memory; plane geometry)."""
    p0, p1 = np.asarray(p0, float), np.asarray(p1, float)
    c = float(np.hypot(*(p1 - p0)))
    theta = 4.0 * math.atan(bulge)
    r = c / (2.0 * abs(math.sin(theta / 2.0)))
    normal = np.array([-(p1 - p0)[1], (p1 - p0)[0]]) / c  # left of p0 -> p1
    centre = 0.5 * (p0 + p1) + normal * r * math.cos(theta / 2.0) * math.copysign(1, theta)
    return centre, r, theta


@pytest.mark.parametrize("bulge", [0.1, 0.4142135623730951, 1.0, -0.7, 3.0, -2.0])
def test_bulge_vertices_on_the_circle_within_the_sagitta(bulge):
    p0, p1 = (10.0, 20.0), (130.0, 70.0)
    pts = bulge_points(np.array(p0), np.array(p1), bulge, SAGITTA)
    centre, r, theta = circle_of_bulge(p0, p1, bulge)
    # ends exactly the polyline's vertices
    assert tuple(pts[0]) == p0 and tuple(pts[-1]) == p1
    # every vertex on the circle (round-off)
    np.testing.assert_allclose(np.hypot(*(pts - centre).T), r, rtol=1e-12)
    # every chord within the sagitta of the arc: r − |chord midpoint − centre| ≤ s
    mid = 0.5 * (pts[1:] + pts[:-1])
    assert np.all(r - np.hypot(*(mid - centre).T) <= SAGITTA * (1 + 1e-9))
    # the arc turns the way the sign says: counter-clockwise for a positive bulge
    turns = np.unwrap(np.arctan2(*(pts - centre).T[::-1]))
    assert turns[-1] - turns[0] == pytest.approx(theta, rel=1e-12)
    # the sagitta of the whole arc is |bulge| times half the chord (DXF bulge definition,
    # from memory): the furthest vertex from the chord is within the flattening of it
    chord = np.array(p1) - np.array(p0)
    rel = pts - np.array(p0)
    off = np.abs(chord[0] * rel[:, 1] - chord[1] * rel[:, 0]) / np.hypot(*chord)
    whole = abs(bulge) * np.hypot(*chord) / 2.0
    assert whole - SAGITTA <= off.max() <= whole + 1e-9


def test_chord_count():
    """Chords subtend 2·acos(1 − s/r) at most (sagitta of a chord, plane geometry), and a
    full turn gets at least MIN_CHORDS_PER_TURN."""
    r = 55.0
    n = arc_chords(r, 2 * math.pi, SAGITTA)
    assert n == math.ceil(2 * math.pi / (2 * math.acos(1 - SAGITTA / r)))
    assert arc_chords(0.05, 2 * math.pi, SAGITTA) == MIN_CHORDS_PER_TURN
    pts = arc_points((0.0, 0.0), r, 0.0, 2 * math.pi, SAGITTA)
    assert len(pts) == n + 1 and np.allclose(pts[0], pts[-1])
