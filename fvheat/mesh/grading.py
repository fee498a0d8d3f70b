"""One-dimensional graded grid lines through a set of fixed coordinates."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

_SAMPLES = 200  # samples from each end of an interval for the size-function integral


def merge_close(values: np.ndarray, tol: float) -> np.ndarray:
    """Sorted unique values with members closer than ``tol`` merged into the first."""
    v = np.sort(np.asarray(values, dtype=float))
    keep = np.concatenate([[True], np.diff(v) > tol])
    return v[keep]


def size_function(
    keys: np.ndarray,
    t: np.ndarray,
    max_cell: float,
    min_cell: float,
    growth: float,
    first: np.ndarray | None = None,
) -> np.ndarray:
    """Target cell size (m) at coordinates ``t``: h(t) = min(max_cell, min_j (a_j + s·|t − x_j|)).

    Each key line x_j starts at a_j (``min_cell``, or less next to a shorter interval) and
    sizes grow linearly away from it with slope s = ln(growth); taking the minimum over all
    keys keeps the growth limit across neighbouring thin layers.
    """
    lengths = np.diff(keys)
    left = np.concatenate([[np.inf], lengths])
    right = np.concatenate([lengths, [np.inf]])
    start = np.minimum(min_cell if first is None else first, np.minimum(left, right))
    s = np.log(growth)
    # With h = a + s·t and unit steps in ∫ dt/h, consecutive cells differ by exp(s) = growth;
    # a = h0·s/(exp(s) − 1) makes the first cell h0.
    a = start * s / np.expm1(s)
    # keys farther than max_cell/s from every t give sizes above max_cell: leave them out
    # (the same result; thousands of key lines would otherwise cost keys² work per line)
    reach = max_cell / s
    lo, hi = np.searchsorted(keys, [float(np.min(t)) - reach, float(np.max(t)) + reach])
    lo = min(int(lo), keys.size - 1)
    hi = max(int(hi), lo + 1)  # at least one key (then every size is max_cell)
    h = np.min(a[None, lo:hi] + s * np.abs(t[:, None] - keys[None, lo:hi]), axis=1)
    return np.minimum(h, max_cell)


@dataclass(frozen=True)
class LinePlan:
    """The graded grid lines through ``keys``, planned but not yet placed: ``cells`` is the
    number of cells they make, known before any coordinate array of that size exists (so
    a mesh too large for the machine is refused before it is allocated)."""

    keys: np.ndarray
    pieces: tuple[tuple[Any, ...], ...]  # per key interval: how to fill it
    cells: int

    def coordinates(self) -> np.ndarray:
        """Grid-line coordinates (m) containing every key coordinate."""
        out = [self.keys[:1]]
        for k, piece in enumerate(self.pieces):
            kind = piece[0]
            if kind == "uniform":
                out.append(np.linspace(self.keys[k], self.keys[k + 1], piece[1] + 1)[1:])
                continue
            if kind == "graded":
                _, n, t, h, cum = piece
                targets = np.linspace(0.0, cum[-1], n + 1)[1:-1]
                out.append(self.keys[k] + _invert(targets, t, h, cum))
            out.append(self.keys[k + 1 : k + 2])
        return np.concatenate(out)


def plan_lines(
    keys: np.ndarray,
    max_cell: float,
    min_cell: float,
    growth: float,
    first: np.ndarray | None = None,
) -> LinePlan:
    """Plan the grid lines of :func:`graded_lines` (same arguments): the cell count of
    every key interval from the integral of the size function, without placing them."""
    keys = np.asarray(keys, dtype=float)
    lengths = np.diff(keys)
    smallest = min_cell if first is None else float(np.min(first, initial=min_cell))
    ends = np.full(keys.size, min_cell) if first is None else np.minimum(first, min_cell)
    pieces: list[tuple[Any, ...]] = []
    cells = 0
    for k, length in enumerate(lengths):
        end_cell = min(ends[k], ends[k + 1])
        if length <= end_cell:
            pieces.append(("one",))
            cells += 1
            continue
        if min_cell >= max_cell and end_cell >= min_cell:  # uniform grid asked for
            n = int(np.ceil(length / max_cell - 1e-9))
            pieces.append(("uniform", n))
            cells += n
            continue
        g = np.geomspace(1e-3 * smallest, length, _SAMPLES)
        t = np.unique(np.concatenate([[0.0], g, length - g, [length]]).clip(0.0, length))
        h = size_function(keys, keys[k] + t, max_cell, min_cell, growth, first)
        cum = np.concatenate([[0.0], np.cumsum(_piece_integral(np.diff(t), h[:-1], h[1:]))])
        n = max(1, int(np.ceil(cum[-1] - 1e-6)), int(np.ceil(length / max_cell - 1e-9)))
        pieces.append(("graded", n, t, h, cum))
        cells += n
    return LinePlan(keys, tuple(pieces), cells)


def graded_lines(
    keys: np.ndarray,
    max_cell: float,
    min_cell: float,
    growth: float,
    first: np.ndarray | None = None,
) -> np.ndarray:
    """Grid-line coordinates (m) containing every key coordinate.

    Cells are placed uniformly in the coordinate ∫ dt / h(t) of :func:`size_function`,
    integrated exactly on each linear piece between samples (samples cluster geometrically
    towards the interval ends, where h is smallest), which makes neighbour ratios at most
    about ``growth`` and no cell larger than ``max_cell``.
    """
    return plan_lines(keys, max_cell, min_cell, growth, first).coordinates()


def _piece_integral(dt: np.ndarray, h0: np.ndarray, h1: np.ndarray) -> np.ndarray:
    """∫ dt/h over pieces where h runs linearly from h0 to h1: dt·ln(h1/h0)/(h1 − h0)."""
    dh = h1 - h0
    flat = np.abs(dh) <= 1e-12 * h0
    safe = np.where(flat, 1.0, dh)
    return np.where(flat, dt / h0, dt * np.log(h1 / h0) / safe)


def _invert(targets: np.ndarray, t: np.ndarray, h: np.ndarray, cum: np.ndarray) -> np.ndarray:
    """Coordinates where the cumulative integral reaches ``targets`` (exact per linear piece)."""
    i = np.clip(np.searchsorted(cum, targets, side="right") - 1, 0, t.size - 2)
    dt = t[i + 1] - t[i]
    slope = (h[i + 1] - h[i]) / dt
    rem = targets - cum[i]
    flat = np.abs(slope) <= 1e-12
    # h(τ) = h_i + slope·τ;  ∫0^τ dτ/h = ln(1 + slope·τ/h_i)/slope = rem
    s = np.where(flat, 1.0, slope)
    tau = np.where(flat, rem * h[i], h[i] * np.expm1(np.where(flat, 0.0, slope) * rem) / s)
    return t[i] + np.minimum(tau, dt)
