"""1-D multilayer wall against the ISO 6946 resistance method.

Source: ISO 6946 (thermal resistance of a plane wall: U = 1/(Rsi + Σ d/λ + Rse)); the
surface resistances Rsi = 0.13 and Rse = 0.04 m²·K/W are the conventional values of that
standard for horizontal heat flow (from memory). Interface temperatures follow from the
same series resistances (the temperature drop across each layer is in the ratio of its
resistance to the total): a hand calculation.

The wall, its layers and the temperatures are invented; they and the formulas are those of
``fvheat validate`` (fvheat/validation/wall.py), checked here against published values.
"""

from __future__ import annotations

import numpy as np
import pytest

from fvheat.validation import wall
from fvheat.validation.wall import HEIGHT, LAYERS, RSE, RSI, T_IN, T_OUT

from .helpers import probes_toml, report, run

X = np.concatenate([[0.0], np.cumsum([d for _, d, _ in LAYERS])])  # layer interfaces, m


def hand_calculation() -> tuple[float, np.ndarray]:
    """ISO 6946 U-value (W/(m²·K)) and the temperatures (°C) at the inside surface, every
    layer interface and the outside surface, from the resistance ratios (the formulas
    ``fvheat validate`` uses, with their source, in fvheat/validation/wall.py)."""
    return wall.u_value(), wall.temperatures()


def wall_case(probes: str = "") -> str:
    """The wall of ``fvheat validate`` (cells 0.5 mm at the interfaces, at most 10 mm)."""
    return wall.case_text() + probes


def test_iso6946_formulas_against_published_values():
    """The reference formulas themselves, from outside the project.

    - ISO 6946's conventional surface resistances for horizontal heat flow, R_si = 0.13 and
      R_se = 0.04 m²·K/W (from memory), are the ones used.
    - A single pane of 4 mm glass (λ = 1.0 W/(m·K), common practice): single glazing is
      tabulated at U = 5.8 W/(m²·K) (EN 673, with its own surface coefficients; from
      memory); ISO 6946's resistances give 1/(0.13 + 0.004 + 0.04) = 5.747, within 1 %.
    - The four-layer wall by hand, each term written out: R = 0.13 + 0.015/0.70 + 0.24/0.60
      + 0.12/0.035 + 0.01/0.87 + 0.04 = 0.13 + 0.021429 + 0.4 + 3.428571 + 0.011494 + 0.04
      = 4.031494 m²·K/W, U = 0.248047 W/(m²·K); θ_si = 20 − 25·0.248047·0.13 = 19.19385 °C.
    """
    assert (RSI, RSE) == (0.13, 0.04)
    assert wall.u_value((("glass", 0.004, 1.0),)) == pytest.approx(5.8, rel=0.01)
    assert wall.u_value((("glass", 0.004, 1.0),)) == pytest.approx(5.747, abs=5e-4)
    assert wall.u_value() == pytest.approx(1.0 / 4.031494, rel=1e-6)
    theta = wall.temperatures()
    assert theta[0] == pytest.approx(19.19385, abs=1e-5)
    # the outside surface: θ_se = θ_e + q·R_se = −5 + 25·0.248047·0.04
    assert theta[-1] == pytest.approx(-4.75195, abs=1e-5)


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_heat_flow_matches_iso6946(tmp_path, kind):
    """Heat flow = U·Δθ·height. Tolerance 0.1 % (the ISO 6946 method itself); in fact
    the finite-volume solution is exact here, so also 1e-9 relative: in 1-D the steady
    field is linear within each layer, every layer interface is a grid line, the face
    conductance between two cell centres is the series (harmonic) resistance of the two
    half cells, and the surface resistance is eliminated exactly at the boundary face, so
    the discrete equations are satisfied by the exact field; only round-off remains."""
    sol = run(tmp_path, wall_case(), [f"mesh.kind={kind}"])
    u, _ = hand_calculation()
    expected = u * (T_IN - T_OUT) * HEIGHT  # W/m
    q_in = sol.surfaces["inside"].heat_flow
    q_out = sol.surfaces["outside"].heat_flow
    rel_in = abs(q_in / expected - 1.0)
    rel_out = abs(-q_out / expected - 1.0)
    report(
        "wall_1d heat flow vs ISO 6946",
        U=u,
        expected_W_per_m=expected,
        fvheat=q_in,
        rel_error_inside=rel_in,
        rel_error_outside=rel_out,
    )
    assert rel_in <= 1e-3 and rel_out <= 1e-3  # ISO 6946 method accuracy
    assert rel_in <= 1e-9 and rel_out <= 1e-9  # FV is exact in 1-D (see docstring)


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_surface_temperatures_exact(tmp_path, kind):
    """Inside and outside surface (face) temperatures vs θ = θ_air ∓ q·R: exact (1e-9 K),
    for the reason given above."""
    sol = run(tmp_path, wall_case(), [f"mesh.kind={kind}"])
    _, theta = hand_calculation()
    err = [
        abs(sol.surfaces["inside"].min_temperature - theta[0]),
        abs(sol.surfaces["inside"].max_temperature - theta[0]),
        abs(sol.surfaces["outside"].min_temperature - theta[-1]),
        abs(sol.surfaces["outside"].max_temperature - theta[-1]),
    ]
    report(
        "wall_1d surface temperatures", theta_si=theta[0], theta_se=theta[-1], max_err_K=max(err)
    )
    assert max(err) <= 1e-9


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_interface_temperatures_by_probes(tmp_path, kind):
    """Probes on the three inner layer interfaces vs the resistance-ratio calculation.

    Tolerance 0.05 K on the stated grid (cells of 0.5 mm at every interface). On the grid a
    probe on an interface takes the centres of the better-conducting layer only (it does
    not interpolate across the kink in the temperature gradient), so it is off by half a
    cell times that layer's gradient (about 0.002 K here; interpolating across the
    interface gave 0.02 K). On the triangle mesh the interfaces are vertices: exact.
    Probes half way through each layer are bracketed by centres of that layer and are
    exact (1e-9 K)."""
    interfaces = {f"interface{i}": (X[i], 0.5 * HEIGHT) for i in range(1, len(LAYERS))}
    middles = {f"middle{i}": (0.5 * (X[i] + X[i + 1]), 0.5 * HEIGHT) for i in range(len(LAYERS))}
    sol = run(tmp_path, wall_case(probes_toml(interfaces | middles)), [f"mesh.kind={kind}"])
    u, theta = hand_calculation()
    q = u * (T_IN - T_OUT)
    err_if = [abs(sol.probes[f"interface{i}"] - theta[i]) for i in range(1, len(LAYERS))]
    r_half = [
        RSI + sum(d / lam for _, d, lam in LAYERS[:i]) + 0.5 * LAYERS[i][1] / LAYERS[i][2]
        for i in range(len(LAYERS))
    ]
    err_mid = [abs(sol.probes[f"middle{i}"] - (T_IN - q * r)) for i, r in enumerate(r_half)]
    report(
        "wall_1d interface probes",
        expected=list(map(float, theta[1:-1])),
        errors_K=err_if,
        mid_layer_errors_K=err_mid,
    )
    assert max(err_if) <= 0.05
    assert max(err_mid) <= 1e-9
