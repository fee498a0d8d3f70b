"""A section with a sloped material interface and a sloped exterior surface on the triangle
mesh (box method), against scikit-fem.

Source: independent library (scikit-fem P2 on its own mapped structured mesh, converged to
about 3e-7 in the heat flow between 40 and 80 elements across each layer;
see ``sloped_reference.py``). Checks: the heat flow within 0.2 % at a moderate mesh
(max_cell 20 mm), its error falling at an observed order near 2 in the mean edge length
(sqrt(area / nodes)) when every size is halved, the energy balance to round-off, and
temperatures on the sloped surface and at the interface within 0.002 K.
"""

from __future__ import annotations

import numpy as np
import pytest

from fvheat.mesh.triangles import build_triangle_mesh
from fvheat.simulate import simulate

from .helpers import load, observed_order, report
from .sloped_reference import HEIGHT, R0, R1, S0, S1, case_toml, solve

POINTS = np.array(
    [
        [0.5 * (R0 + R1), 0.5 * HEIGHT],  # middle of the sloped outside surface
        [S0 + 0.25 * (S1 - S0), 0.25 * HEIGHT],  # on the sloped interface
        [0.05, 0.3],  # inside the dense layer
    ]
)


@pytest.fixture(scope="module")
def reference():
    return solve(40, POINTS)


def test_heat_flow_and_order(tmp_path, reference):
    flows, _ = reference
    case = load(tmp_path, case_toml(0.02, 0.005))
    errors, sizes = [], []
    for refine in (1.0, 2.0, 4.0):
        sol = simulate(case, mesh=build_triangle_mesh(case, refine))
        assert sol.mesh.kind == "triangles"
        assert sol.balance.relative < 1e-10
        err = [abs(sol.surfaces[n].heat_flow / flows[n] - 1.0) for n in ("inside", "outside")]
        errors.append(max(err))
        sizes.append(np.sqrt(np.sum(sol.mesh.volumes) / sol.mesh.n_cells))
    order = observed_order(sizes, errors)
    report("sloped wedge heat flow (triangles)", errors=errors, order=order)
    assert errors[0] < 0.002
    assert 1.5 < order < 2.6


def test_temperatures(tmp_path, reference):
    _, at = reference
    toml = case_toml(0.02, 0.005) + "".join(
        f'\n[[probes]]\nname = "p{k}"\nat = [{float(x)!r}, {float(y)!r}]\n'
        for k, (x, y) in enumerate(POINTS)
    )
    sol = simulate(load(tmp_path, toml))
    got = np.array([sol.probes[f"p{k}"] for k in range(len(POINTS))])
    report("sloped wedge temperatures (triangles)", error=list(map(float, got - at)))
    np.testing.assert_allclose(got, at, atol=0.002)


def test_auto_takes_triangles_for_sloped_geometry(tmp_path):
    case = load(tmp_path, case_toml(0.02, 0.005, kind="auto"))
    assert simulate(case).mesh.kind == "triangles"
