"""An independent finite-element reference (scikit-fem), shared by every test that checks
fvheat against another library's solve of the same steady problem.

Source: independent library. scikit-fem solves ∇·(λ∇θ) = 0 with Robin conditions
−λ∂θ/∂n = (θ − θ_air)/R on the exchanging surfaces (weak form
∫λ∇θ·∇v + ∫_Γ θv/R = ∫_Γ θ_air v/R, boundary terms through ``FacetBasis``) and natural
(adiabatic) conditions elsewhere, with quadratic (P2) triangles and λ constant per element.
The heat flow into the body through a surface is the functional ∫_Γ (θ_air − θ)/R ds over
its facets (W/m).

- :func:`solve_robin` is the solve itself, on any triangle mesh (a mapped mesh for sloped
  regions, a tensor mesh for boxes) with the surfaces given as facet sets.
- :func:`solve_tensor_boxes` paints boxes (in order, a later box overriding an earlier one,
  as case files define them) on a tensor mesh through given lines (:func:`uniform` or
  :func:`graded`), drops the unpainted elements, and finds the surfaces' facets from their
  axis-aligned segments.
- :func:`solve_boxes` does that for a loaded :class:`Case` (box regions, constant surface
  resistances) on lines graded geometrically towards every box edge and segment end (first
  element ``h0``, ratio ``ratio``, at most ``h``), so corner points are resolved to a
  fraction of a millimetre. Only what a case file states is taken from the case.
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

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

Point = tuple[float, float]
Segment = tuple[Point, Point]
#: (λ in W/(m·K), (x0, y0, x1, y1) in m)
Box = tuple[float, tuple[float, float, float, float]]


@dataclass(frozen=True)
class Surface:
    """An exchanging surface: its name, where it is, air temperature (°C), resistance
    (m²·K/W). ``where`` is a sequence of axis-aligned segments for the box solvers, or the
    boundary facet indices for :func:`solve_robin`."""

    name: str
    where: Any
    air: float
    resistance: float


def uniform(keys: Sequence[float], h: float) -> np.ndarray:
    """Coordinates through every key (sorted), uniformly spaced at most ``h`` between."""
    keys = sorted(set(keys))
    out = [keys[0]]
    for a, b in itertools.pairwise(keys):
        n = int(np.ceil((b - a) / h - 1e-9))
        out.extend(np.linspace(a, b, n + 1)[1:])
    return np.array(out)


def graded(keys: Sequence[float], h: float, h0: float, ratio: float) -> np.ndarray:
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


def on_segments(points: np.ndarray, segments: Sequence[Segment], tol: float = 1e-9) -> np.ndarray:
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
    """The reference field: mesh, P2 basis, nodal values, and per surface its facets and
    (facet basis, air temperature, resistance)."""

    mesh: MeshTri
    basis: CellBasis
    u: np.ndarray
    facets: dict[str, np.ndarray]
    surfaces: dict[str, tuple[FacetBasis, float, float]]

    def heat_flow(self, name: str) -> float:
        """Heat flow into the body through surface ``name`` (W/m): ∫ (θ_air − θ)/R ds."""
        fb, air, r = self.surfaces[name]
        return float(_heat_in.assemble(fb, u=fb.interpolate(self.u), air=air, r=r))

    def surface_minimum(self, name: str) -> tuple[float, np.ndarray]:
        """Lowest temperature (°C) over the mesh vertices on surface ``name``, and where."""
        verts = np.unique(self.mesh.facets[:, self.facets[name]])
        values = self.u[self.basis.nodal_dofs[0, verts]]
        k = int(np.argmin(values))
        return float(values[k]), self.mesh.p[:, verts[k]]

    def at(self, points: np.ndarray) -> np.ndarray:
        """Temperatures (°C) at points (2, n) m."""
        return self.basis.probes(np.asarray(points, float)) @ self.u


@Functional
def _heat_in(w):
    return (w.air - w.u) / w.r


@BilinearForm
def _conduction(u, v, w):
    return w.lam * dot(grad(u), grad(v))


@BilinearForm
def _mass(u, v, w):
    return u * v


@LinearForm
def _unit(v, w):
    return v


def solve_robin(mesh: MeshTri, lam: np.ndarray, surfaces: Sequence[Surface]) -> FemSolution:
    """The steady field on ``mesh`` with conductivity ``lam`` per element (W/(m·K)) and the
    Robin ``surfaces`` (``where``: boundary facet indices; non-empty, no facet on two)."""
    element = ElementTriP2()
    basis = CellBasis(mesh, element)
    lam_field = basis.with_element(ElementTriP0()).interpolate(lam)
    a = asm(_conduction, basis, lam=lam_field)
    b = np.zeros(basis.N)
    facets: dict[str, np.ndarray] = {}
    bases = {}
    for s in surfaces:
        fac = np.asarray(s.where)
        if not fac.size:
            raise ValueError(f"surface {s.name}: no facet of the reference mesh lies on it")
        for other, taken in facets.items():
            if np.intersect1d(fac, taken).size:
                raise ValueError(f"surfaces {other} and {s.name} share facets")
        facets[s.name] = fac
        fb = FacetBasis(mesh, element, facets=fac)
        a = a + asm(_mass, fb) / s.resistance
        b = b + asm(_unit, fb) * s.air / s.resistance
        bases[s.name] = (fb, s.air, s.resistance)
    u = spla.spsolve(a.tocsc(), b)
    return FemSolution(mesh, basis, u, facets, bases)


def solve_tensor_boxes(
    xs: np.ndarray, ys: np.ndarray, boxes: Sequence[Box], surfaces: Sequence[Surface]
) -> FemSolution:
    """The steady field of ``boxes`` on the tensor mesh through lines ``xs``, ``ys`` (m),
    with the ``surfaces`` given by axis-aligned segments (``where``)."""
    mesh = MeshTri.init_tensor(xs, ys)
    centroid = mesh.p[:, mesh.t].mean(axis=1)
    lam = np.full(mesh.t.shape[1], np.nan)
    for k, (x0, y0, x1, y1) in boxes:
        inside = (centroid[0] > x0) & (centroid[0] < x1) & (centroid[1] > y0) & (centroid[1] < y1)
        lam[inside] = k
    mesh = mesh.remove_elements(np.flatnonzero(np.isnan(lam)))
    lam = lam[~np.isnan(lam)]
    boundary = mesh.boundary_facets()
    mid = mesh.p[:, mesh.facets[:, boundary]].mean(axis=1)
    on_mesh = [
        Surface(s.name, boundary[on_segments(mid, s.where)], s.air, s.resistance) for s in surfaces
    ]
    return solve_robin(mesh, lam, on_mesh)


def box_keys(boxes: Sequence[Box], surfaces: Sequence[Surface]) -> tuple[list[float], list[float]]:
    """The x and y coordinates of every box edge and segment end (m)."""
    xs = [v for _, bx in boxes for v in (bx[0], bx[2])]
    ys = [v for _, bx in boxes for v in (bx[1], bx[3])]
    for s in surfaces:
        xs += [p[0] for e in s.where for p in e]
        ys += [p[1] for e in s.where for p in e]
    return xs, ys


def solve_boxes(
    case: Case,
    h: float = 0.02,
    h0: float = 1e-4,
    ratio: float = 1.3,
    air: dict[str, float] | None = None,
) -> FemSolution:
    """The steady field of ``case`` (box regions, surface boundaries with a resistance) on
    graded lines; ``air`` replaces the air temperatures (°C) of the boundaries it names."""
    boxes: list[Box] = []
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
        surfaces.append(Surface(b.name, b.edges, t_air, 1.0 / b.convection))
    xs, ys = box_keys(boxes, surfaces)
    return solve_tensor_boxes(graded(xs, h, h0, ratio), graded(ys, h, h0, ratio), boxes, surfaces)
