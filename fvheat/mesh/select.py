"""Which mesh a case gets: ``[mesh] kind`` = "auto", "triangles" or "rectilinear".

"auto" takes the triangle mesh (exact geometry) whenever a region outline, hole or boundary
segment is not axis-aligned, the rectilinear grid (fast, exact for orthogonal details)
otherwise.
"""

from __future__ import annotations

import numpy as np

from fvheat.case.model import Case
from fvheat.mesh.mesh import Mesh


def sloped(case: Case) -> bool:
    """Whether some region outline, hole or boundary segment is not axis-aligned."""
    rings = [r.vertices for r in case.regions] + [h for r in case.regions for h in r.holes]
    for ring in rings:
        d = np.roll(ring, -1, axis=0) - ring
        length = np.hypot(*d.T)
        if np.any((np.abs(d[:, 0]) > 1e-12 * length) & (np.abs(d[:, 1]) > 1e-12 * length)):
            return True
    for b in case.boundaries:
        for (x0, y0), (x1, y1) in b.edges:
            if x0 != x1 and y0 != y1:
                return True
    return False


def mesh_kind(case: Case) -> str:
    """The mesh ``case`` gets: "triangles" or "rectilinear" (see the module text)."""
    kind = case.mesh.kind
    if kind != "auto":
        return kind
    return "triangles" if sloped(case) else "rectilinear"


def build_mesh(case: Case, refine: float = 1.0) -> Mesh:
    """The case's mesh (kind from :func:`mesh_kind`); ``refine`` divides every size."""
    if case.mesh.file is not None:
        from fvheat.mesh.imported import build_file_mesh

        return build_file_mesh(case, refine)
    if mesh_kind(case) == "triangles":
        from fvheat.mesh.triangles import build_triangle_mesh

        return build_triangle_mesh(case, refine)
    from fvheat.mesh.rectilinear import build_mesh as build_grid

    return build_grid(case, refine)
