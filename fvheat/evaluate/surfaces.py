"""Per-boundary results from the same surface fluxes the solver balanced."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fvheat.assembly.system import System


@dataclass(frozen=True)
class SurfaceResult:
    """One boundary: heat flow into the body (W/m), face-temperature extremes (°C) and
    where they occur (face centre, m), and its exchanging length (m)."""

    heat_flow: float
    min_temperature: float
    min_at: tuple[float, float]
    max_temperature: float
    max_at: tuple[float, float]
    length: float

    def as_dict(self) -> dict[str, object]:
        return {
            "heat_flow": self.heat_flow,
            "min_temperature": self.min_temperature,
            "min_at": list(self.min_at),
            "max_temperature": self.max_temperature,
            "max_at": list(self.max_at),
            "length": self.length,
        }


def surface_results(system: System, temp: np.ndarray, t: float) -> dict[str, SurfaceResult]:
    """Heat flow and face-temperature extremes of every boundary at time ``t`` (s)."""
    s = system.surface
    ts, flux, _ = s.surface_state(temp, t)
    nb = len(s.boundaries)
    flows = np.bincount(s.bid, weights=flux, minlength=nb)
    length = np.bincount(s.bid, weights=s.area * s.exchange, minlength=nb)
    centres = system.mesh.b_centre[s.face]
    order = np.argsort(s.bid, kind="stable")
    starts = np.searchsorted(s.bid[order], np.arange(nb + 1))
    out = {}
    for k, b in enumerate(s.boundaries):
        idx = order[starts[k] : starts[k + 1]]
        lo = idx[np.argmin(ts[idx])]
        hi = idx[np.argmax(ts[idx])]
        out[b.name] = SurfaceResult(
            heat_flow=float(flows[k]),
            min_temperature=float(ts[lo]),
            min_at=(float(centres[lo, 0]), float(centres[lo, 1])),
            max_temperature=float(ts[hi]),
            max_at=(float(centres[hi, 0]), float(centres[hi, 1])),
            length=float(length[k]),
        )
    return out
