"""Saturation pressure, dew / frost point and surface humidity against psychrolib.

psychrolib (2.5, read in its source) implements the Hyland–Wexler saturation pressure of the
ASHRAE Handbook — Fundamentals (2017, ch. 1, eqs. 5 and 6): over ice at and below the
triple point (0.01 °C), over liquid water above it. Its relative humidity is relative to that
saturation pressure at the dry-bulb temperature (so over ice for air at or below 0.01 °C),
and ``GetTDewPointFromRelHum`` inverts the same function by Newton iteration (to 0.001 K in SI
units): below 0 °C it returns the frost point. fvheat uses the Magnus form with the WMO (2008)
coefficients instead, switching at 0 °C, so the two are independent formulations of the same
physics.
"""

from __future__ import annotations

import numpy as np
import psychrolib
import pytest
from scipy.optimize import brentq

from fvheat.evaluate.humidity import (
    SATURATION_BASIS,
    dew_point,
    saturation_pressure,
    saturation_pressure_over_ice,
    saturation_pressure_over_water,
    surface_relative_humidity,
)

psychrolib.SetUnitSystem(psychrolib.SI)

#: the grid of room states: −20 to 30 °C in 2.5 K steps, 20 to 95 % RH in 5 % steps
THETA_AIR = np.arange(-20.0, 30.0 + 1e-9, 2.5)
RH = np.arange(0.20, 0.95 + 1e-9, 0.05)


def ref_saturation(theta: np.ndarray) -> np.ndarray:
    """psychrolib's saturation pressure, Pa (ice at or below 0.01 °C, water above)."""
    return np.array([psychrolib.GetSatVapPres(float(t)) for t in theta])


def test_saturation_pressure_over_water_and_ice():
    """Magnus (WMO 2008) against Hyland–Wexler (psychrolib). Tolerances: 0.4 % over water —
    the Magnus fit lies up to 0.3 % below Hyland–Wexler at 20–30 °C (measured when this test
    was written); 0.05 % over ice (measured 0.011 %). Taking the wrong phase would be 1 % off
    at −1 °C and 10 % at −10 °C."""
    water = np.arange(0.5, 30.0 + 1e-9, 0.5)
    ice = np.arange(-20.0, -0.5 + 1e-9, 0.5)
    rel_water = saturation_pressure_over_water(water) / ref_saturation(water) - 1.0
    rel_ice = saturation_pressure_over_ice(ice) / ref_saturation(ice) - 1.0
    assert np.max(np.abs(rel_water)) < 4e-3
    assert np.max(np.abs(rel_ice)) < 5e-4
    # the combined function takes the phase psychrolib takes on each side of 0 °C
    theta = np.concatenate([ice, water])
    rel = saturation_pressure(theta) / ref_saturation(theta) - 1.0
    assert np.max(np.abs(rel)) < 4e-3
    assert np.max(np.abs(rel[: ice.size])) < 5e-4


def test_saturation_over_ice_against_murphy_koop():
    """Over ice against Murphy & Koop (2005, Q. J. R. Meteorol. Soc. 131, eq. 7, from memory):
    ln p = 9.550426 − 5723.265/T + 3.53068·ln T − 0.00728332·T (T in K, p in Pa);
    within 0.05 %."""
    theta = np.arange(-20.0, 0.0, 0.5)
    t = theta + 273.15
    ref = np.exp(9.550426 - 5723.265 / t + 3.53068 * np.log(t) - 0.00728332 * t)
    assert np.max(np.abs(saturation_pressure(theta) / ref - 1.0)) < 5e-4


def test_dew_and_frost_point_on_a_grid():
    """Dew point (frost point below 0 °C) over θ_air −20…30 °C, RH 20…95 %: within 0.1 K of
    psychrolib's ``GetTDewPointFromRelHum`` at every grid point (the tolerance set for this
    check; the Magnus/Hyland–Wexler difference of ≤ 0.3 % in pressure is about 0.05 K in
    temperature)."""
    ref = np.array([[psychrolib.GetTDewPointFromRelHum(t, r) for r in RH] for t in THETA_AIR])
    got = dew_point(THETA_AIR[:, None], RH[None, :])  # one vectorised call for the grid
    assert got.shape == ref.shape
    assert np.max(np.abs(got - ref)) < 0.1
    assert (ref < 0.0).sum() > 100  # the grid exercises the frost point, not only the dew point
    # scalar calls give floats equal to the vectorised values
    one = dew_point(float(THETA_AIR[3]), float(RH[8]))
    assert isinstance(one, float) and one == got[3, 8]


def test_surface_humidity_of_faces_below_zero():
    """Surface RH of faces from −20 to 15 °C in a 20 °C / 50 % room, one vectorised call,
    against psychrolib's ``GetRelHumFromVapPres`` at the face temperature (over ice below
    0.01 °C); within 0.5 % (the saturation tolerances above, combined). Over water the faces
    below 0 °C would read up to 18 % lower."""
    faces = np.arange(-20.0, 15.0 + 1e-9, 0.5)
    pv = psychrolib.GetVapPresFromRelHum(20.0, 0.5)
    ref = np.array([psychrolib.GetRelHumFromVapPres(float(t), pv) for t in faces])
    got = surface_relative_humidity(20.0, 0.5, faces)
    assert got.shape == faces.shape
    assert np.max(np.abs(got / ref - 1.0)) < 5e-3
    # a face at the frost point is exactly saturated (the two functions share one basis)
    frost = dew_point(20.0, 0.12)
    assert frost < 0.0
    assert surface_relative_humidity(20.0, 0.12, frost) == pytest.approx(1.0, rel=1e-12)


def water_dew_point(theta: float, rh: float) -> float:
    """Dew point over (supercooled) water, °C: root of p_sat,water(T) = rh·p_sat(θ)."""
    pv = rh * saturation_pressure(theta)
    return brentq(lambda t: saturation_pressure_over_water(t) - pv, -60.0, 60.0, xtol=1e-12)


@pytest.mark.parametrize("rh", [0.08, 0.12, 0.18, 0.24])
def test_frost_point_lies_above_the_water_dew_point(rh):
    """Physics: below 0 °C the saturation pressure over ice is lower than over supercooled
    water (the latent heat of sublimation exceeds that of vaporisation; Clausius–Clapeyron),
    so moist air saturates over ice at a higher temperature. Checked for 20 °C room air with
    frost points between about −14 and −1 °C, and with psychrolib's frost point too."""
    frost = dew_point(20.0, rh)
    water = water_dew_point(20.0, rh)
    assert water < frost < 0.0
    # Clausius–Clapeyron near 0 °C: (0 − T_water)·L_v ≈ (0 − T_frost)·L_s, so the gap is about
    # (L_s/L_v − 1) = 2.83/2.50 − 1 ≈ 0.13 K per kelvin below 0 °C (latent heats at 0 °C in
    # MJ/kg, textbook values from memory); asserted with a margin
    assert frost - water > 0.08 * (-frost)
    assert psychrolib.GetTDewPointFromRelHum(20.0, rh) > water


def test_dew_and_frost_point_agree_at_zero():
    """At 0 °C both saturation pressures are 611.2 Pa (WMO 2008, from memory; the triple point
    is 611.657 Pa at 0.01 °C, IAPWS, also from memory): air holding exactly that vapour
    pressure has its dew point and frost point at 0 °C, and the dew point is continuous
    across it."""
    assert saturation_pressure_over_water(0.0) == pytest.approx(611.2, rel=1e-12)
    assert saturation_pressure_over_ice(0.0) == pytest.approx(611.2, rel=1e-12)
    rh0 = 611.2 / saturation_pressure(20.0)
    assert dew_point(20.0, rh0) == pytest.approx(0.0, abs=1e-9)
    assert water_dew_point(20.0, rh0) == pytest.approx(0.0, abs=1e-9)
    eps = 1e-7
    assert abs(dew_point(20.0, rh0 * (1 + eps)) - dew_point(20.0, rh0 * (1 - eps))) < 1e-4


def test_basis_is_stated():
    """The basis is named in words (it goes into summary.json and the report)."""
    assert "ice below" in SATURATION_BASIS and "water" in SATURATION_BASIS
