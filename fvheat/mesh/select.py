"""Which mesh a case gets: ``[mesh] kind`` = "auto", "triangles" or "rectilinear".

"auto" takes the triangle mesh (exact geometry) whenever a region outline, hole or boundary
segment is not axis-aligned, unless the case uses something the triangle mesh does not
support yet (``[ground]``; then the rectilinear grid, said in the log); "triangles" with
such a case is refused in one line naming the key.
"""

from __future__ import annotations

import logging

import numpy as np

from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.mesh.mesh import Mesh

log = logging.getLogger(__name__)


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


def unsupported(case: Case) -> tuple[str, str] | None:
    """(key, reason) of the first thing in ``case`` the triangle mesh does not support yet,
    or None."""
    if case.ground is not None:
        return "ground", "[ground] (the soil block's floor U) runs on the rectilinear mesh only"
    return None


def mesh_kind(case: Case) -> str:
    """The mesh ``case`` gets: "triangles" or "rectilinear" (see the module text)."""
    kind = case.mesh.kind
    if kind == "rectilinear":
        return kind
    problem = unsupported(case)
    if kind == "triangles":
        if problem is not None:
            key, reason = problem
            raise CaseError(
                f'{reason}: set [mesh] kind = "rectilinear" (or "auto")',
                file=str(case.source),
                key=key,
            )
        return kind
    if not sloped(case):
        return "rectilinear"
    if problem is not None:
        log.info("sloped geometry on the rectilinear mesh: %s (%s)", problem[1], problem[0])
        return "rectilinear"
    return "triangles"


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
