"""Saturation vapour pressure, on which dew points and surface humidity rest, against
tabulated values."""

from __future__ import annotations

from fvheat.evaluate.humidity import saturation_pressure
from fvheat.validation.check import Check


def checks() -> list[Check]:
    """Over water at 20 °C and over ice at −10 °C."""
    return [
        Check(
            "saturation pressure",
            "p_sat water, 20 °C",
            "Pa",
            2339.2,
            float(saturation_pressure(20.0)),
            5e-3,
            "IAPWS steam tables, 2.3392 kPa (from memory)",
            relative=True,
        ),
        Check(
            "saturation pressure",
            "p_sat ice, −10 °C",
            "Pa",
            259.9,
            float(saturation_pressure(-10.0)),
            5e-3,
            "Murphy & Koop (2005), 259.9 Pa (from memory)",
            relative=True,
        ),
    ]
