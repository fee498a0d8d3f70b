"""Node numbering along a Z-order curve (``fvheat/mesh/ordering.py``).

Sources: exact properties of a sort (a permutation; sorting sorted points changes nothing)
and of the Z-order curve (the four quadrants of the bounding square come one after the
other: lower left, lower right, upper left, upper right).
"""

from __future__ import annotations

import numpy as np

from fvheat.mesh.ordering import spatial_order


def test_is_a_permutation_and_idempotent():
    pts = np.random.default_rng(3).random((5000, 2)) * [2.0, 0.5] - 1.0
    order = spatial_order(pts)
    assert np.array_equal(np.sort(order), np.arange(len(pts)))
    again = spatial_order(pts[order])
    assert np.array_equal(again, np.arange(len(pts)))


def test_quadrants_come_in_z_order():
    pts = np.random.default_rng(4).random((4000, 2))
    # the bounding square is exactly [0, 1]²; keep clear of the lattice's halfway line
    pts = pts[(np.abs(pts - 0.5) > 0.01).all(axis=1)]
    pts = np.vstack([[0.0, 0.0], [1.0, 1.0], pts])
    q = (pts[:, 0] >= 0.5).astype(int) + 2 * (pts[:, 1] >= 0.5).astype(int)
    assert np.all(np.diff(q[spatial_order(pts)]) >= 0)


def test_empty_and_single_point():
    assert spatial_order(np.zeros((0, 2))).size == 0
    assert spatial_order(np.array([[1.0, 2.0]])).tolist() == [0]
