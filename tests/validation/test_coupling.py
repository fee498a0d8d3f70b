"""Coupling coefficients between three environments (ISO 10211) and weighting factors.

The junction is invented: an external wall (masonry λ = 0.8 with external insulation
λ = 0.04) with a concrete partition (λ = 1.6) between two rooms running into the masonry;
room A at 20 °C, room B at 16 °C, outside −5 °C; R_si 0.13, R_se 0.04 m²·K/W (ISO 6946,
common practice).

1. Symmetry L_ij = L_ji (reciprocity of the linear steady problem) and rows summing to
   the diagonal, the heat flow into the body from one environment at 1 K (energy
   conservation): both to 1e-9 relative to the largest entry (round-off). The L-based heat
   flows at the case's temperatures equal those of the direct solve to 1e-9 (linearity).
2. L_ij against an independent finite-element solve (scikit-fem P2, one solve per
   environment at 1 K, heat flows by the functional ∫(θ_air − θ)/R ds): within 1 %.
   Source: independent library.
3. θ at each environment's coldest surface point from the weighting factors,
   θ = Σ g_j·θ_j, equals a direct solve at other environment temperatures to 1e-9 K
   (linearity of the problem; the same discretisation, a separate solve).
"""

from __future__ import annotations

import numpy as np
import pytest
from fem_reference import solve_boxes

from fvheat.evaluate.surfaces import surface_points
from fvheat.study import run_study

from .helpers import load, report, toml_list

T = {"room_a": 20.0, "room_b": 16.0, "outside": -5.0}
ROOMS = {  # environment: boundaries
    "room_a": ["room_a_wall", "room_a_partition"],
    "room_b": ["room_b_wall", "room_b_partition"],
    "outside": ["outside"],
}
EDGES = {
    "room_a_wall": [((0.0, 0.05), (0.0, 1.5))],
    "room_a_partition": [((-1.5, 0.05), (0.0, 0.05))],
    "room_b_wall": [((0.0, -1.5), (0.0, -0.05))],
    "room_b_partition": [((-1.5, -0.05), (0.0, -0.05))],
    "outside": [((0.3, -1.5), (0.3, 1.5))],
}
ENV_OF = {b: e for e, bs in ROOMS.items() for b in bs}


def _segs(segs) -> str:
    return "[" + ", ".join(f"[{toml_list(a)}, {toml_list(b)}]" for a, b in segs) + "]"


def case_text() -> str:
    bounds = "".join(
        f'\n[[boundaries]]\nname = "{n}"\nedges = {_segs(e)}\n'
        f"air_temperature = {T[ENV_OF[n]]}\nresistance = {0.04 if n == 'outside' else 0.13}\n"
        for n, e in EDGES.items()
    )
    envs = "".join(
        f'\n[[junction.environments]]\nname = "{e}"\nboundaries = {list(bs)!r}\n'.replace("'", '"')
        for e, bs in ROOMS.items()
    )
    return f"""
title = "partition meeting an external wall: three environments"
[mesh]
max_cell = 0.02
min_cell = 0.002
[materials.masonry]
conductivity = 0.8
[materials.insulation]
conductivity = 0.04
[materials.concrete]
conductivity = 1.6
[[regions]]
material = "masonry"
box = [0.0, -1.5, 0.2, 1.5]
[[regions]]
material = "insulation"
box = [0.2, -1.5, 0.3, 1.5]
[[regions]]
material = "concrete"
box = [-1.5, -0.05, 0.2, 0.05]
{bounds}
[junction]
{envs}
"""


@pytest.fixture(scope="module", params=["rectilinear", "triangles"])
def coupled(tmp_path_factory, request):
    """The case on each mesh (its sizes apply to both)."""
    folder = tmp_path_factory.mktemp("coupling")
    case = load(folder, case_text(), [f"mesh.kind={request.param}"])
    study = run_study(case)
    assert study.solution.mesh.kind == request.param
    return folder, case, study


def test_symmetry_and_row_sums(coupled):
    """Reciprocity and conservation to round-off; L-based flows equal the direct solve's."""
    _, _, s = coupled
    c = s.coupling
    assert c is not None and s.junction is None  # environments only: no ψ
    assert c.environments == list(ROOMS)
    L = c.matrix
    scale = np.max(np.abs(L))
    assert np.max(np.abs(L - L.T)) <= 1e-9 * scale
    off = L - np.diag(np.diag(L))
    assert np.max(np.abs(np.diag(L) - off.sum(axis=1))) <= 1e-9 * scale
    assert np.all(off >= 0.0)  # ISO 10211 sign convention
    assert c.symmetry_error <= 1e-9 and c.row_sum_error <= 1e-9
    direct = {e: sum(s.solution.surfaces[b].heat_flow for b in bs) for e, bs in ROOMS.items()}
    flows = c.heat_flows([T[e] for e in ROOMS])
    for k, e in enumerate(ROOMS):
        assert flows[k] == pytest.approx(direct[e], rel=1e-9, abs=1e-9 * scale)
    d = s.coupling.as_dict()
    assert d["environments"] == list(ROOMS) and np.allclose(d["L"], L, rtol=0, atol=0)
    assert d["checks_pass"] is True


def test_coupling_against_scikit_fem(coupled):
    """L_ij within 1 % of scikit-fem (P2) unit solves of the same boxes."""
    _, case, s = coupled
    fem = np.zeros((3, 3))
    for j, env in enumerate(ROOMS):
        air = {b: (1.0 if ENV_OF[b] == env else 0.0) for b in EDGES}
        sol = solve_boxes(case, h=0.03, h0=5e-4, ratio=1.3, air=air)
        for i, other in enumerate(ROOMS):
            phi = sum(sol.heat_flow(b) for b in ROOMS[other])
            fem[i, j] = phi if i == j else -phi
    rel = np.abs(s.coupling.matrix / fem - 1.0)
    report("coupling vs scikit-fem", L_fvheat=s.coupling.matrix.tolist(), L_fem=fem.tolist())
    report("coupling vs scikit-fem", largest_relative_difference=float(rel.max()))
    assert rel.max() <= 0.01


def test_weighting_factors_give_direct_solve(coupled):
    """θ = Σ g_j θ_j at each environment's coldest point equals a direct solve (1e-9 K)."""
    folder, case, s = coupled
    c = s.coupling
    for p in c.points:
        assert sum(p.g) == pytest.approx(1.0, abs=1e-12)
        assert p.temperature == pytest.approx(float(np.dot(p.g, c.temperatures)), abs=1e-9)
    other = {"room_a": 22.0, "room_b": 5.0, "outside": -12.0}
    overrides = [f"boundaries.{b}.air_temperature={other[ENV_OF[b]]}" for b in EDGES]
    overrides.append(f"mesh.kind={case.mesh.kind}")
    direct = run_study(load(folder, case_text(), overrides, name="other.toml")).solution
    sysm = direct.system
    ts, _, _ = sysm.surface.surface_state(direct.temperature, 0.0)
    pts = surface_points(direct.mesh, sysm.surface, ts)
    for p in c.points:
        k = np.flatnonzero(np.all(np.abs(pts.at - np.asarray(p.at)) < 1e-12, axis=1))
        k = k[[case.boundaries[int(pts.bid[i])].name == p.boundary for i in k]]
        assert k.size >= 1
        want = float(np.dot(p.g, [other[e] for e in ROOMS]))
        assert np.allclose(pts.temperature[k], want, rtol=0, atol=1e-9)
