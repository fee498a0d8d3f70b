"""The discrete heat balance of a case on a mesh: C dT/dt = F(T, t).

F(T, t) = −M·T + b(t) + r(T, t) is the net heat flow into each cell (W/m): M is the
conduction matrix plus the constant diagonal of the linear surface terms, b(t) the linear
surface sources and r(T, t) the non-linear radiating-surface terms.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import scipy.sparse as sp

from fvheat.assembly.boundary import SurfaceTerms
from fvheat.assembly.conduction import conduction_matrix, face_conductance
from fvheat.assembly.properties import conductivity, heat_capacity, material_conductivity
from fvheat.case.model import Boundary, Case
from fvheat.mesh.mesh import Mesh


@dataclass(frozen=True)
class System:
    """Assembled operators of one case on one mesh (all per metre depth)."""

    mesh: Mesh
    k: np.ndarray  # W/(m·K) per cell
    g: np.ndarray  # W/(m·K) per interior face
    matrix: sp.csr_matrix  # M, W/(m·K)
    surface: SurfaceTerms
    capacity: np.ndarray  # J/(m·K) per cell
    k_material: np.ndarray | None = None  # W/(m·K) per material (faces with their own material)
    phase_material: np.ndarray | None = None  # bool per material: conductivity follows the phase

    @classmethod
    def build(cls, case: Case, mesh: Mesh) -> System:
        """Assemble conduction, surface terms and capacities, vectorised over faces."""
        k = conductivity(case, mesh)
        km = material_conductivity(case, mesh)
        g, m, surface = _operators(mesh, case.boundaries, k, km)
        phase = np.array(
            [
                case.materials[n].latent_heat is not None
                and case.materials[n].phase_change is not None
                for n in mesh.material_names
            ],
            dtype=bool,
        )
        return cls(mesh, k, g, m, surface, heat_capacity(case, mesh), km, phase)

    def with_conductivity(self, k: np.ndarray) -> System:
        """The same system with cell conductivities ``k`` (W/(m·K)), e.g. frozen ground."""
        km = self.k_material
        k_face = None
        if self.mesh.face_weight is not None:
            k_face = self.triangle_conductivity(k)
        g, m, surface = _operators(self.mesh, self.surface.boundaries, k, km, k_face)
        return replace(self, k=k, g=g, matrix=m, surface=surface)

    def triangle_conductivity(self, k: np.ndarray) -> np.ndarray:
        """Per face piece of a triangle mesh, W/(m·K): the conductivity of its triangle, for
        node conductivities ``k`` (W/(m·K)). A phase-change triangle takes the mean of its
        vertices' values (the conductivity is linear in the liquid fraction, so this is its
        material at the mean liquid fraction); other triangles keep their material's."""
        mesh = self.mesh
        assert mesh.triangles is not None and mesh.triangle_material is not None
        assert self.k_material is not None and self.phase_material is not None
        tm = mesh.triangle_material
        k_tri = np.where(
            self.phase_material[tm], k[mesh.triangles].mean(axis=1), self.k_material[tm]
        )
        # box_mesh numbers the face pieces triangle by triangle: face 3i + e is triangle i's
        return np.repeat(k_tri, 3)

    @property
    def n(self) -> int:
        """Number of unknowns (cells)."""
        return self.mesh.n_cells

    @property
    def surface_conductance(self) -> float:
        """Σ face length × conductance from cell centre to face over the exchanging faces,
        W/(m·K): the scale of the heat flows a temperature difference drives."""
        s = self.surface
        return float(np.sum(s.area * s.conductance_scale))

    @property
    def nonlinear(self) -> bool:
        """True when a radiating surface makes F non-linear in T."""
        return bool(self.surface.radiative.any())

    def sources(self, t: float) -> np.ndarray:
        """b(t): heat into each cell from the linear surface terms at T = 0 °C, W/m."""
        return self.surface.rhs(t, self.n)

    def boundary_flows(self, temp: np.ndarray, t: float) -> np.ndarray:
        """Heat flow into the body through each boundary (W/m), in the case's order."""
        s = self.surface
        _, flux, _ = s.surface_state(temp, t)
        return np.bincount(s.bid, weights=flux, minlength=len(s.boundaries))

    def heat_in(self, temp: np.ndarray, t: float) -> tuple[np.ndarray, np.ndarray]:
        """F(T, t) per cell (W/m) and the diagonal of ∂r/∂T (W/(m·K)); M is constant."""
        r, dr = self.surface.radiative_terms(temp, t, self.n)
        return self.sources(t) - self.matrix @ temp + r, dr


def _operators(
    mesh: Mesh,
    boundaries: tuple[Boundary, ...],
    k: np.ndarray,
    km: np.ndarray | None = None,
    k_face: np.ndarray | None = None,
) -> tuple[np.ndarray, sp.csr_matrix, SurfaceTerms]:
    """Face conductances, the matrix M and the surface terms for cell conductivities ``k``
    (and, where faces carry their own material, the material conductivities ``km`` or the
    faces' own conductivities ``k_face``)."""
    g = face_conductance(mesh, k, km, k_face)
    surface = SurfaceTerms.build(mesh, boundaries, k)
    m = conduction_matrix(mesh, g, surface.diagonal(mesh.n_cells))
    return g, m, surface
