"""Grey-body radiation at an outside surface against an independent surface energy balance.

Source: the steady 1-D surface heat balance of a wall (Incropera & DeWitt §1.3.1, §3.1 and
eq. 1.7 for grey-body exchange with large surroundings: q = εσ(T_s⁴ − T_sur⁴)). With
R = Rsi + Σ d/λ the resistance from the inside air to the outside surface, the outside
surface temperature θs satisfies

    (θi − θs)/R + h_c(θe − θs) + εσ(T_sky⁴ − T_s⁴) + q_solar = 0        (T in kelvin)

which is solved here with scipy.optimize.brentq (σ and 0 °C = 273.15 K from scipy.constants).
In 1-D the conduction part of the finite-volume model is exact (see test_wall_1d), so the
model must reproduce this balance to the accuracy of its non-linear iteration: tolerances
1e-6 K on θs and 1e-8 relative on the heat flows.

Wall build-up and climate values are invented (sky temperature below the air temperature,
as on a clear night).
"""

from __future__ import annotations

import pytest
from scipy.constants import Stefan_Boltzmann as SIGMA
from scipy.constants import zero_Celsius
from scipy.optimize import brentq

from .helpers import report, run

T_IN, RSI = 20.0, 0.13  # °C, m²·K/W
T_AIR, T_SKY = -5.0, -25.0  # °C
H_C, EPS = 15.0, 0.9  # W/(m²·K), emissivity
LAYERS = [("concrete", 0.18, 2.0), ("eps", 0.10, 0.038)]  # name, d (m), λ (W/(m·K))
HEIGHT = 1.0  # m


def radiation_case(heat_flux: float | None) -> str:
    solar = "" if heat_flux is None else f"heat_flux = {heat_flux}"
    return f"""
title = "wall radiating to a cold sky"
[mesh]
max_cell = 0.02

[materials.concrete]
conductivity = 2.0
[materials.eps]
conductivity = 0.038

[[regions]]
material = "concrete"
box = [0.0, 0.0, 0.18, {HEIGHT}]
[[regions]]
material = "eps"
box = [0.18, 0.0, 0.28, {HEIGHT}]

[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, {HEIGHT}]]]
air_temperature = {T_IN}
resistance = {RSI}

[[boundaries]]
name = "outside"
edges = [[[0.28, 0.0], [0.28, {HEIGHT}]]]
air_temperature = {T_AIR}
convection = {H_C}
emissivity = {EPS}
radiant_temperature = {T_SKY}
{solar}
"""


def surface_balance(q_solar: float) -> tuple[float, float]:
    """Outside surface temperature (°C) and heat flow from the inside air (W/m²)."""
    r = RSI + sum(d / lam for _, d, lam in LAYERS)

    def residual(ts: float) -> float:
        tk, sky = ts + zero_Celsius, T_SKY + zero_Celsius
        return (T_IN - ts) / r + H_C * (T_AIR - ts) + EPS * SIGMA * (sky**4 - tk**4) + q_solar

    ts = brentq(residual, -150.0, 150.0, xtol=1e-14, rtol=1e-15)
    return ts, (T_IN - ts) / r


@pytest.mark.parametrize(
    ("label", "heat_flux"), [("night sky", None), ("with absorbed solar 400 W/m2", 400.0)]
)
@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_radiating_surface(tmp_path, label, heat_flux, kind):
    """Surface temperature ≤ 1e-6 K, heat flows (inside and outside) ≤ 1e-8 relative, on
    both meshes (1-D: the triangle mesh's P1 field is exact too)."""
    sol = run(tmp_path, radiation_case(heat_flux), [f"mesh.kind={kind}"])
    assert sol.mesh.kind == kind
    ts, q = surface_balance(heat_flux or 0.0)
    out = sol.surfaces["outside"]
    err_t = max(abs(out.min_temperature - ts), abs(out.max_temperature - ts))
    q_expected = q * HEIGHT  # W/m, into the body at the inside, out of it at the outside
    err_in = abs(sol.surfaces["inside"].heat_flow / q_expected - 1.0)
    err_out = abs(-out.heat_flow / q_expected - 1.0)
    report(
        f"radiation, {label}",
        theta_se=ts,
        q_W_per_m=q_expected,
        theta_se_error_K=err_t,
        rel_error_inside=err_in,
        rel_error_outside=err_out,
    )
    assert err_t <= 1e-6
    assert err_in <= 1e-8 and err_out <= 1e-8
