"""Conduction: face conductances, the conduction matrix and face heat flows."""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

from fvheat.mesh.mesh import Mesh


def face_conductance(
    mesh: Mesh,
    k: np.ndarray,
    k_material: np.ndarray | None = None,
    k_face: np.ndarray | None = None,
) -> np.ndarray:
    """Conductance of every interior face, W/(m·K) per metre depth.

    Two half-cells in series (harmonic mean): G = A / (d_o/k_o + d_n/k_n), with ``k`` the
    cell conductivities W/(m·K). A mesh whose faces carry their own material (the box
    method on triangles) gives G = face_weight·k_material[face_material] instead, with
    ``k_material`` the conductivity of each material (W/(m·K)), or ``k_face`` the
    conductivity of each face's own piece (W/(m·K), e.g. a freezing triangle's).
    """
    if mesh.face_weight is not None and k_face is not None:
        return mesh.face_weight * k_face
    if mesh.face_weight is not None:
        if k_material is None:
            raise ValueError("faces with their own material need the material conductivities")
        assert mesh.face_material is not None
        return mesh.face_weight * k_material[mesh.face_material]
    return mesh.face_area / (mesh.d_owner / k[mesh.owner] + mesh.d_neighbour / k[mesh.neighbour])


def conduction_matrix(
    mesh: Mesh, g: np.ndarray, diagonal: np.ndarray | None = None
) -> sp.csr_matrix:
    """Symmetric matrix K (W/(m·K)) with (K·T)_i = Σ_faces G (T_i − T_j): heat leaving cell i,
    plus ``diagonal`` (W/(m·K) per cell, e.g. the linear surface terms) when given.

    The off-diagonal −G of every face goes into the lower triangle (one COO → CSR pass,
    duplicates summed: the two face pieces of a triangle-mesh edge), then K = L + Lᵀ +
    diag; the diagonal summed per cell beforehand. Measured at 200 000 unknowns: 0.056 →
    0.037 s on the triangle mesh (half the entries to sort), 0.018 → 0.014 s on the grid,
    against one COO pass of both triangles.
    """
    n = mesh.n_cells
    o, nb = mesh.owner, mesh.neighbour
    diag = np.bincount(o, weights=g, minlength=n) + np.bincount(nb, weights=g, minlength=n)
    if diagonal is not None:
        diag += diagonal
    lower = sp.csr_matrix((-g, (np.maximum(o, nb), np.minimum(o, nb))), shape=(n, n))
    return sp.csr_matrix(lower + lower.T + sp.diags(diag, format="csr"))


def face_flux(mesh: Mesh, g: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Heat flow across each interior face from owner to neighbour, W/m."""
    return g * (t[mesh.owner] - t[mesh.neighbour])
