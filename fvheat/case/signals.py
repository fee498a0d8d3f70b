"""Boundary values that may vary in time: constant, cosine and tabulated series.

Every signal maps time t (s, scalar or array) to a value in the unit of the key that
holds it (°C for temperatures, W/m² for heat fluxes).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np


@dataclass(frozen=True)
class Constant:
    """A value that does not change: ``value``."""

    value: float

    def at(self, t: float | np.ndarray) -> float | np.ndarray:
        """Value at time ``t`` (s)."""
        return np.full(np.shape(t), self.value) if np.ndim(t) else self.value

    @property
    def is_constant(self) -> bool:
        """Always True."""
        return True


@dataclass(frozen=True)
class Cosine:
    """``mean + amplitude·cos(2π(t − phase)/period)``; ``period`` and ``phase`` in s."""

    mean: float
    amplitude: float
    period: float
    phase: float = 0.0

    def at(self, t: float | np.ndarray) -> float | np.ndarray:
        """Value at time ``t`` (s)."""
        angle = 2.0 * np.pi * (np.asarray(t) - self.phase) / self.period
        return self.mean + self.amplitude * np.cos(angle)

    @property
    def is_constant(self) -> bool:
        """Whether the amplitude (K) is zero."""
        return self.amplitude == 0.0


@dataclass(frozen=True, eq=False)
class Series:
    """A tabulated series ``(times, values)`` read from a CSV column, linearly interpolated.

    ``times`` are strictly increasing seconds. With ``period`` (s) the table repeats with
    that period (a year of hourly weather looped over several years), interpolating across
    the wrap from the last row to the first row of the next period. Without it, the end
    values are held outside the table (the case loader rejects runs beyond the table).
    ``values`` already include the case's ``scale`` factor.
    """

    times: np.ndarray = field(repr=False)
    values: np.ndarray = field(repr=False)
    source: str = ""
    column: str = ""
    period: float | None = None

    def __eq__(self, other: object) -> bool:
        """Equal tables, source, column and period (the arrays compared element-wise)."""
        if not isinstance(other, Series):
            return NotImplemented
        return (
            (self.source, self.column, self.period) == (other.source, other.column, other.period)
            and np.array_equal(self.times, other.times)
            and np.array_equal(self.values, other.values)
        )

    __hash__ = None  # type: ignore[assignment]  # mutable arrays: not hashable

    def at(self, t: float | np.ndarray) -> float | np.ndarray:
        """Value at time ``t`` (s), linear interpolation between rows."""
        if self.period is None:
            out = np.interp(t, self.times, self.values)
        else:
            t0 = self.times[0]
            local = t0 + np.mod(np.asarray(t, dtype=float) - t0, self.period)
            out = np.interp(
                local,
                np.append(self.times, t0 + self.period),
                np.append(self.values, self.values[0]),
            )
        return float(out) if np.ndim(out) == 0 else out

    @property
    def is_constant(self) -> bool:
        """Whether every value of the series is the same."""
        return bool(np.all(self.values == self.values[0]))


Signal = Constant | Cosine | Series
