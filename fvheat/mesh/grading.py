"""One-dimensional graded grid lines through a set of fixed coordinates."""

from __future__ import annotations

import numpy as np

_SAMPLES = 200  # samples from each end of an interval for the size-function integral


def merge_close(values: np.ndarray, tol: float) -> np.ndarray:
    """Sorted unique values with members closer than ``tol`` merged into the first."""
    v = np.sort(np.asarray(values, dtype=float))
    keep = np.concatenate([[True], np.diff(v) > tol])
    return v[keep]


def graded_lines(keys: np.ndarray, max_cell: float, min_cell: float, growth: float) -> np.ndarray:
    """Grid-line coordinates (m) containing every key coordinate.

    Cells start at ``min_cell`` (or the length of a shorter neighbouring interval) at
    each key line and grow away from it by at most about ``growth`` per cell, up to
    ``max_cell``. Within an interval the target size is
    h(t) = min(max_cell, a + ln(growth)·t), t the distance to the nearer key, and cells
    are placed uniformly in the coordinate ∫ dt / h(t), which makes neighbour ratios
    ``growth`` where the size is not capped.
    """
    keys = np.asarray(keys, dtype=float)
    lengths = np.diff(keys)
    # start size at each key: min_cell, but never larger than an adjacent interval
    left = np.concatenate([[np.inf], lengths])
    right = np.concatenate([lengths, [np.inf]])
    h0 = np.minimum(min_cell, np.minimum(left, right))
    # With h(t) = a + s·t and unit steps in ∫ dt/h, consecutive cells differ by the factor
    # exp(s): s = ln(growth) gives exactly ``growth``, and a = h0·s/(exp(s) − 1) makes the
    # first cell h0.
    slope = np.log(growth)
    h0 = h0 * slope / np.expm1(slope)

    pieces = [keys[:1]]
    for k, length in enumerate(lengths):
        if length <= min_cell:
            pieces.append(keys[k + 1 : k + 2])
            continue
        if min_cell >= max_cell:  # uniform grid asked for
            n = int(np.ceil(length / max_cell - 1e-9))
            pieces.append(np.linspace(keys[k], keys[k + 1], n + 1)[1:])
            continue
        # samples cluster geometrically towards both ends, where cells are smallest
        g = np.geomspace(0.1 * min(h0[k], h0[k + 1]), length, _SAMPLES)
        t = np.unique(np.concatenate([[0.0], g, length - g, [length]]).clip(0.0, length))
        h = np.minimum.reduce(
            [
                np.full_like(t, max_cell),
                h0[k] + slope * t,
                h0[k + 1] + slope * (length - t),
            ]
        )
        inv = 1.0 / h
        cum = np.concatenate([[0.0], np.cumsum(0.5 * (inv[1:] + inv[:-1]) * np.diff(t))])
        n = max(1, int(np.ceil(cum[-1] - 1e-6)))
        # no cell may exceed max_cell even after rounding
        n = max(n, int(np.ceil(length / max_cell - 1e-9)))
        targets = np.linspace(0.0, cum[-1], n + 1)[1:]
        inner = keys[k] + np.interp(targets, cum, t)
        inner[-1] = keys[k + 1]
        pieces.append(inner)
    return np.concatenate(pieces)
