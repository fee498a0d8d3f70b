"""The main results of one run, taken from its ``summary.json``: the columns of sweep tables."""

from __future__ import annotations

from typing import Any

#: junction quantities reported when the case declares a junction (U_f only for frames)
JUNCTION_KEYS = ("L2D", "psi", "U_f", "f_Rsi", "theta_si_min")

#: summary fields that measure time taken, not results: never part of a table, so that
#: tables of repeated runs compare equal
TIMING_FIELDS = frozenset({"solve_seconds"})


def main_results(summary: dict[str, Any]) -> dict[str, float]:
    """``heat_flow_<boundary>`` (W/m) for every boundary, then L2D, ψ (W/(m·K)), U_f,
    f_Rsi and θ_si,min (°C) when present, then ``temperature_<probe>`` (°C)."""
    out: dict[str, float] = {}
    for name, b in summary.get("boundaries", {}).items():
        out[f"heat_flow_{name}"] = b["heat_flow"]
    junction = summary.get("junction") or {}
    for key in JUNCTION_KEYS:
        if junction.get(key) is not None:
            out[key] = junction[key]
    for name, t in summary.get("probes", {}).items():
        out[f"temperature_{name}"] = t
    return out
