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
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
import scipy.sparse.linalg as spla
from skfem import (
    BilinearForm,
    CellBasis,
    ElementTriP0,
    ElementTriP2,
    FacetBasis,
    Functional,
    LinearForm,
    MeshTri,
    asm,
)
from skfem.helpers import dot, grad

from .fem_reference import on_segments as _on_segments
from .helpers import probes_toml, report, run, toml_list

CONDUCTIVITY = {"brick": 0.9, "insulation": 0.04, "concrete": 2.3}  # W/(m·K)
# painted in order, later ones win (x0, y0, x1, y1), m
REGIONS = [
    ("brick", (0.0, 0.0, 0.25, 2.6)),
    ("insulation", (0.25, 0.0, 0.40, 2.6)),
    ("concrete", (-1.2, 1.2, 1.5, 1.4)),  # slab: floor inside, balcony outside
    ("concrete", (1.35, 1.4, 1.5, 1.9)),  # upstand at the balcony tip
]
INSIDE = [
    ((0.0, 0.0), (0.0, 1.2)),
    ((0.0, 1.4), (0.0, 2.6)),
    ((-1.2, 1.2), (0.0, 1.2)),
    ((-1.2, 1.4), (0.0, 1.4)),
]
OUTSIDE = [
    ((0.4, 0.0), (0.4, 1.2)),
    ((0.4, 1.4), (0.4, 2.6)),
    ((0.4, 1.2), (1.5, 1.2)),
    ((0.4, 1.4), (1.35, 1.4)),
    ((1.35, 1.4), (1.35, 1.9)),
    ((1.35, 1.9), (1.5, 1.9)),
    ((1.5, 1.2), (1.5, 1.9)),
]
T_IN, R_IN, T_OUT, R_OUT = 20.0, 0.13, -10.0, 0.04
POINTS = {
    "slab_in_wall": (0.12, 1.3),
    "brick_above": (0.12, 2.0),
    "insulation": (0.33, 0.6),
    "floor": (-0.6, 1.3),
}


# --- scikit-fem reference ---------------------------------------------------------------------


def _lines(keys: list[float], h: float) -> np.ndarray:
    """Uniform spacing ≤ h between consecutive key coordinates."""
    out = [keys[0]]
    for a, b in itertools.pairwise(keys):
        n = int(np.ceil((b - a) / h - 1e-9))
        out.extend(np.linspace(a, b, n + 1)[1:])
    return np.array(out)


def skfem_solution(h: float) -> tuple[float, float, dict[str, float]]:
    """Heat flows into the body through the inside and outside surfaces (W/m) and the
    temperatures at POINTS, from P2 elements on a tensor mesh of spacing ≤ h."""
    xs = sorted({v for _, b in REGIONS for v in (b[0], b[2])})
    ys = sorted({v for _, b in REGIONS for v in (b[1], b[3])})
    mesh = MeshTri.init_tensor(_lines(xs, h), _lines(ys, h))
    centroid = mesh.p[:, mesh.t].mean(axis=1)
    lam = np.full(mesh.t.shape[1], np.nan)
    for material, (x0, y0, x1, y1) in REGIONS:
        inside = (centroid[0] > x0) & (centroid[0] < x1) & (centroid[1] > y0) & (centroid[1] < y1)
        lam[inside] = CONDUCTIVITY[material]
    mesh = mesh.remove_elements(np.flatnonzero(np.isnan(lam)))
    lam = lam[~np.isnan(lam)]
    element = ElementTriP2()
    basis = CellBasis(mesh, element)
    lam_field = basis.with_element(ElementTriP0()).interpolate(lam)

    facets = mesh.boundary_facets()
    mid = mesh.p[:, mesh.facets[:, facets]].mean(axis=1)
    f_in = facets[_on_segments(mid, INSIDE)]
    f_out = facets[_on_segments(mid, OUTSIDE)]
    assert f_in.size and f_out.size and not np.intersect1d(f_in, f_out).size

    @BilinearForm
    def conduction(u, v, w):
        return w.lam * dot(grad(u), grad(v))

    @BilinearForm
    def mass(u, v, w):
        return u * v

    @LinearForm
    def unit(v, w):
        return v

    @Functional
    def heat_in(w):
        return (w.air - w.u) / w.r

    a = asm(conduction, basis, lam=lam_field)
    b = np.zeros(basis.N)
    sides = []
    for fac, air, r in ((f_in, T_IN, R_IN), (f_out, T_OUT, R_OUT)):
        fb = FacetBasis(mesh, element, facets=fac)
        a = a + asm(mass, fb) / r
        b = b + asm(unit, fb) * air / r
        sides.append((fb, air, r))
    u = spla.spsolve(a.tocsc(), b)
    q_in, q_out = (heat_in.assemble(fb, u=fb.interpolate(u), air=air, r=r) for fb, air, r in sides)
    pts = np.array(list(POINTS.values())).T
    temps = basis.probes(pts) @ u
    return float(q_in), float(q_out), dict(zip(POINTS, map(float, temps), strict=True))


# --- fvheat ------------------------------------------------------------------------------------


def _segments(segs) -> str:
    return "[" + ", ".join(f"[{toml_list(a)}, {toml_list(b)}]" for a, b in segs) + "]"


def fvheat_case() -> str:
    mats = "".join(f"\n[materials.{n}]\nconductivity = {k}\n" for n, k in CONDUCTIVITY.items())
    regions = "".join(
        f'\n[[regions]]\nmaterial = "{n}"\nbox = {toml_list(b)}\n' for n, b in REGIONS
    )
    return f"""
title = "balcony slab through an insulated wall"
[mesh]
max_cell = 0.04
min_cell = 0.004
{mats}
{regions}
[[boundaries]]
name = "inside"
edges = {_segments(INSIDE)}
air_temperature = {T_IN}
resistance = {R_IN}

[[boundaries]]
name = "outside"
edges = {_segments(OUTSIDE)}
air_temperature = {T_OUT}
resistance = {R_OUT}
""" + probes_toml(POINTS)


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
