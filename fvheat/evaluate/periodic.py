"""First-harmonic analysis of a periodic steady state (ISO 13786 quantities).

Over one period P sampled at every time step, a signal y(t) has the first harmonic
ȳ + A·cos(ω(t − t_peak)), ω = 2π/P, from the discrete Fourier sums
a = (2/n) Σ y_k cos ωt_k, b = (2/n) Σ y_k sin ωt_k: A = √(a² + b²), t_peak = atan2(b, a)/ω.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

from fvheat.assembly.system import System
from fvheat.case.model import Case


@dataclass
class Harmonic:
    """Running first-harmonic sums of one or more signals over a period ``period`` (s)."""

    period: float
    n: int = 0
    total: np.ndarray | float = 0.0
    cos_sum: np.ndarray | float = 0.0
    sin_sum: np.ndarray | float = 0.0

    def add(self, t: float, y: np.ndarray | float) -> None:
        """Add the sample ``y`` taken at time ``t`` (s)."""
        w = 2.0 * np.pi * t / self.period
        self.n += 1
        self.total = self.total + y
        self.cos_sum = self.cos_sum + y * np.cos(w)
        self.sin_sum = self.sin_sum + y * np.sin(w)

    @property
    def mean(self) -> np.ndarray | float:
        """Mean over the period (unit of the signal)."""
        return self.total / self.n

    @property
    def amplitude(self) -> np.ndarray | float:
        """First-harmonic amplitude (unit of the signal)."""
        return 2.0 / self.n * np.hypot(self.cos_sum, self.sin_sum)

    @property
    def peak_time(self) -> np.ndarray | float:
        """Time of the first harmonic's maximum within the period, s."""
        return (
            np.mod(np.arctan2(self.sin_sum, self.cos_sum), 2.0 * np.pi) * self.period / (2 * np.pi)
        )


@dataclass
class PeriodicResponse:
    """Harmonics of the boundary heat flows and of the boundaries' driving temperatures over
    the final cycle, with the cycle count and the last cycle-to-cycle change (K)."""

    case: Case
    flows: Harmonic
    drivers: dict[int, Harmonic] = field(default_factory=dict)
    lengths: np.ndarray | None = None
    cycles: int = 0
    change: float = float("nan")

    @classmethod
    def start(cls, case: Case, system: System) -> PeriodicResponse:
        """Empty harmonics of the boundary flows and drivers over one period (s)."""
        assert case.time is not None
        p = case.time.duration
        drivers = {
            k: Harmonic(p)
            for k, b in enumerate(case.boundaries)
            if (sig := b.reference_temperature) is not None and not sig.is_constant
        }
        lengths = np.bincount(
            system.surface.bid,
            weights=system.surface.area * system.surface.exchange,
            minlength=len(case.boundaries),
        )
        return cls(case, Harmonic(p), drivers, lengths)

    def add(self, t: float, flows: np.ndarray) -> None:
        """Sample the boundary heat flows (W/m) at the end of a step at time ``t`` (s)."""
        self.flows.add(t, flows)
        for k, h in self.drivers.items():
            sig = self.case.boundaries[k].reference_temperature
            assert sig is not None
            h.add(t, float(sig.at(t)))

    def as_dict(self) -> dict[str, Any]:
        """Per boundary: mean and amplitude of the heat flow (W/m), the time of its maximum
        (h), and, when exactly one boundary's temperature varies (the driver): the lag (h)
        from the driver's temperature maximum to the maximum of the heat flow *leaving* the
        body through the boundary, and the periodic thermal transmittance (W/(m²·K)) =
        heat-flow amplitude per unit length / driver temperature amplitude."""
        f = self.flows
        names = [b.name for b in self.case.boundaries]
        out: dict[str, Any] = {"cycles": self.cycles, "cycle_change": self.change, "boundaries": {}}
        driver = next(iter(self.drivers.items())) if len(self.drivers) == 1 else None
        period = f.period
        for k, name in enumerate(names):
            row: dict[str, Any] = {
                "mean_heat_flow": float(np.atleast_1d(f.mean)[k]),
                "amplitude": float(np.atleast_1d(f.amplitude)[k]),
                "peak_time_h": float(np.atleast_1d(f.peak_time)[k]) / 3600.0,
            }
            if driver is not None and k != driver[0]:
                d = driver[1]
                leave_peak = np.mod(row["peak_time_h"] * 3600.0 + period / 2, period)
                row["lag_h"] = float(np.mod(leave_peak - d.peak_time, period)) / 3600.0
                if self.lengths is not None and self.lengths[k] > 0 and d.amplitude > 0:
                    row["periodic_transmittance"] = row["amplitude"] / (
                        self.lengths[k] * float(d.amplitude)
                    )
            out["boundaries"][name] = row
        if driver is not None:
            self._decrement(out, driver[0], float(driver[1].mean))
            out["driver"] = {
                "boundary": names[driver[0]],
                "amplitude": float(driver[1].amplitude),
                "peak_time_h": float(driver[1].peak_time) / 3600.0,
            }
        return out

    def _decrement(self, out: dict[str, Any], k_driver: int, driver_mean: float) -> None:
        """Decrement factor = periodic transmittance / U for a wall between the driver and
        one other boundary at a constant temperature, U from the mean heat flow (the mean of
        a linear periodic state is the steady state of the mean conditions)."""
        others = [
            (k, b.reference_temperature)
            for k, b in enumerate(self.case.boundaries)
            if k != k_driver and b.reference_temperature is not None
        ]
        if len(others) != 1:
            return
        k, sig = others[0]
        dtheta = abs(driver_mean - float(sig.at(0.0)))
        row = out["boundaries"][self.case.boundaries[k].name]
        if dtheta > 0 and "periodic_transmittance" in row and self.lengths is not None:
            u = abs(row["mean_heat_flow"]) / (self.lengths[k] * dtheta)
            row["u_value"] = u
            row["decrement_factor"] = row["periodic_transmittance"] / u
