"""Condensation-risk hours on inside surfaces during a transient run.

At the end of every time step each face of the checked boundaries is compared with the
dew point of the room air (the frost point below 0 °C: :mod:`fvheat.evaluate.humidity`) and its
surface relative humidity with the mould threshold (80 % by default: the ISO 13788
criterion, common practice); the step's length counts towards the hours of each face where
the condition holds, and towards the "any face" totals when it holds somewhere.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from fvheat.assembly.system import System
from fvheat.case.model import Case, Condensation
from fvheat.evaluate.humidity import SATURATION_BASIS, surface_relative_humidity


@dataclass
class CondensationHours:
    """Running counts (s) for the faces ``faces`` (indices into the surface terms)."""

    settings: Condensation
    faces: np.ndarray
    centres: np.ndarray
    boundary: np.ndarray
    seconds_dew: np.ndarray
    seconds_mould: np.ndarray
    any_dew: float = 0.0
    any_mould: float = 0.0
    total: float = 0.0

    @classmethod
    def start(cls, case: Case, system: System) -> CondensationHours:
        """Empty counters over the faces of the case's condensation boundaries."""
        c = case.condensation
        assert c is not None
        s = system.surface
        ids = [i for i, b in enumerate(case.boundaries) if b.name in c.boundaries]
        faces = np.flatnonzero(np.isin(s.bid, ids))
        n = faces.size
        return cls(
            c, faces, system.mesh.b_centre[s.face[faces]], s.bid[faces], np.zeros(n), np.zeros(n)
        )

    def add(self, system: System, temp: np.ndarray, t: float, dt: float) -> None:
        """Count the step of ``dt`` s ending at ``t`` with cell temperatures ``temp``."""
        ts, _, _ = system.surface.surface_state(temp, t)
        theta_s = ts[self.faces]
        theta_a = float(self.settings.air_temperature.at(t))
        rh = float(self.settings.relative_humidity.at(t)) / 100.0
        surface_rh = np.asarray(surface_relative_humidity(theta_a, rh, theta_s))
        dew = surface_rh >= 1.0  # the surface is at or below the dew (frost) point
        mould = surface_rh >= self.settings.mould_threshold / 100.0
        # counted in seconds (exact for whole-second steps), reported in hours
        self.seconds_dew += dt * dew
        self.seconds_mould += dt * mould
        self.any_dew += dt * bool(dew.any())
        self.any_mould += dt * bool(mould.any())
        self.total += dt

    def as_dict(self) -> dict[str, Any]:
        """Totals and the worst face (hours; coordinates in m)."""
        h = 1.0 / 3600.0
        out: dict[str, Any] = {
            "boundaries": list(self.settings.boundaries),
            "hours_counted": self.total * h,
            "hours_below_dew_point": self.any_dew * h,
            "hours_surface_rh_above_threshold": self.any_mould * h,
            "mould_threshold_percent": self.settings.mould_threshold,
            "dew_point_basis": SATURATION_BASIS,
        }
        if self.faces.size:
            k = int(np.argmax(self.seconds_mould + 1e-9 * self.seconds_dew))
            out["worst_face_at"] = self.centres[k].tolist()
            out["worst_face_hours_below_dew_point"] = float(self.seconds_dew[k]) * h
            out["worst_face_hours_rh_above_threshold"] = float(self.seconds_mould[k]) * h
        return out
