"""Transient: a semi-infinite solid whose surface meets air 20 K warmer at t = 0, through a
surface coefficient h, against the closed-form solution.

Source: Carslaw & Jaeger §2.7; Incropera & DeWitt eq. 5.60:
(θ − θ_i)/(θ_∞ − θ_i) = erfc(ξ) − exp(hx/k + h²αt/k²)·erfc(ξ + h√(αt)/k), ξ = x/(2√(αt)).
Material and times invented; a 1 m slab acts as semi-infinite for 6 h (rise < 1e-6 K).
"""

from __future__ import annotations

import numpy as np
from scipy.special import erfc, erfcx

from fvheat.validation.check import Check, solve

SOURCE = "closed form, Incropera & DeWitt eq. 5.60 (Carslaw & Jaeger §2.7)"
K, RHO, C = 1.4, 2100.0, 900.0  # W/(m·K), kg/m³, J/(kg·K)
ALPHA = K / (RHO * C)  # m²/s
H_SURF = 10.0  # W/(m²·K)
T_INIT, T_AIR = 0.0, 20.0  # °C
DEPTH, STRIP = 1.0, 0.002  # m
PROBE_DEPTH = 0.03  # m
DURATION, STEP = 6 * 3600.0, 60.0  # s


def exact(x: float, t: float) -> float:
    """Temperature (°C) at depth ``x`` m after ``t`` s; exp(A)·erfc(B) = exp(A − B²)·erfcx(B)."""
    root = np.sqrt(ALPHA * t)
    beta = H_SURF * root / K
    b = x / (2.0 * root) + beta
    a = H_SURF * x / K + beta**2
    return float(T_INIT + (T_AIR - T_INIT) * (erfc(x / (2.0 * root)) - np.exp(a - b**2) * erfcx(b)))


def case_text() -> str:
    """The slab as a case file (cells 2 mm at the surface growing to 20 mm)."""
    return f"""title = "semi-infinite solid, convective surface"
[mesh]
max_cell = 0.02
min_cell = {STRIP}
growth = 1.1
[materials.solid]
conductivity = {K}
density = {RHO}
specific_heat = {C}
[[regions]]
material = "solid"
box = [0.0, 0.0, {DEPTH}, {STRIP}]
[[boundaries]]
name = "surface"
edges = [[[0.0, 0.0], [0.0, {STRIP}]]]
air_temperature = {T_AIR}
resistance = {1.0 / H_SURF}
[[probes]]
name = "inside"
at = [{PROBE_DEPTH}, {STRIP / 2}]
[time]
duration = {DURATION}
step = {STEP}
initial_temperature = {T_INIT}
save_every = {DURATION}
"""


def checks() -> list[Check]:
    """Surface temperature and the temperature 30 mm deep after 6 h."""
    sol = solve(case_text(), "semi-infinite")
    name = "semi-infinite solid"
    return [
        Check(
            name,
            "θ surface, 6 h",
            "°C",
            exact(0.0, DURATION),
            sol.surfaces["surface"].min_temperature,
            0.05,
            SOURCE,
        ),
        Check(
            name,
            f"θ {1000 * PROBE_DEPTH:g} mm deep, 6 h",
            "°C",
            exact(PROBE_DEPTH, DURATION),
            float(sol.probes["inside"]),
            0.05,
            SOURCE,
        ),
    ]
