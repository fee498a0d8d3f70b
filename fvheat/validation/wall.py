"""A four-layer wall, 1-D, against the ISO 6946 resistance method (a hand calculation).

Source: ISO 6946, U = 1/(R_si + Σ d/λ + R_se), with the conventional R_si = 0.13 and
R_se = 0.04 m²·K/W for horizontal heat flow (from memory); the temperature drop across
each part is in the ratio of its resistance to the total. Layers and temperatures invented.
"""

from __future__ import annotations

import numpy as np

from fvheat.validation.check import Check, solve

SOURCE = "ISO 6946 resistance method, hand calculation (R_si, R_se from memory)"
RSI, RSE = 0.13, 0.04  # m²·K/W
T_IN, T_OUT = 20.0, -5.0  # °C
HEIGHT = 1.0  # m
#: name, thickness d (m), conductivity λ (W/(m·K)); invented
LAYERS = (
    ("plaster", 0.015, 0.70),
    ("brick", 0.24, 0.60),
    ("mineral_wool", 0.12, 0.035),
    ("render", 0.01, 0.87),
)


Layer = tuple[str, float, float]


def u_value(layers: tuple[Layer, ...] = LAYERS, rsi: float = RSI, rse: float = RSE) -> float:
    """ISO 6946: U = 1/(R_si + Σ d/λ + R_se), W/(m²·K), of ``layers`` (name, d m, λ W/(m·K))."""
    return 1.0 / (rsi + sum(d / lam for _, d, lam in layers) + rse)


def temperatures(
    layers: tuple[Layer, ...] = LAYERS,
    rsi: float = RSI,
    rse: float = RSE,
    t_in: float = T_IN,
    t_out: float = T_OUT,
) -> np.ndarray:
    """Temperatures (°C) at the inside surface, every layer interface and the outside
    surface: the drop to each is q·(R_si + the resistances passed), q = U·(θ_i − θ_e)."""
    q = u_value(layers, rsi, rse) * (t_in - t_out)  # W/m²
    r_cum = rsi + np.concatenate([[0.0], np.cumsum([d / lam for _, d, lam in layers])])
    return t_in - q * r_cum


def case_text() -> str:
    """The wall as a case file."""
    parts = ['title = "four-layer wall"\n[mesh]\nmax_cell = 0.01\nmin_cell = 0.0005\n']
    x = 0.0
    for name, d, lam in LAYERS:
        parts.append(f"[materials.{name}]\nconductivity = {lam!r}\n")
        parts.append(f'[[regions]]\nmaterial = "{name}"\nbox = [{x!r}, 0.0, {x + d!r}, {HEIGHT}]\n')
        x += d
    parts.append(
        f'[[boundaries]]\nname = "inside"\nedges = [[[0.0, 0.0], [0.0, {HEIGHT}]]]\n'
        f"air_temperature = {T_IN}\nresistance = {RSI}\n"
        f'[[boundaries]]\nname = "outside"\nedges = [[[{x!r}, 0.0], [{x!r}, {HEIGHT}]]]\n'
        f"air_temperature = {T_OUT}\nresistance = {RSE}\n"
    )
    return "".join(parts)


def checks() -> list[Check]:
    """Heat flow through the wall and the inside surface temperature."""
    q = u_value() * (T_IN - T_OUT)  # W/m²
    sol = solve(case_text(), "wall")
    inside = sol.surfaces["inside"]
    name = "1-D wall"
    return [
        Check(name, "heat flow", "W/m", q * HEIGHT, inside.heat_flow, 1e-3, SOURCE, True),
        Check(name, "θ_si", "°C", T_IN - q * RSI, inside.min_temperature, 0.01, SOURCE),
    ]
