"""Transient: a semi-infinite solid whose surface meets air 20 K warmer at t = 0, through a
surface coefficient h, against the closed-form solution.

Source: Carslaw & Jaeger §2.7; Incropera & DeWitt eq. 5.60:
(θ − θ_i)/(θ_∞ − θ_i) = erfc(ξ) − exp(hx/k + h²αt/k²)·erfc(ξ + h√(αt)/k), ξ = x/(2√(αt)).
Material and times invented; a 1 m slab acts as semi-infinite for 6 h (rise < 1e-6 K).
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt
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


def exact(
    x: npt.ArrayLike,
    t: float,
    k: float = K,
    alpha: float = ALPHA,
    h: float = H_SURF,
    t_init: float = T_INIT,
    t_air: float = T_AIR,
) -> np.ndarray:
    """Temperature (°C) at depths ``x`` m after ``t`` s (Incropera eq. 5.60) of a solid of
    conductivity ``k`` W/(m·K) and diffusivity ``alpha`` m²/s, surface coefficient ``h``
    W/(m²·K); exp(A)·erfc(B) is evaluated as exp(A − B²)·erfcx(B)."""
    x = np.asarray(x, dtype=float)
    root = np.sqrt(alpha * t)
    xi = x / (2.0 * root)
    beta = h * root / k
    b = xi + beta
    a = h * x / k + beta**2
    return np.asarray(t_init + (t_air - t_init) * (erfc(xi) - np.exp(a - b**2) * erfcx(b)))


def case_text(
    max_cell: float = 0.02,
    min_cell: float = STRIP,
    step: float = STEP,
    save_every: float = DURATION,
    probes: dict[str, float] | None = None,
) -> str:
    """The slab as a case file: a strip ``min_cell`` m high, cells ``min_cell`` at the
    surface growing to ``max_cell``, steps of ``step`` s, probes at the depths (m) of
    ``probes`` (default: "inside" at PROBE_DEPTH)."""
    depths = {"inside": PROBE_DEPTH} if probes is None else probes
    probe_text = "".join(
        f'[[probes]]\nname = "{name}"\nat = [{d!r}, {min_cell / 2!r}]\n'
        for name, d in depths.items()
    )
    return f"""title = "semi-infinite solid, convective surface"
[mesh]
max_cell = {max_cell}
min_cell = {min_cell}
growth = 1.1
[materials.solid]
conductivity = {K}
density = {RHO}
specific_heat = {C}
[[regions]]
material = "solid"
box = [0.0, 0.0, {DEPTH}, {min_cell}]
[[boundaries]]
name = "surface"
edges = [[[0.0, 0.0], [0.0, {min_cell}]]]
air_temperature = {T_AIR}
resistance = {1.0 / H_SURF}
{probe_text}[time]
duration = {DURATION}
step = {step}
initial_temperature = {T_INIT}
save_every = {save_every}
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
            float(exact(0.0, DURATION)),
            sol.surfaces["surface"].min_temperature,
            0.05,
            SOURCE,
        ),
        Check(
            name,
            f"θ {1000 * PROBE_DEPTH:g} mm deep, 6 h",
            "°C",
            float(exact(PROBE_DEPTH, DURATION)),
            float(sol.probes["inside"]),
            0.05,
            SOURCE,
        ),
    ]
