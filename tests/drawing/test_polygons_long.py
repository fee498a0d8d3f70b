"""Simple-polygon checks of long outlines: the R-tree path used above 64 vertices finds the
same first meeting pair of edges as testing every pair (brute force, the definition), on
random star-shaped rings with and without spikes; and a 20 000-vertex circle is simple."""

from __future__ import annotations

import numpy as np

from fvheat.drawing import polygons


def brute_force(p: np.ndarray, scale: float):
    n = len(p)
    i, j = polygons._pairs(n, 0, n)
    found = np.flatnonzero(polygons._edges_meet(p, i, j, scale))
    return (int(i[found[0]]), int(j[found[0]])) if found.size else None


def test_long_rings_agree_with_all_pairs():
    rng = np.random.default_rng(20261202)
    crossing = 0
    for _ in range(200):
        n = int(rng.integers(65, 240))
        t = np.sort(rng.uniform(0.0, 2 * np.pi, n))
        r = 1.0 + 0.3 * rng.uniform(-1, 1, n) * (rng.uniform() < 0.5)
        p = np.column_stack([r * np.cos(t), r * np.sin(t)])
        if rng.uniform() < 0.4:  # a spike across the ring
            p[rng.integers(n)] = rng.uniform(-2, 2, 2)
        got = polygons.crossing_edges(p, 4.0)
        assert got == brute_force(p, 4.0)
        crossing += got is not None
    assert 20 < crossing < 180  # both kinds were tested


def test_many_vertex_circle_is_simple():
    t = np.linspace(0.0, 2 * np.pi, 20_000, endpoint=False)
    assert polygons.crossing_edges(np.column_stack([np.cos(t), np.sin(t)]), 2.0) is None
