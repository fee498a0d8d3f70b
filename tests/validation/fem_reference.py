"""An independent finite-element reference for cases built of boxes (scikit-fem).

Source: independent library. scikit-fem solves the steady problem ∇·(λ∇θ) = 0 with Robin
conditions −λ∂θ/∂n = (θ − θ_air)/R on the exchanging surfaces (weak form
∫λ∇θ·∇v + ∫_Γ θv/R = ∫_Γ θ_air v/R) and natural (adiabatic) conditions elsewhere, with
quadratic (P2) triangles on a tensor mesh through every box edge and boundary-segment end,
graded geometrically towards each of those lines (first element ``h0``, ratio ``ratio``,
at most ``h``), so that corner points are resolved to a fraction of a millimetre. Boxes
are painted in order (a later box overrides an earlier one), as case files define them.

Only what a case file states is taken from the case: boxes, conductivities, boundary
segments, air temperatures and surface resistances. The heat flow into the body through a
boundary is the functional ∫_Γ (θ_air − θ)/R ds over its facets (W/m).
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

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

from fvheat.case.model import Case


def graded(keys: list[float], h: float, h0: float, ratio: float) -> np.ndarray:
    """Coordinates through every key, graded from ``h0`` at each key up to ``h`` between."""
    keys = sorted(set(keys))
    out = [keys[0]]
    for a, b in itertools.pairwise(keys):
        sizes, run, d = [], 0.0, h0
        while run + d < (b - a) / 2:
            sizes.append(d)
            run += d
            d = min(d * ratio, h)
        steps = np.cumsum(sizes)
        left, right = a + steps, b - steps[::-1]
        lo, hi = (left[-1], right[0]) if steps.size else (a, b)
        n = max(1, int(np.ceil((hi - lo) / h - 1e-9)))
        out.extend([*left, *np.linspace(lo, hi, n + 1)[1:-1], *right, b])
    return np.unique(np.array(out))


def on_segments(points: np.ndarray, segments, tol: float = 1e-9) -> np.ndarray:
    """Whether each point (2, n) lies on one of the axis-aligned ``segments``."""
    hit = np.zeros(points.shape[1], dtype=bool)
    for (x0, y0), (x1, y1) in segments:
        hit |= (
            (points[0] >= min(x0, x1) - tol)
            & (points[0] <= max(x0, x1) + tol)
            & (points[1] >= min(y0, y1) - tol)
            & (points[1] <= max(y0, y1) + tol)
        )
    return hit


@dataclass
class FemSolution:
    """The reference field: mesh, P2 basis, nodal values and boundary facets by name."""

    mesh: MeshTri
    basis: CellBasis
    u: np.ndarray
    facets: dict[str, np.ndarray]
    surfaces: dict[str, tuple[FacetBasis, float, float]] | None = None

    def heat_flow(self, name: str) -> float:
        """Heat flow into the body through boundary ``name`` (W/m): ∫ (θ_air − θ)/R ds."""
        assert self.surfaces is not None
        fb, air, r = self.surfaces[name]
        return float(_heat_in.assemble(fb, u=fb.interpolate(self.u), air=air, r=r))

    def surface_minimum(self, name: str) -> tuple[float, np.ndarray]:
        """Lowest temperature (°C) over the mesh vertices on boundary ``name``, and where."""
        verts = np.unique(self.mesh.facets[:, self.facets[name]])
        values = self.u[self.basis.nodal_dofs[0, verts]]
        k = int(np.argmin(values))
        return float(values[k]), self.mesh.p[:, verts[k]]

    def at(self, points: np.ndarray) -> np.ndarray:
        """Temperatures (°C) at points (2, n)."""
        return self.basis.probes(np.asarray(points, float)) @ self.u


@Functional
def _heat_in(w):
    return (w.air - w.u) / w.r


def solve_boxes(
    case: Case,
    h: float = 0.02,
    h0: float = 1e-4,
    ratio: float = 1.3,
    air: dict[str, float] | None = None,
) -> FemSolution:
    """The steady field of ``case`` (box regions, surface boundaries with a resistance);
    ``air`` replaces the air temperatures (°C) of the boundaries it names."""
    boxes = []
    for r in case.regions:
        if not r.is_box:
            raise ValueError("the reference handles box regions only")
        boxes.append((case.materials[r.material].conductivity, r.bounds))
    surfaces = []
    for b in case.boundaries:
        if b.kind != "surface" or b.emissivity > 0 or not b.air_temperature.is_constant:
            raise ValueError(f"boundary {b.name}: the reference handles constant resistances only")
        t_air = float(b.air_temperature.at(0.0)) if air is None else air.get(b.name, 0.0)
        if air is not None and b.name not in air:
            raise ValueError(f"boundary {b.name}: no air temperature given")
        surfaces.append((b.name, b.edges, t_air, 1.0 / b.convection))
    xs = [v for _, bx in boxes for v in (bx[0], bx[2])]
    ys = [v for _, bx in boxes for v in (bx[1], bx[3])]
    for _, edges, _, _ in surfaces:
        xs += [p[0] for e in edges for p in e]
        ys += [p[1] for e in edges for p in e]
    mesh = MeshTri.init_tensor(graded(xs, h, h0, ratio), graded(ys, h, h0, ratio))
    centroid = mesh.p[:, mesh.t].mean(axis=1)
    lam = np.full(mesh.t.shape[1], np.nan)
    for k, (x0, y0, x1, y1) in boxes:
        inside = (centroid[0] > x0) & (centroid[0] < x1) & (centroid[1] > y0) & (centroid[1] < y1)
        lam[inside] = k
    mesh = mesh.remove_elements(np.flatnonzero(np.isnan(lam)))
    lam = lam[~np.isnan(lam)]
    element = ElementTriP2()
    basis = CellBasis(mesh, element)
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

    a = asm(conduction, basis, lam=lam_field)
    b = np.zeros(basis.N)
    boundary = mesh.boundary_facets()
    mid = mesh.p[:, mesh.facets[:, boundary]].mean(axis=1)
    facets = {}
    bases = {}
    for name, edges, t_air, r in surfaces:
        facets[name] = boundary[on_segments(mid, edges)]
        fb = FacetBasis(mesh, element, facets=facets[name])
        a = a + asm(mass, fb) / r
        b = b + asm(unit, fb) * t_air / r
        bases[name] = (fb, t_air, r)
    u = spla.spsolve(a.tocsc(), b)
    return FemSolution(mesh, basis, u, facets, bases)
