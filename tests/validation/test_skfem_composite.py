"""A 2-D composite junction against an independent library (scikit-fem).

Source: independent library. scikit-fem solves the same steady problem with the finite
element method: ∇·(λ∇θ) = 0, Robin conditions −λ∂θ/∂n = (θ − θ_air)/R on the two exchanging
surfaces (weak form ∫λ∇θ·∇v + ∫_Γ θv/R = ∫_Γ θ_air v/R, boundary terms through
``FacetBasis``), natural (adiabatic) conditions on the cut-off planes. Quadratic (P2)
triangles on a structured tensor mesh whose lines include every material interface.

The junction is invented: a concrete balcony slab with an upstand at its tip (an L in
section, λ = 2.3) running through a brick wall (λ = 0.9) with external insulation
(λ = 0.04); inside surface resistance 0.13, outside 0.04 m²·K/W; 20 °C inside, −10 °C out.
Tolerances: total heat flow within 0.5 %, a few interior temperatures within 0.05 K.
The junction is the one of ``fvheat validate`` (fvheat/validation/composite.py), whose
stored scikit-fem numbers are recomputed here.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from fem_reference import Surface, solve_tensor_boxes, uniform

from fvheat.validation import composite
from fvheat.validation.composite import (
    CONDUCTIVITY,
    INSIDE,
    OUTSIDE,
    R_IN,
    R_OUT,
    REGIONS,
    T_IN,
    T_OUT,
    case_text,
)

from .helpers import probes_toml, report, run

POINTS = {
    "slab_in_wall": composite.POINT,
    "brick_above": (0.12, 2.0),
    "insulation": (0.33, 0.6),
    "floor": (-0.6, 1.3),
}


def skfem_solution(h: float) -> tuple[float, float, dict[str, float]]:
    """Heat flows into the body through the inside and outside surfaces (W/m) and the
    temperatures at POINTS, from P2 elements on a tensor mesh of spacing ≤ h through every
    box edge (``tests/fem_reference.py``)."""
    boxes = [(CONDUCTIVITY[m], b) for m, b in REGIONS]
    xs = uniform([v for _, b in boxes for v in (b[0], b[2])], h)
    ys = uniform([v for _, b in boxes for v in (b[1], b[3])], h)
    surfaces = [Surface("inside", INSIDE, T_IN, R_IN), Surface("outside", OUTSIDE, T_OUT, R_OUT)]
    fem = solve_tensor_boxes(xs, ys, boxes, surfaces)
    temps = fem.at(np.array(list(POINTS.values())).T)
    return (
        fem.heat_flow("inside"),
        fem.heat_flow("outside"),
        dict(zip(POINTS, map(float, temps), strict=True)),
    )


def fvheat_case() -> str:
    """The junction of ``fvheat validate``, with probes at the other POINTS too."""
    return case_text() + probes_toml({k: p for k, p in POINTS.items() if k != "slab_in_wall"})


def fvheat_run(tmp_path, refine: int):
    """fvheat with max_cell 0.04/refine, min_cell 0.004/refine and corner cells 1 mm/refine,
    set by overrides."""
    return run(
        tmp_path,
        fvheat_case(),
        [
            f"mesh.max_cell={0.04 / refine}",
            f"mesh.min_cell={0.004 / refine}",
            f"mesh.corner_cell={0.001 / refine}",
        ],
    )


@pytest.mark.slow
def test_heat_flow_against_scikit_fem(tmp_path):
    """Total heat flow: fvheat (cells 0.5 mm at edges, 5 mm elsewhere) and scikit-fem (P2,
    10 mm mesh) within 0.5 %. The reference's own discretisation uncertainty (20 mm vs
    10 mm) is checked to be well inside that (< 0.25 %). Interior temperatures within 0.05 K."""
    q_in, q_out, temps = skfem_solution(0.01)
    q_in_coarse, _, _ = skfem_solution(0.02)
    assert abs(q_in + q_out) <= 1e-8 * q_in  # the reference balances
    ref_uncertainty = abs(q_in_coarse / q_in - 1.0)
    sol = fvheat_run(tmp_path, 8)
    q_fv = sol.surfaces["inside"].heat_flow
    rel = abs(q_fv / q_in - 1.0)
    rel_out = abs(sol.surfaces["outside"].heat_flow / q_out - 1.0)
    dtemp = {k: sol.probes[k] - temps[k] for k in POINTS}
    report(
        "scikit-fem composite",
        q_skfem_W_per_m=q_in,
        q_fvheat_W_per_m=q_fv,
        rel_difference=rel,
        rel_difference_outside=rel_out,
        skfem_20mm_vs_10mm=ref_uncertainty,
        temperature_differences_K=dtemp,
        cells=sol.mesh.n_cells,
    )
    assert ref_uncertainty < 2.5e-3
    assert rel <= 5e-3 and rel_out <= 5e-3
    assert max(abs(v) for v in dtemp.values()) <= 0.05


@pytest.mark.slow
def test_fvheat_heat_flow_converges(tmp_path):
    """fvheat's heat flow on grids refined ×1, ×2, ×4, ×8: the change between successive
    grids shrinks on every refinement, and the finest grids differ by < 0.1 %."""
    flows = [fvheat_run(tmp_path, r).surfaces["inside"].heat_flow for r in (1, 2, 4, 8)]
    changes = [abs(b - a) for a, b in itertools.pairwise(flows)]
    report("fvheat composite refinement", heat_flow_W_per_m=flows, changes_W_per_m=changes)
    assert all(c2 < c1 for c1, c2 in itertools.pairwise(changes))
    assert changes[-1] / flows[-1] < 1e-3


def test_stored_references_are_recomputed():
    """The numbers ``fvheat validate`` stores for this junction are what scikit-fem gives
    (P2, 10 mm mesh) to the 5 or more digits stored."""
    q_in, _, temps = skfem_solution(0.01)
    assert composite.HEAT_FLOW_REF == pytest.approx(q_in, rel=1e-6)
    assert composite.THETA_REF == pytest.approx(temps["slab_in_wall"], abs=1e-5)
