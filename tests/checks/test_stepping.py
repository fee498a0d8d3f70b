"""Crank–Nicolson steps too long for a start out of balance are warned about.

Reference: the semi-infinite solid after a step change of its surface temperature
(Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, eq. 5.58 for the surface
heat flux, q'' = k·(T_s − T_i)/√(π·α·t); from memory). A 1 m concrete block (α = 8.3e-7
m²/s; the heat reaches about 0.13 m in 6 h, so 1 m is semi-infinite) starts at 10 °C and
its face is held at 30 °C. Backward Euler with 600 s steps gives the surface heat flow at
6 h within 2 % (its time error); Crank–Nicolson with the same steps, on cells of 1 mm at
the face, leaves the fastest modes undamped and reports hundreds of times the flux while
its energy balance still closes: the run warns, the backward-Euler run does not, nor a
Crank–Nicolson step below the bound the warning names.
"""

from __future__ import annotations

import math

import pytest
from casefiles import load

from fvheat.checks import check_model
from fvheat.mesh import build_mesh
from fvheat.study import run_study

K, RHO_C = 2.0, 2.4e6  # W/(m·K), J/(m³·K)
HEIGHT, T_I, T_S, END = 0.05, 10.0, 30.0, 21600.0

BLOCK = f"""
title = "concrete block, face heated by a step"
[mesh]
max_cell = 0.01
min_cell = 0.001
[materials.concrete]
conductivity = {K}
density = 2400
specific_heat = 1000
[[regions]]
material = "concrete"
box = [0.0, 0.0, 1.0, {HEIGHT}]
[[boundaries]]
name = "face"
edges = [[[0.0, 0.0], [0.0, {HEIGHT}]]]
temperature = {T_S}
[time]
duration = {END}
step = 600
initial_temperature = {T_I}
save_every = 3600
"""


def _exact_flow() -> float:
    """Incropera eq. 5.58 times the face height: W/m."""
    alpha = K / RHO_C
    return K * (T_S - T_I) / math.sqrt(math.pi * alpha * END) * HEIGHT


def _warned(warnings: list[str]) -> bool:
    return any("crank_nicolson" in w and "oscillate" in w for w in warnings)


@pytest.mark.parametrize("scheme", ["backward_euler", "crank_nicolson"])
def test_step_change_flux_and_warning(tmp_path, scheme):
    case = load(tmp_path, BLOCK, [f'time.scheme="{scheme}"'])
    study = run_study(case)
    flow = study.solution.surfaces["face"].heat_flow
    if scheme == "backward_euler":
        assert flow == pytest.approx(_exact_flow(), rel=0.02)
        assert not _warned(study.warnings)
    else:  # the oscillation the warning is about is real here
        assert flow > 10 * _exact_flow()
        assert _warned(study.warnings)


def test_short_steps_or_steady_start_not_warned(tmp_path):
    for overrides in (
        ['time.scheme="crank_nicolson"', "time.step=0.5", "time.save_every=3600"],
        ['time.scheme="crank_nicolson"', 'time.initial_temperature="steady"'],
    ):
        case = load(tmp_path, BLOCK, overrides)
        assert not _warned(check_model(case, build_mesh(case)))
