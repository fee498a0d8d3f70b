"""Euler's theorem for homogeneous functions as an independent check of the whole adjoint.

Scaling every conductivity and every surface coefficient h = 1/R by s scales every heat
flow by s and leaves the temperatures unchanged (pure conduction, fixed air temperatures,
no imposed flux, no radiation), so a heat flow Q is homogeneous of degree one in them and
Euler's homogeneous function theorem gives Σ_m λ_m ∂Q/∂λ_m + Σ_b h_b ∂Q/∂h_b = Q, i.e.
Σ λ ∂Q/∂λ − Σ R ∂Q/∂R = Q in the keys used here. L2D and ψ (with flanking U-values from
layer cuts, 1/U = R_si + Σ d/λ + R_se, equally homogeneous) follow the same rule; on the
jamb, whose frame and glazing U-values are given numbers, ψ is not homogeneous and only
the heat flows and L2D are checked. Exact: checked to 1e-9 relative.
"""

from __future__ import annotations

import pytest

from fvheat.sensitivity.result import Sensitivities
from tests.sensitivity.helpers import CASES, adjoint


def _euler_sum(sens: Sensitivities, quantity: str) -> float:
    total = 0.0
    for p in sens.parameters:
        d = sens.derivative(quantity, p.key)
        total += -p.value * d if p.kind in ("resistance", "condensation") else p.value * d
    return total


@pytest.mark.parametrize(
    ("name", "junction"),
    [
        ("balcony_slab.toml", ["L2D", "psi"]),
        ("wall_window_junction.toml", ["L2D"]),
        ("eaves_pitched_roof.toml", ["L2D", "psi"]),  # the triangle mesh (box method)
    ],
)
def test_sum_rule(name: str, junction: list[str]) -> None:
    sens = adjoint(CASES / name)
    quantities = [q for q in sens.quantities if q.startswith("heat_flow_")] + junction
    for q in quantities:
        value = sens.quantities[q][0]
        if value == 0.0:
            continue
        assert _euler_sum(sens, q) == pytest.approx(value, rel=1e-9), q


def test_sum_rule_fails_when_a_term_is_left_out() -> None:
    """The rule is sharp: without the surface terms the sum misses Q by far more."""
    sens = adjoint(CASES / "balcony_slab.toml")
    partial = sum(
        p.value * sens.derivative("psi", p.key) for p in sens.parameters if p.kind == "conductivity"
    )
    assert abs(partial - sens.quantities["psi"][0]) > 1e-3


@pytest.mark.parametrize(
    "name", ["balcony_slab.toml", "wall_window_junction.toml", "eaves_pitched_roof.toml"]
)
def test_surface_temperature_is_homogeneous_of_degree_zero(name: str) -> None:
    """The same scaling leaves every temperature unchanged, so θ_si,min is homogeneous of
    degree zero: Σ λ ∂θ/∂λ − Σ R ∂θ/∂R = 0, the sum running over the condensation
    resistances of the surface-temperature solve (junction.condensation_resistance) too.
    Without them the sum is far from zero: the check sees that key's derivative."""
    sens = adjoint(CASES / name)
    theta = sens.quantities["theta_si_min"][0]
    assert abs(_euler_sum(sens, "theta_si_min")) <= 1e-9 * abs(theta)
    without = sum(
        (-p.value if p.kind == "resistance" else p.value) * sens.derivative("theta_si_min", p.key)
        for p in sens.parameters
        if p.kind != "condensation"
    )
    assert abs(without) > 0.5  # K: the condensation resistance moves θ_si,min by kelvins
