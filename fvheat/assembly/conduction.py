"""Conduction: face conductances, the conduction matrix and face heat flows."""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

from fvheat.mesh.mesh import Mesh


def face_conductance(mesh: Mesh, k: np.ndarray) -> np.ndarray:
    """Conductance of every interior face, W/(m·K) per metre depth.

    Two half-cells in series (harmonic mean): G = A / (d_o/k_o + d_n/k_n), with ``k`` the
    cell conductivities W/(m·K).
    """
    return mesh.face_area / (mesh.d_owner / k[mesh.owner] + mesh.d_neighbour / k[mesh.neighbour])


def conduction_matrix(mesh: Mesh, g: np.ndarray) -> sp.csr_matrix:
    """Symmetric matrix K (W/(m·K)) with (K·T)_i = Σ_faces G (T_i − T_j): heat leaving cell i.

    Assembled in one COO pass from the face arrays.
    """
    n = mesh.n_cells
    o, nb = mesh.owner, mesh.neighbour
    rows = np.concatenate([o, nb, o, nb])
    cols = np.concatenate([o, nb, nb, o])
    vals = np.concatenate([g, g, -g, -g])
    return sp.coo_matrix((vals, (rows, cols)), shape=(n, n)).tocsr()


def face_flux(mesh: Mesh, g: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Heat flow across each interior face from owner to neighbour, W/m."""
    return g * (t[mesh.owner] - t[mesh.neighbour])
