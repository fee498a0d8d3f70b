"""Crank–Nicolson started out of balance: the damped start (four backward-Euler quarter
steps, fvheat/solve/transient.py) keeps the stiff modes of fine cells from oscillating.

Reference: the semi-infinite solid after a step change of its surface temperature
(Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, eq. 5.58 for the surface
heat flux, q'' = k·(T_s − T_i)/√(π·α·t); from memory). A 1 m concrete block (α = 8.3e-7
m²/s; the heat reaches about 0.13 m in 6 h, so 1 m is semi-infinite) starts at 10 °C and
its face is held at 30 °C; cells of 1 mm at the face, 600 s steps. Without the damped
start Crank–Nicolson reported 2 862 W/m at 6 h (exact 8.4) and flipped sign every step.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from casefiles import load

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
save_every = 600
"""


def _exact_flow(t: np.ndarray) -> np.ndarray:
    """Incropera eq. 5.58 times the face height: W/m."""
    alpha = K / RHO_C
    return K * (T_S - T_I) / np.sqrt(math.pi * alpha * t) * HEIGHT


def _run(tmp_path, scheme: str):
    sol = run_study(load(tmp_path, BLOCK, [f'time.scheme="{scheme}"'])).solution
    assert sol.balance.relative <= 1e-9
    return np.array(sol.history.times), np.array(sol.history.flows)[:, 0]


def test_crank_nicolson_follows_the_exact_flux_from_the_first_hour(tmp_path):
    """Every saved surface heat flow from 1 h on within 1 % of eq. 5.58: no oscillation
    (each step's flow, saved every step, not a sign flip or a ±4 % zigzag)."""
    t, flow = _run(tmp_path, "crank_nicolson")
    late = t >= 3600.0
    np.testing.assert_allclose(flow[late], _exact_flow(t[late]), rtol=0.01)


def test_backward_euler_at_six_hours(tmp_path):
    """Backward Euler within 2 % at 6 h (its first-order time error is larger earlier)."""
    t, flow = _run(tmp_path, "backward_euler")
    assert flow[-1] == pytest.approx(_exact_flow(t[-1:])[0], rel=0.02)


def test_crank_nicolson_with_latent_heat_starts_damped(tmp_path):
    """The enthalpy stepper (phase change) takes the same damped start: with a melting
    range between the block's start and its face temperature, the face's heat flow stays
    within 10 % of backward Euler's on the same mesh at every saved time from the first
    hour on (without the start it alternated by ±3 700 W/m around some 20 W/m)."""
    latent = "latent_heat = 20000\nphase_change = [15.0, 16.0]\n"
    text = BLOCK.replace("specific_heat = 1000\n", "specific_heat = 1000\n" + latent)
    assert latent in text
    flows = {}
    for scheme in ("backward_euler", "crank_nicolson"):
        sol = run_study(load(tmp_path, text, [f'time.scheme="{scheme}"'])).solution
        assert sol.balance.relative <= 1e-9
        t = np.array(sol.history.times)
        flows[scheme] = np.array(sol.history.flows)[t >= 3600.0, 0]
    np.testing.assert_allclose(flows["crank_nicolson"], flows["backward_euler"], rtol=0.1)
