"""Worst cases over a transient run, sampled at every time step (not only at saved times).

* Per boundary: the lowest and highest surface temperature (°C) over the run, where and
  when, by the same evaluation as the steady results (face centres and face end points,
  :class:`~fvheat.evaluate.surfaces.SurfacePointMap`).
* With a junction: the lowest temperature factor over the run,
  f(t) = (θ_si,min(t) − θ_e(t)) / (θ_i(t) − θ_e(t)), with θ_si,min(t) the lowest surface
  temperature over the junction's f_Rsi surfaces (default: its inside ones) at that step
  and θ_i(t), θ_e(t) the warm-side and cold-side temperatures at that time (the mean over
  the side's boundaries when they differ). Steps where |θ_i − θ_e| < 1 K are skipped
  (f is then dominated by the surfaces' own history; counted). The surface temperatures
  are those of the run itself, i.e. at the boundaries' own surface resistances.
  Unlike the steady f_Rsi, f(t) of a massive construction lags the air temperatures and
  can leave 0–1.
* With latent heat: the largest frozen area and front positions over the run.

The initial state counts as a step; a periodic run reports its last cycle.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

from fvheat.assembly.boundary import SurfaceTerms
from fvheat.assembly.enthalpy import EnthalpyModel
from fvheat.assembly.system import System
from fvheat.case.model import Case
from fvheat.evaluate.fronts import FrontLines
from fvheat.evaluate.surfaces import SurfacePointMap

#: K: steps whose warm and cold sides differ by less than this are left out of f(t)
F_MIN_DIFFERENCE = 1.0


@dataclass
class Extreme:
    """A value, the time (s) it occurred and, for surface temperatures, where (m) and on
    which boundary."""

    value: float
    time: float = 0.0
    at: tuple[float, float] | None = None
    boundary: str | None = None


@dataclass
class RunExtremes:
    """Running extremes of a transient run; :meth:`add` samples one state."""

    system: System
    model: EnthalpyModel
    lines: FrontLines
    names: list[str]
    points: SurfacePointMap
    order: np.ndarray
    starts: np.ndarray
    present: np.ndarray
    f_sides: tuple[np.ndarray, np.ndarray, np.ndarray] | None
    lowest: dict[str, Extreme] = field(default_factory=dict)
    highest: dict[str, Extreme] = field(default_factory=dict)
    f_min: Extreme | None = None
    f_theta: tuple[float, float, float] = (0.0, 0.0, 0.0)  # θ_si,min, θ_i, θ_e at f_min
    f_skipped: int = 0
    steps: int = 0
    phase: dict[str, Extreme] = field(default_factory=dict)

    @classmethod
    def start(
        cls, case: Case, system: System, model: EnthalpyModel, lines: FrontLines
    ) -> RunExtremes:
        """Empty extremes for the surfaces, probe lines and f_Rsi sides of ``case``."""
        s = system.surface
        names = [b.name for b in s.boundaries]
        points = SurfacePointMap.build(system.mesh, s)
        order = np.argsort(points.bid, kind="stable")
        starts = np.searchsorted(points.bid[order], np.arange(len(names) + 1))
        present = starts[1:] > starts[:-1]
        j = case.junction
        sides = None
        if j is not None and j.pair:
            index = {n: k for k, n in enumerate(names)}
            checked = np.array([index[n] for n in (j.f_rsi_boundaries or j.inside)])
            inside = np.array([index[n] for n in j.inside])
            outside = np.array([index[n] for n in j.outside])
            sides = (checked[present[checked]], inside, outside)
        return cls(system, model, lines, names, points, order, starts, present, sides)

    def add(self, temp: np.ndarray, t: float) -> None:
        """Sample the cell temperatures ``temp`` (°C) at time ``t`` (s)."""
        self.steps += 1
        surf = self.system.surface
        if self.model.variable_conductivity:
            surf = SurfaceTerms.build(
                self.system.mesh, surf.boundaries, self.model.conductivity(temp)
            )
        ts, _, _ = surf.surface_state(temp, t)
        values = self.points.temperatures(ts)[self.order]
        first = self.starts[:-1][self.present]
        lo = np.full(len(self.names), np.inf)
        hi = np.full(len(self.names), -np.inf)
        lo[self.present] = np.minimum.reduceat(values, first)
        hi[self.present] = np.maximum.reduceat(values, first)
        for k in np.flatnonzero(self.present):
            name = self.names[k]
            if name not in self.lowest or lo[k] < self.lowest[name].value:
                self.lowest[name] = self._where(values, int(k), lo[k], t, np.argmin)
            if name not in self.highest or hi[k] > self.highest[name].value:
                self.highest[name] = self._where(values, int(k), hi[k], t, np.argmax)
        if self.f_sides is not None:
            self._factor(lo, values, t)
        for key, v in self.lines.measure(temp).items():
            if v is not None and (key not in self.phase or v > self.phase[key].value):
                self.phase[key] = Extreme(float(v), t)

    def _where(self, values: np.ndarray, k: int, v: float, t: float, pick) -> Extreme:
        """The extreme ``v`` of boundary ``k`` at time ``t`` with its location."""
        a, b = self.starts[k], self.starts[k + 1]
        p = self.order[a + int(pick(values[a:b]))]
        at = (float(self.points.at[p, 0]), float(self.points.at[p, 1]))
        return Extreme(float(v), t, at, self.names[k])

    def _factor(self, lo: np.ndarray, values: np.ndarray, t: float) -> None:
        """f(t) from the lowest surface temperature over the checked boundaries."""
        assert self.f_sides is not None
        checked, inside, outside = self.f_sides
        bounds = self.system.surface.boundaries
        theta_i = float(np.mean([bounds[k].reference_temperature.at(t) for k in inside]))
        theta_e = float(np.mean([bounds[k].reference_temperature.at(t) for k in outside]))
        if abs(theta_i - theta_e) < F_MIN_DIFFERENCE or checked.size == 0:
            self.f_skipped += 1
            return
        k = int(checked[np.argmin(lo[checked])])
        f = (float(lo[k]) - theta_e) / (theta_i - theta_e)
        if self.f_min is None or f < self.f_min.value:
            where = self._where(values, k, lo[k], t, np.argmin)
            self.f_min = Extreme(f, t, where.at, self.names[k])
            self.f_theta = (float(lo[k]), theta_i, theta_e)

    # ---- outputs ---------------------------------------------------------------------
    def boundary_dict(self, name: str) -> dict[str, Any]:
        """``min_temperature_over_run`` (°C), ``..._at`` (m), ``..._time_s`` and the same
        for the maximum, for boundary ``name`` (empty when it has no faces)."""
        if name not in self.lowest:
            return {}
        lo, hi = self.lowest[name], self.highest[name]
        return {
            "min_temperature_over_run": lo.value,
            "min_temperature_over_run_at": list(lo.at or ()),
            "min_temperature_over_run_time_s": lo.time,
            "max_temperature_over_run": hi.value,
            "max_temperature_over_run_at": list(hi.at or ()),
            "max_temperature_over_run_time_s": hi.time,
        }

    def factor_dict(self) -> dict[str, Any]:
        """The lowest f(t) over the run and what it came from (empty without a junction)."""
        if self.f_sides is None:
            return {}
        out: dict[str, Any] = {
            "f_min_over_run": None,
            "f_over_run_steps": self.steps,
            "f_over_run_skipped_steps": self.f_skipped,
            "f_over_run_basis": (
                "f(t) = (θ_si,min(t) − θ_e(t))/(θ_i(t) − θ_e(t)) at every step of the run, "
                "at the boundaries' own surface resistances; steps with |θ_i − θ_e| < "
                f"{F_MIN_DIFFERENCE:g} K skipped"
            ),
        }
        if self.f_min is not None:
            theta, theta_i, theta_e = self.f_theta
            out.update(
                {
                    "f_min_over_run": self.f_min.value,
                    "f_min_over_run_time_s": self.f_min.time,
                    "f_min_over_run_at": list(self.f_min.at or ()),
                    "f_min_over_run_boundary": self.f_min.boundary,
                    "f_min_over_run_theta_si": theta,
                    "f_min_over_run_theta_i": theta_i,
                    "f_min_over_run_theta_e": theta_e,
                }
            )
        return out

    def phase_dict(self) -> dict[str, Any]:
        """Largest frozen area (m²) and front positions (m) over the run, with their times."""
        return {k: {"value": e.value, "time_s": e.time} for k, e in self.phase.items()}
