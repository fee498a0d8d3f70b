"""Moist air: saturation pressure, dew point and surface relative humidity (Magnus formula).

Magnus form over liquid water, p_sat = 611.2 Pa · exp(17.62·θ / (243.12 + θ)), θ in °C,
with the coefficients of the WMO Guide to Meteorological Instruments (2008, Annex 4.B),
from memory; stated range −45 to 60 °C, better than about 0.1 % of the exact value.
The same form is used below 0 °C (over water, the conservative choice for dew on a surface).
"""

from __future__ import annotations

import numpy as np

MAGNUS_P0 = 611.2  # Pa
MAGNUS_A = 17.62
MAGNUS_B = 243.12  # °C


def saturation_pressure(theta: float | np.ndarray) -> float | np.ndarray:
    """Saturation vapour pressure over water, Pa, at ``theta`` °C."""
    return MAGNUS_P0 * np.exp(MAGNUS_A * np.asarray(theta) / (MAGNUS_B + np.asarray(theta)))


def dew_point(theta: float, relative_humidity: float) -> float:
    """Dew-point temperature (°C) of air at ``theta`` °C and ``relative_humidity`` (0–1]."""
    gamma = np.log(relative_humidity) + MAGNUS_A * theta / (MAGNUS_B + theta)
    return float(MAGNUS_B * gamma / (MAGNUS_A - gamma))


def surface_relative_humidity(
    theta_air: float, relative_humidity: float, theta_surface: float
) -> float:
    """Relative humidity (0–1, may exceed 1: condensation) of the air layer at a surface at
    ``theta_surface`` °C, the room air being at ``theta_air`` °C and ``relative_humidity``."""
    return float(
        relative_humidity * saturation_pressure(theta_air) / saturation_pressure(theta_surface)
    )
