"""Axis labels with units for sweep plots: varied case keys (as ``--set`` takes them) and
result columns (as the sweep table names them)."""

from __future__ import annotations

import re

#: unit of a case key, by its last named part (lengths: see LENGTH_PARTS)
KEY_UNITS = {
    "conductivity": "W/(m·K)",
    "density": "kg/m³",
    "specific_heat": "J/(kg·K)",
    "latent_heat": "J/kg",
    "resistance": "m²·K/W",
    "condensation_resistance": "m²·K/W",
    "floor_resistance": "m²·K/W",
    "convection": "W/(m²·K)",
    "heat_flux": "W/m²",
    "u_value": "W/(m²·K)",
    "air_temperature": "°C",
    "radiant_temperature": "°C",
    "temperature": "°C",
    "initial_temperature": "°C",
    "mean": "°C",
    "amplitude": "K",
    "indoor_humidity": "% RH",
    "duration": "s",
    "step": "s",
    "save_every": "s",
    "period": "s",
    "phase": "s",
    "emissivity": "–",
    "f_rsi_limit": "–",
    "growth": "–",
}
#: keys whose values are lengths, in the case file's length unit ([geometry] units)
LENGTH_PARTS = frozenset(
    {
        "box",
        "polygon",
        "at",
        "edges",
        "cut",
        "start",
        "end",
        "length",
        "width",
        "max_cell",
        "min_cell",
        "corner_cell",
        "frame_width",
        "floor_edge",
        "ground_level",
        "wall_outside",
        "wall_thickness",
        "internal",
        "external",
        "overall_internal",
    }
)
#: unit of a result column, by its name or the start of its name
RESULT_UNITS = (
    ("heat_flow_", "W/m"),
    ("L2D", "W/(m·K)"),
    ("psi", "W/(m·K)"),
    ("U_f", "W/(m²·K)"),
    ("f_Rsi", "–"),
    ("f_min_over_run", "–"),
    ("theta_si_min", "°C"),
    ("temperature_", "°C"),
    ("min_temperature_over_run_", "°C"),
    ("max_temperature_over_run_", "°C"),
    ("max_frozen_area", "m²"),
    ("max_front", "m"),
)


def key_unit(key: str, length_unit: str = "m") -> str | None:
    """The unit of the dotted case ``key`` (None when not known): the last part that is a
    name decides (``regions.2.box.0`` is a length)."""
    names = [p for p in key.split(".") if not re.fullmatch(r"-?\d+", p)]
    for part in reversed(names):
        if part in KEY_UNITS:
            return KEY_UNITS[part]
        if part in LENGTH_PARTS:
            return length_unit
    return None


def result_unit(column: str) -> str | None:
    """The unit of a sweep result ``column`` (None when not known)."""
    for start, unit in RESULT_UNITS:
        if column == start or (start.endswith("_") and column.startswith(start)):
            return unit
    return None


def with_unit(name: str, unit: str | None) -> str:
    """'name (unit)', or the name alone when the unit is not known or dimensionless."""
    return f"{name} ({unit})" if unit and unit != "–" else name
