"""Cell heat-flux vectors reconstructed from face flows.

Checks: (1) exactness for a uniform flux on a graded, non-convex mesh: by the divergence
theorem Σ_f (q·n_f A_f)(x_f − x_c) = q·V for any closed cell, so the reconstruction must return
q to round-off; (2) a two-layer wall between fixed temperatures, where Fourier's law with
layer resistances in series gives q = ΔT / Σ(d/λ) in every cell (Incropera & DeWitt,
Fundamentals of Heat and Mass Transfer, ch. 3, the plane composite wall).
"""

from __future__ import annotations

import numpy as np
import pytest

from fvheat.case.load import parse_case
from fvheat.evaluate.flux import cell_heat_flux, reconstruct_flux
from fvheat.mesh.rectilinear import build_mesh
from fvheat.simulate import simulate

from .conftest import CASES, coarse_overrides


def test_uniform_flux_is_reproduced_on_a_graded_l_shaped_mesh():
    from fvheat.case.load import load_case

    (path,) = [c for c in CASES if c.stem == "balcony_slab"]
    mesh = build_mesh(load_case(path, coarse_overrides(path)))
    q = np.array([3.7, -1.9])  # W/m², any constant vector
    face_flow = (mesh.face_normal @ q) * mesh.face_area  # owner → neighbour, W/m
    out_flow = (mesh.b_normal @ q) * mesh.b_area  # out of the body, W/m
    got = reconstruct_flux(mesh, face_flow, out_flow)
    np.testing.assert_allclose(got, np.broadcast_to(q, got.shape), rtol=0, atol=1e-12)


def two_layer_wall(tmp_path):
    text = """
title = "two-layer wall"
[mesh]
max_cell = 0.01
min_cell = 0.002
[materials.a]
conductivity = 0.8
[materials.b]
conductivity = 0.04
[[regions]]
material = "a"
box = [0.0, 0.0, 0.2, 0.5]
[[regions]]
material = "b"
box = [0.2, 0.0, 0.3, 0.5]
[[boundaries]]
name = "warm"
edges = [[[0.0, 0.0], [0.0, 0.5]]]
temperature = 20.0
[[boundaries]]
name = "cold"
edges = [[[0.3, 0.0], [0.3, 0.5]]]
temperature = -10.0
"""
    import tomllib

    return parse_case(tomllib.loads(text), tmp_path / "wall.toml")


def test_composite_wall_flux_matches_fourier(tmp_path):
    sol = simulate(two_layer_wall(tmp_path))
    q = cell_heat_flux(sol.system, sol.temperature)
    expected = (20.0 - (-10.0)) / (0.2 / 0.8 + 0.1 / 0.04)  # W/m², series resistances
    np.testing.assert_allclose(q[:, 0], expected, rtol=1e-9)
    np.testing.assert_allclose(q[:, 1], 0.0, atol=1e-9 * expected)
    assert sol.surfaces["warm"].heat_flow == pytest.approx(expected * 0.5, rel=1e-9)
