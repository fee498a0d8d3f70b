"""An independent reference for a section with a sloped interface and a sloped exterior
surface (scikit-fem, quadratic elements on its own mapped structured mesh).

Source: independent library. scikit-fem solves ∇·(λ∇θ) = 0 with Robin conditions
−λ∂θ/∂n = (θ − θ_air)/R on the inside face x = 0 and on the sloped outside face, adiabatic
top and bottom. Its mesh is a tensor grid in (ξ, y), ξ ∈ [0, 1] mapped onto the first
material (0 ≤ x ≤ s(y)) and ξ ∈ [1, 2] onto the second (s(y) ≤ x ≤ r(y)); s and r are
linear in y, so the interface and the sloped surface are straight lines of the mesh (the
geometry is exact), independently of the `triangle` library fvheat uses.
"""

from __future__ import annotations

import numpy as np
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

# invented section: a dense layer and an insulation layer, both wedge-shaped, m and W/(m·K)
HEIGHT = 0.6
S0, S1 = 0.10, 0.16  # interface x at y = 0 and y = HEIGHT
R0, R1 = 0.25, 0.40  # sloped outside surface x at y = 0 and y = HEIGHT
K_DENSE, K_INSULATION = 1.0, 0.05
T_IN, R_IN, T_OUT, R_OUT = 20.0, 0.13, -10.0, 0.04


def _s(y):
    return S0 + (S1 - S0) * y / HEIGHT


def _r(y):
    return R0 + (R1 - R0) * y / HEIGHT


def solve(n: int, points: np.ndarray | None = None) -> tuple[dict[str, float], np.ndarray]:
    """Heat flows into the body (W/m) through "inside" and "outside", with n elements
    across each material and 4n up the height, and the temperatures (°C) at ``points``
    ((k, 2) m)."""
    xi = np.concatenate([np.linspace(0.0, 1.0, n + 1), np.linspace(1.0, 2.0, n + 1)[1:]])
    mesh = MeshTri.init_tensor(xi, np.linspace(0.0, HEIGHT, 4 * n + 1))
    q, y = mesh.p
    x = np.where(q <= 1.0, q * _s(y), _s(y) + (q - 1.0) * (_r(y) - _s(y)))
    mesh = MeshTri(np.vstack([x, y]), mesh.t)
    centroid_xi = q[mesh.t].mean(axis=0)
    lam = np.where(centroid_xi < 1.0, K_DENSE, K_INSULATION)
    basis = CellBasis(mesh, ElementTriP2())
    lam_field = basis.with_element(ElementTriP0()).interpolate(lam)

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

    tol = 1e-9
    sides = {
        "inside": (mesh.facets_satisfying(lambda p: np.abs(p[0]) < tol), T_IN, R_IN),
        "outside": (
            mesh.facets_satisfying(lambda p: np.abs(p[0] - _r(p[1])) < tol),
            T_OUT,
            R_OUT,
        ),
    }
    a = asm(conduction, basis, lam=lam_field)
    b = np.zeros(basis.N)
    bases = {}
    for name, (facets, air, r) in sides.items():
        fb = FacetBasis(mesh, basis.elem, facets=facets)
        a = a + asm(mass, fb) / r
        b = b + asm(unit, fb) * air / r
        bases[name] = (fb, air, r)
    u = spla.spsolve(a.tocsc(), b)
    flows = {
        name: float(heat_in.assemble(fb, u=fb.interpolate(u), air=air, r=r))
        for name, (fb, air, r) in bases.items()
    }
    at = np.zeros(0) if points is None else basis.probes(np.asarray(points, float).T) @ u
    return flows, at


def case_toml(max_cell: float, min_cell: float, kind: str = "triangles") -> str:
    """The same section as an fvheat case file."""
    return f"""
title = "sloped wedge"
[mesh]
max_cell = {max_cell!r}
min_cell = {min_cell!r}
kind = "{kind}"
[materials.dense]
conductivity = {K_DENSE!r}
[materials.insulation]
conductivity = {K_INSULATION!r}
[[regions]]
material = "dense"
polygon = [[0.0, 0.0], [{S0!r}, 0.0], [{S1!r}, {HEIGHT!r}], [0.0, {HEIGHT!r}]]
[[regions]]
material = "insulation"
polygon = [[{S0!r}, 0.0], [{R0!r}, 0.0], [{R1!r}, {HEIGHT!r}], [{S1!r}, {HEIGHT!r}]]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, {HEIGHT!r}]]]
air_temperature = {T_IN!r}
resistance = {R_IN!r}
[[boundaries]]
name = "outside"
edges = [[[{R0!r}, 0.0], [{R1!r}, {HEIGHT!r}]]]
air_temperature = {T_OUT!r}
resistance = {R_OUT!r}
"""
