"""Probes on the grid that cannot show what they are placed for.

Grid probes interpolate between cell centres (:mod:`fvheat.evaluate.probes`); between an
exterior face and its cell's centre the value is held, so a probe placed on a surface (or
within half a cell of it) reports the cell's temperature, not the surface's: in
insulation next to an exchanging surface that differs by the temperature drop across half
a cell (0.5 K in measured cases). The surface temperatures themselves are in the boundary
results. On the triangle mesh the surface nodes carry the surface temperature and probes
interpolate linearly, so no warning is needed there.
"""

from __future__ import annotations

import numpy as np

from fvheat.case.model import Case
from fvheat.mesh.mesh import Mesh


def surface_probe_warnings(case: Case, mesh: Mesh) -> list[str]:
    """One warning per grid probe lying within half a cell of a face of a boundary that
    ties the surface to a temperature (closer to the face than the face's cell centre)."""
    if mesh.grid is None or not case.probes:
        return []
    tied = np.array([b.ties_temperature for b in case.boundaries], dtype=bool)
    faces = np.flatnonzero(mesh.b_boundary >= 0)
    faces = faces[tied[mesh.b_boundary[faces]]]
    if faces.size == 0:
        return []
    centre, normal = mesh.b_centre[faces], mesh.b_normal[faces]
    half = 0.5 * mesh.b_area[faces]  # half the face's length, along it
    out = []
    for probe in case.probes:
        rel = np.asarray(probe.at, float) - centre
        depth = -np.einsum("ij,ij->i", rel, normal)  # into the body from the face
        along = np.abs(rel[:, 0] * normal[:, 1] - rel[:, 1] * normal[:, 0])
        near = (depth >= -1e-12) & (depth < mesh.b_dist[faces]) & (along <= half * (1 + 1e-9))
        if near.any():
            name = case.boundaries[int(mesh.b_boundary[faces[np.argmax(near)]])].name
            out.append(
                f"probe {probe.name!r} lies within half a cell of the surface of {name!r}: on the "
                "grid it reports the adjacent cell's temperature, not the surface's (the "
                "boundary results give the surface temperatures); move it into the body or "
                "refine there"
            )
    return out
