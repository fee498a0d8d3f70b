"""Re-entrant corners on the triangle mesh: which corners count, and the finer edges there.

Sources: exact geometry (the angle the body covers around a drawn corner point); the sizes
are those the module states (``corner_cell`` / ``REENTRANT_DIVISOR`` at re-entrant corners
of surfaces tied to a temperature). Why the finer edges matter is checked against an
independent FEM solve in ``tests/validation/test_corner_points.py``.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from fvheat.case.load import load_case
from fvheat.mesh.triangle_sizes import REENTRANT_DIVISOR, reentrant
from fvheat.mesh.triangles import build_triangle_mesh

WINDOW = Path(__file__).resolve().parents[2] / "cases" / "wall_window_junction.toml"


def test_reentrant_corners_by_the_angle_the_body_covers():
    """Glass meeting the frame (270° of body) is re-entrant; the frame's room-side corner
    (90°), a point inside the body (360° but no corner: still > 180°, so counted) and a
    point on a straight edge (180°) are told apart as stated."""
    case = load_case(WINDOW, ["mesh.kind=triangles"])
    pts = np.array([[0.12, 0.143], [0.12, 0.12], [0.5, 0.143], [-0.5, 0.0], [0.015, 0.12]])
    assert reentrant(case, pts).tolist() == [True, False, False, False, True]


def test_edges_at_a_reentrant_corner_are_the_finer_size():
    """The edges at the glass/frame corner node average at most 1.3 × corner_cell / divisor
    and none is over twice that (the refinement accepts 1.3 × the target area, and a
    triangle that is not equilateral has longer edges for its area); without the finer
    size they were about 1 mm, four times the target."""
    case = load_case(WINDOW, ["mesh.kind=triangles"])
    mesh = build_triangle_mesh(case)
    v, t = mesh.centres, mesh.triangles
    assert t is not None
    corner = int(np.argmin(np.hypot(*(v - (0.12, 0.143)).T)))
    assert np.allclose(v[corner], (0.12, 0.143))
    around = np.unique(t[(t == corner).any(axis=1)])
    edges = np.hypot(*(v[around[around != corner]] - v[corner]).T)
    target = case.mesh.corner_size / REENTRANT_DIVISOR
    assert edges.mean() <= 1.3 * target
    assert edges.max() <= 2.0 * target
