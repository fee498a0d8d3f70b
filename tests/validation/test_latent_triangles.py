"""Latent heat on the triangle mesh: freezing of a semi-infinite medium (Neumann).

Source: Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §11.2 (Neumann's
two-phase solution, ``neumann.py``, shared with ``test_neumann.py``, which runs two
conductivities on both meshes), here with one conductivity in both phases. The model
releases the latent heat over θ_f ± 0.05 K. Material values are invented (a wet soil-like medium).
Checks, on both meshes: the front within 2 % and temperatures within 0.1 K after two days
on 5 mm cells and 450 s steps (the 2 m strip is semi-infinite for two days: the exact
rise at its far end is below 1e-3 K), and the energy balance (stored sensible + latent change =
heat through the cold face) to 1e-8.
"""

from __future__ import annotations

import numpy as np
import pytest

from .helpers import load
from .neumann import Neumann

K = 1.8  # W/(m·K), both phases
RHO, C_S, C_L, LATENT = 1800.0, 900.0, 1400.0, 1.0e5
T_INIT, T_WALL, T_F = 5.0, -10.0, 0.0
DURATION, DEPTH, HEIGHT = 172_800.0, 2.0, 0.02
#: Neumann's solution with the same conductivity in both phases
exact = Neumann(K, K, RHO, C_S, C_L, LATENT, T_INIT, T_WALL, T_F).exact


CASE = f"""
title = "freezing strip"
[mesh]
max_cell = 0.005
min_cell = 0.005
[materials.soil]
conductivity = {K}
density = {RHO}
specific_heat = {C_L}
latent_heat = {LATENT}
phase_change = [{T_F - 0.05}, {T_F + 0.05}]
frozen = {{ specific_heat = {C_S} }}
[[regions]]
material = "soil"
box = [0.0, 0.0, {DEPTH}, {HEIGHT}]
[[boundaries]]
name = "cold"
edges = [[[0.0, 0.0], [0.0, {HEIGHT}]]]
temperature = {T_WALL}
[[probe_lines]]
name = "x"
start = [0.0, {HEIGHT / 2}]
end = [{DEPTH}, {HEIGHT / 2}]
[time]
duration = {DURATION}
step = 450.0
initial_temperature = {T_INIT}
save_every = {DURATION}
"""


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_freezing_front_on_both_meshes(tmp_path, kind):
    from fvheat.simulate import simulate

    s = simulate(load(tmp_path, CASE, [f"mesh.kind={kind}"]))
    assert s.mesh.kind == kind
    t_exact, front = exact(s.mesh.centres[:, 0], DURATION)
    front_err = abs(s.history.phase[-1]["front_x"] - front) / front
    temp_err = float(np.max(np.abs(s.temperature - t_exact)))
    print(
        f"\n[validation] Neumann, one conductivity, {kind}: front {front_err:.3e}, "
        f"temperature {temp_err:.3e} K, balance {s.balance.relative:.1e}"
    )
    assert front_err < 0.02
    assert temp_err < 0.1
    assert s.balance.relative < 1e-8
