"""Heat-flux vectors: cell-centred q = −k∇T reconstructed from the solver's own face flows.

For a cell of area V with faces f (centre x_f, outward heat flow F_f in W/m), the divergence
theorem gives ∫_V q dV = Σ_f F_f (x_f − x_c) + ∫_V (∇·q)(x − x_c) dV; the last term vanishes
for a source-free steady field and is neglected otherwise, so

    q_c = Σ_f F_f (x_f − x_c) / V.

On a rectangular cell this is the mean of the flux densities on its opposite faces, so a
1-D field is reproduced exactly. Using the face flows the solver balanced (harmonic-mean
conductances, surface terms) keeps the picture consistent with the reported heat flows.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fvheat.assembly.conduction import face_flux
from fvheat.assembly.system import System
from fvheat.mesh.mesh import Mesh


@dataclass(frozen=True)
class SurfaceFaces:
    """State of every exterior face of the mesh (adiabatic ones included).

    ``temperature`` °C (the adjacent cell's for adiabatic faces), ``flow`` heat flow into
    the body through the face (W/m per metre depth, 0 on adiabatic faces) and ``density``
    the same per unit face length (W/m²).
    """

    temperature: np.ndarray
    flow: np.ndarray
    density: np.ndarray


def surface_faces(system: System, temp: np.ndarray, t: float) -> SurfaceFaces:
    """Face temperature (°C) and heat flow into the body (W/m) on all exterior faces of the
    mesh, from the same surface balance the solver used, for cell field ``temp`` at ``t`` s."""
    mesh = system.mesh
    face_t = temp[mesh.b_cell].astype(float)
    flow = np.zeros(mesh.n_boundary_faces)
    s = system.surface
    if s.face.size:
        ts, f, _ = s.surface_state(temp, t)
        face_t[s.face] = ts
        flow[s.face] = f
    return SurfaceFaces(face_t, flow, flow / mesh.b_area)


def reconstruct_flux(mesh: Mesh, face_flow: np.ndarray, boundary_outflow: np.ndarray) -> np.ndarray:
    """Cell-centred heat-flux vectors (n, 2), W/m², from face heat flows.

    ``face_flow``: heat flow across each interior face from owner to neighbour (W/m);
    ``boundary_outflow``: heat flow out of the body through each exterior face (W/m).
    """
    n = mesh.n_cells
    d_own = mesh.face_centre - mesh.centres[mesh.owner]
    d_nbr = mesh.face_centre - mesh.centres[mesh.neighbour]
    d_b = mesh.b_centre - mesh.centres[mesh.b_cell]
    cells = np.concatenate([mesh.owner, mesh.neighbour, mesh.b_cell])
    out = np.concatenate([face_flow, -face_flow, boundary_outflow])
    arm = np.concatenate([d_own, d_nbr, d_b])
    q = np.column_stack([np.bincount(cells, weights=out * arm[:, k], minlength=n) for k in (0, 1)])
    return q / mesh.volumes[:, None]


def cell_heat_flux(system: System, temp: np.ndarray, t: float = 0.0) -> np.ndarray:
    """Heat-flux vector q (W/m², shape (n, 2)) in every cell for the field ``temp`` (°C) at
    time ``t`` (s), reconstructed from the solver's interior and surface face flows."""
    mesh = system.mesh
    inner = face_flux(mesh, system.g, temp)
    outer = -surface_faces(system, temp, t).flow
    return reconstruct_flux(mesh, inner, outer)
