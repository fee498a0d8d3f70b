"""Every adjoint derivative against a central finite difference of two full runs.

Reference: the central difference (q(p + δ) − q(p − δ))/(2δ), δ = 1e-4·p, of two complete
runs with ``--set KEY=p±δ`` (new load, mesh, solve and evaluation each), an independent
route to the same derivative (truncation error O(δ²) ≈ 1e-8 relative). Tolerance 0.5 %
(the issue's acceptance bound); the derivatives actually agree to about 1e-6.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.sensitivity.helpers import CASES, adjoint, radiating_balcony, results

STEP = 1e-4
TOLERANCE = 0.005


def _check_every_derivative(path: Path) -> int:
    sens = adjoint(path)
    checked = 0
    for p in sens.parameters:
        h = STEP * p.value
        up = results(path, (f"{p.key}={p.value + h!r}",))
        down = results(path, (f"{p.key}={p.value - h!r}",))
        for q, (value, entries) in sens.quantities.items():
            fd = (up[q] - down[q]) / (2 * h)
            ad = entries[p.key].derivative
            # quantities that do not depend on a key: both ~0 (elasticity below 1e-7)
            floor = 1e-7 * abs(value) / p.value
            assert abs(ad - fd) <= TOLERANCE * abs(fd) + floor, (q, p.key, ad, fd)
            checked += 1
    return checked


@pytest.mark.slow
@pytest.mark.parametrize(
    "name", ["balcony_slab.toml", "wall_window_junction.toml", "window_frame_section.toml"]
)
def test_demo_case(name: str) -> None:
    assert _check_every_derivative(CASES / name) > 40


@pytest.mark.slow
def test_triangle_mesh_demo() -> None:
    """The pitched-roof eaves run on the triangle mesh (box method: G = w·k per triangle,
    the unknown on the surface): the same differences, the mesh identical in both runs."""
    assert _check_every_derivative(CASES / "eaves_pitched_roof.toml") > 20


@pytest.mark.slow
def test_radiating_boundary(tmp_path: Path) -> None:
    """The ceiling radiates: the adjoint runs on the Newton Jacobian at the solution."""
    path = radiating_balcony(tmp_path)
    sens = adjoint(path)
    assert "boundaries.inside_ceiling.convection" in sens.quantities["psi"][1]
    assert _check_every_derivative(path) > 40


def test_boundary_replaced_in_the_surface_solve_has_no_effect_there() -> None:
    """The balcony's inside surfaces take the condensation resistance (0.25) in the
    surface-temperature solve, so their own resistance cannot move θ_si,min (exactly 0),
    while the outside one does (checked against differences above)."""
    sens = adjoint(CASES / "balcony_slab.toml")
    assert sens.derivative("theta_si_min", "boundaries.inside_wall.resistance") == 0.0
    assert sens.derivative("theta_si_min", "boundaries.outside.resistance") > 0.0


@pytest.mark.parametrize(
    ("name", "keys"),
    [
        ("balcony_slab.toml", ["junction.condensation_resistance"]),
        (
            "wall_window_junction.toml",
            [
                "junction.condensation_resistance.inside_wall",
                "junction.condensation_resistance.inside_window",
            ],
        ),
    ],
)
def test_condensation_resistance(name: str, keys: list[str]) -> None:
    """f_Rsi and θ_si,min come from a solve with the junction's own inside resistances
    (one value for every checked surface on the balcony, one per surface on the jamb):
    their derivatives against differences of full runs; the heat-loss results do not
    depend on them (exactly 0)."""
    path = CASES / name
    sens = adjoint(path)
    assert [p.key for p in sens.parameters if p.kind == "condensation"] == keys
    for p in sens.parameters:
        if p.kind != "condensation":
            continue
        h = STEP * p.value
        up = results(path, (f"{p.key}={p.value + h!r}",))
        down = results(path, (f"{p.key}={p.value - h!r}",))
        for q in ("theta_si_min", "f_Rsi"):
            fd = (up[q] - down[q]) / (2 * h)
            assert sens.derivative(q, p.key) == pytest.approx(fd, rel=TOLERANCE), (q, p.key)
            assert abs(fd) > 1e-3  # it matters
        for q in ("psi", "L2D", *(k for k in sens.quantities if k.startswith("heat_flow_"))):
            assert sens.derivative(q, p.key) == 0.0


def test_no_condensation_key_when_f_rsi_uses_the_heat_loss_resistances() -> None:
    """The frame asks for its heat-loss resistances (``"heat_loss"``): no such key."""
    sens = adjoint(CASES / "window_frame_section.toml")
    assert not [p for p in sens.parameters if p.kind == "condensation"]
