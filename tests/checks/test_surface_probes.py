"""A grid probe on a surface reports the adjacent cell, not the surface: warned.

Premise checked against the 1-D layered wall (series resistances, ISO 6946 form, by hand):
a probe at the inside surface of an insulation layer reads the first cell's temperature,
which differs from the surface temperature R_si·q below θ_i by the drop across half a cell.
"""

from __future__ import annotations

import pytest
from casefiles import load

from fvheat.checks import check_model
from fvheat.mesh import build_mesh
from fvheat.simulate import simulate

K, D, H = 0.04, 0.2, 0.02  # W/(m·K), m thick, m cells
T_IN, T_OUT, R_SI, R_SE = 20.0, -5.0, 0.13, 0.04

WALL = f"""
title = "insulation layer"
[mesh]
max_cell = {H}
min_cell = {H}
[materials.wool]
conductivity = {K}
[[regions]]
material = "wool"
box = [0.0, 0.0, {D}, 0.2]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.2]]]
air_temperature = {T_IN}
resistance = {R_SI}
[[boundaries]]
name = "outside"
edges = [[[{D}, 0.0], [{D}, 0.2]]]
air_temperature = {T_OUT}
resistance = {R_SE}
[[probes]]
name = "on_surface"
at = [0.0, 0.1]
[[probes]]
name = "near_surface"
at = [{0.3 * H}, 0.1]
[[probes]]
name = "mid"
at = [{D / 2}, 0.1]
"""


def _warned(warnings: list[str]) -> set[str]:
    return {w.split("'")[1] for w in warnings if "within half a cell of the surface" in w}


def test_probes_on_or_near_a_surface_are_warned_on_the_grid(tmp_path):
    case = load(tmp_path, WALL)
    assert _warned(check_model(case, build_mesh(case))) == {"on_surface", "near_surface"}
    sol = simulate(case)
    q = (T_IN - T_OUT) / (R_SI + D / K + R_SE)  # W/m², the 1-D series value
    surface = T_IN - R_SI * q
    first_cell = surface - q * (H / 2) / K
    assert sol.probes["on_surface"] == pytest.approx(first_cell, abs=1e-9)
    assert abs(sol.probes["on_surface"] - surface) > 0.1  # what the warning is about


def test_no_warning_on_triangles(tmp_path):
    case = load(tmp_path, WALL, ['mesh.kind="triangles"'])
    assert _warned(check_model(case, build_mesh(case))) == set()
