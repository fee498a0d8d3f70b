"""Freezing of a semi-infinite medium: the two-phase Neumann solution.

Source: Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §11.2 (Neumann's
solution, in ``neumann.py``); the same result in Incropera & DeWitt's phase-change
discussion. The analytic problem has an isothermal change at θ_f; the model releases the
latent heat over θ_f ± 0.05 K (a narrow range approximating it).

Material values are invented (a wet soil-like medium); the reference is exact for them.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from fvheat.case.load import parse_case
from fvheat.simulate import simulate

from .neumann import Neumann

K_S, K_L = 2.2, 1.5  # W/(m·K) frozen / unfrozen
RHO = 1800.0  # kg/m³
C_S, C_L = 900.0, 1400.0  # J/(kg·K)
LATENT = 1.0e5  # J/kg
T_INIT, T_WALL, T_F = 5.0, -10.0, 0.0  # °C
DURATION = 172_800.0  # s (two days)
DEPTH = 2.0  # m; the unfrozen diffusion length over two days is about 0.3 m

NEUMANN = Neumann(K_S, K_L, RHO, C_S, C_L, LATENT, T_INIT, T_WALL, T_F)
exact = NEUMANN.exact


def run(
    h: float,
    dt: float,
    half_range: float = 0.05,
    adaptive: float | None = None,
    kind: str = "rectilinear",
):
    """1-D strip of cells of size ``h`` (m), steps of ``dt`` (s), optional step doubling,
    on the grid or on triangles (``kind``)."""
    data = {
        "mesh": {"max_cell": h, "min_cell": h, "kind": kind},
        "materials": {
            "soil": {
                "conductivity": K_L,
                "density": RHO,
                "specific_heat": C_L,
                "latent_heat": LATENT,
                "phase_change": [T_F - half_range, T_F + half_range],
                "frozen": {"conductivity": K_S, "specific_heat": C_S},
            }
        },
        "regions": [{"material": "soil", "box": [0.0, 0.0, DEPTH, h]}],
        "boundaries": [{"name": "cold", "edges": [[[0.0, 0.0], [0.0, h]]], "temperature": T_WALL}],
        "probe_lines": [{"name": "x", "start": [0.0, h / 2], "end": [DEPTH, h / 2]}],
        "time": {
            "duration": DURATION,
            "step": dt,
            "initial_temperature": T_INIT,
            "save_every": DURATION,
        },
    }
    if adaptive is not None:
        data["time"]["adaptive_tolerance"] = adaptive
    return simulate(parse_case(data, Path("neumann.toml")))


@pytest.mark.slow
@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_neumann_front_and_temperatures_converge(kind):
    """Front within 2 % and temperatures within 0.1 K on h = 5 mm, Δt = 450 s; errors shrink
    with refinement (h and Δt halved together); on both meshes."""
    results = []
    for h, dt in [(0.02, 1800.0), (0.01, 900.0), (0.005, 450.0)]:
        s = run(h, dt, kind=kind)
        assert s.mesh.kind == kind
        t_exact, front = exact(s.mesh.centres[:, 0], DURATION)
        front_err = abs(s.history.phase[-1]["front_x"] - front) / front
        temp_err = float(np.max(np.abs(s.temperature - t_exact)))
        results.append((front_err, temp_err))
        print(f"\n[validation] Neumann {kind} h={h}: front {front_err:.3e}, {temp_err:.3e} K")
        assert s.balance.relative < 1e-8
    front_err, temp_err = results[-1]
    assert front_err < 0.02
    assert temp_err < 0.1
    # convergence: the temperature error falls with each refinement
    temps = [r[1] for r in results]
    assert temps[0] > temps[1] > temps[2]
    assert results[0][0] > results[-1][0]


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_neumann_coarse_grid_front_does_not_stall(kind):
    """On a coarse grid with a long step the front still advances close to the exact depth
    (within 5 %): the enthalpy iteration does not stall cell by cell. On the triangle mesh
    too, where each triangle's conductivity follows the mean liquid fraction of its
    vertices (frozen 2.2, unfrozen 1.5 W/(m·K))."""
    s = run(0.02, 3600.0, kind=kind)
    assert s.mesh.kind == kind
    _, front = exact(np.zeros(1), DURATION)
    assert abs(s.history.phase[-1]["front_x"] - front) / front < 0.05


def test_latent_energy_conservation():
    """Stored sensible + latent heat change equals the boundary heat input (≤ 1e-8 relative),
    here with Crank–Nicolson as well as backward Euler."""
    for scheme in ("backward_euler", "crank_nicolson"):
        data = {
            "mesh": {"max_cell": 0.02},
            "materials": {
                "soil": {
                    "conductivity": K_L,
                    "density": RHO,
                    "specific_heat": C_L,
                    "latent_heat": LATENT,
                    "phase_change": [-0.5, 0.0],
                    "frozen": {"conductivity": K_S, "specific_heat": C_S},
                },
                "slab": {"conductivity": 2.0, "density": 2300.0, "specific_heat": 1000.0},
            },
            "regions": [
                {"material": "soil", "box": [0.0, 0.0, 0.6, 0.4]},
                {"material": "slab", "box": [0.0, 0.3, 0.3, 0.4]},
            ],
            "boundaries": [
                {
                    "name": "air",
                    "edges": [[[0.0, 0.4], [0.6, 0.4]]],
                    "air_temperature": {"mean": -5.0, "amplitude": 8.0, "period": 86400.0},
                    "resistance": 0.04,
                },
                {"name": "deep", "edges": [[[0.0, 0.0], [0.6, 0.0]]], "temperature": 4.0},
            ],
            "time": {
                "duration": 86400.0,
                "step": 1800.0,
                "initial_temperature": 2.0,
                "save_every": 3600.0,
                "scheme": scheme,
            },
        }
        s = simulate(parse_case(data, Path("frost.toml")))
        assert s.balance.relative <= 1e-8, scheme
        assert abs(s.balance.stored) > 1e6  # a real exchange happened (J/m)


@pytest.mark.slow
def test_adaptive_steps_follow_the_small_step_solution():
    """Step doubling with a 0.01 K tolerance on 4-hour steps lands within 0.05 K of the same
    grid run with 225-s steps (the time-converged reference on that grid), while the plain
    4-hour run differs by more; output times are unchanged. (Self-convergence check.)"""
    reference = run(0.02, 225.0).temperature
    plain = run(0.02, 14_400.0)
    adaptive = run(0.02, 14_400.0, adaptive=0.01)
    assert adaptive.history.times == plain.history.times
    err_adaptive = float(np.max(np.abs(adaptive.temperature - reference)))
    err_plain = float(np.max(np.abs(plain.temperature - reference)))
    assert err_adaptive < 0.05 < err_plain
    assert adaptive.balance.relative < 1e-9
