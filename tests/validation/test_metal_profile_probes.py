"""Point temperatures at the corners of a thin metal profile, on both meshes.

Source: independent library (scikit-fem P2 on a tensor mesh graded to 50 µm at every box
edge, ``fem_reference.solve_boxes``; halving its sizes moves these points by 3e-5 K).
The section is invented: a 2 mm aluminium fin (λ = 160) reaching 70 mm from the warm
surface into 100 mm of insulation (λ = 0.035), R_si = 0.13, R_se = 0.04 m²·K/W,
20 / −10 °C. At the fin's tip corners the field has a kink in its gradient in both
directions; a probe that averaged the metal's and the insulation's cell centres was 1.6 K
off at 10 mm cells. Tolerance: 0.05 K at the densities the README recommends for metal
profiles (max_cell 5 mm, min_cell 1 mm), on the rectilinear grid and on the triangles.
"""

from __future__ import annotations

import numpy as np
import pytest
from fem_reference import solve_boxes

from fvheat.simulate import simulate

from .helpers import load, probes_toml, report

CASE = """
title = "aluminium fin in insulation"
[mesh]
max_cell = 0.005
min_cell = 0.001
[materials.insulation]
conductivity = 0.035
[materials.aluminium]
conductivity = 160.0
[[regions]]
material = "insulation"
box = [0.0, 0.0, 0.1, 0.2]
[[regions]]
material = "aluminium"
box = [0.0, 0.09, 0.07, 0.092]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.2]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.1, 0.0], [0.1, 0.2]]]
air_temperature = -10.0
resistance = 0.04
"""
POINTS = {"lower_corner": (0.07, 0.09), "upper_corner": (0.07, 0.092), "tip": (0.07, 0.091)}


@pytest.fixture(scope="module")
def reference(tmp_path_factory):
    case = load(tmp_path_factory.mktemp("ref"), CASE)
    return solve_boxes(case, h=0.004, h0=5e-5).at(np.array(list(POINTS.values())).T)


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_profile_corner_temperatures(tmp_path, reference, kind):
    sol = simulate(load(tmp_path, CASE + probes_toml(POINTS), [f"mesh.kind={kind}"]))
    assert sol.mesh.kind == kind
    got = np.array([sol.probes[n] for n in POINTS])
    report(f"metal profile corners, {kind}", error_K=list(map(float, got - reference)))
    np.testing.assert_allclose(got, reference, atol=0.05)
