"""Moist air: saturation pressure, dew / frost point and surface relative humidity.

Saturation vapour pressure in the Magnus form p_sat = 611.2 Pa · exp(a·θ / (b + θ)), θ in °C,
with the coefficients of the WMO Guide to Meteorological Instruments and Methods of
Observation (2008, Annex 4.B), from memory:

- over liquid water, used at and above 0 °C: a = 17.62, b = 243.12 °C (WMO range −45 to 60 °C);
- over ice, used below 0 °C: a = 22.46, b = 272.62 °C (WMO range −65 to 0.01 °C).

Below 0 °C a cold surface collects frost as soon as the air at it is saturated with respect
to ice. Saturation over ice is lower than over (supercooled) water, so the frost point lies
above the dew point over water: using water there would report a surface as dry while frost
forms on it. Both forms give 611.2 Pa at 0 °C, so p_sat is continuous and increasing, and
"surface relative humidity ≥ 1" is the same test as "surface at or below the dew / frost
point". A relative humidity of air below 0 °C is likewise taken relative to ice (as psychrolib
does after the ASHRAE Handbook — Fundamentals; meteorological practice refers it to water).
"""

from __future__ import annotations

import numpy as np

MAGNUS_P0 = 611.2  # Pa, both phases at 0 °C
MAGNUS_WATER = (17.62, 243.12)  # a, b (°C): over liquid water
MAGNUS_ICE = (22.46, 272.62)  # a, b (°C): over ice

#: the saturation basis of every dew point and surface humidity (stated in summaries, report)
SATURATION_BASIS = (
    "saturation over water at and above 0 °C, over ice below (Magnus form, WMO 2008 coefficients)"
)


def _scalar_or_array(x: np.ndarray) -> float | np.ndarray:
    return float(x) if x.ndim == 0 else x


def _magnus(theta: np.ndarray, a: float | np.ndarray, b: float | np.ndarray) -> np.ndarray:
    return MAGNUS_P0 * np.exp(a * theta / (b + theta))


def saturation_pressure_over_water(theta: float | np.ndarray) -> float | np.ndarray:
    """Saturation vapour pressure over liquid (also supercooled) water, Pa, at ``theta`` °C."""
    return _scalar_or_array(_magnus(np.asarray(theta, dtype=float), *MAGNUS_WATER))


def saturation_pressure_over_ice(theta: float | np.ndarray) -> float | np.ndarray:
    """Saturation vapour pressure over ice, Pa, at ``theta`` °C (≤ 0 °C)."""
    return _scalar_or_array(_magnus(np.asarray(theta, dtype=float), *MAGNUS_ICE))


def saturation_pressure(theta: float | np.ndarray) -> float | np.ndarray:
    """Saturation vapour pressure, Pa, at ``theta`` °C: over water at and above 0 °C, over ice
    below (:data:`SATURATION_BASIS`). A float for a scalar ``theta``, else an array."""
    t = np.asarray(theta, dtype=float)
    ice = t < 0.0
    a = np.where(ice, MAGNUS_ICE[0], MAGNUS_WATER[0])
    b = np.where(ice, MAGNUS_ICE[1], MAGNUS_WATER[1])
    return _scalar_or_array(_magnus(t, a, b))


def saturation_temperature(vapour_pressure: float | np.ndarray) -> float | np.ndarray:
    """Temperature (°C) at which :func:`saturation_pressure` equals ``vapour_pressure`` (Pa > 0):
    the dew point over water when that is ≥ 0 °C, otherwise the frost point over ice."""
    gamma = np.log(np.asarray(vapour_pressure, dtype=float) / MAGNUS_P0)
    ice = gamma < 0.0  # below 611.2 Pa the saturated surface is below 0 °C
    a = np.where(ice, MAGNUS_ICE[0], MAGNUS_WATER[0])
    b = np.where(ice, MAGNUS_ICE[1], MAGNUS_WATER[1])
    return _scalar_or_array(b * gamma / (a - gamma))


def dew_point(
    theta: float | np.ndarray, relative_humidity: float | np.ndarray
) -> float | np.ndarray:
    """Temperature (°C) at which a surface becomes saturated in air at ``theta`` °C and
    ``relative_humidity`` (0–1]: the dew point over water if that is ≥ 0 °C, otherwise the
    frost point over ice. A float for scalar inputs, else an array."""
    pv = np.asarray(relative_humidity, dtype=float) * saturation_pressure(theta)
    return saturation_temperature(pv)


def surface_relative_humidity(
    theta_air: float | np.ndarray,
    relative_humidity: float | np.ndarray,
    theta_surface: float | np.ndarray,
) -> float | np.ndarray:
    """Relative humidity (0–1, may exceed 1: condensation or frost) of the air layer at surfaces
    at ``theta_surface`` °C, the room air being at ``theta_air`` °C and ``relative_humidity``;
    relative to saturation over ice where the surface is below 0 °C. A float for scalar
    inputs, else an array (e.g. one value per face)."""
    pv = np.asarray(relative_humidity, dtype=float) * saturation_pressure(theta_air)
    return _scalar_or_array(pv / np.asarray(saturation_pressure(theta_surface)))
