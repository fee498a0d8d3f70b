"""A case's mesh read from a file (``[mesh] file``): the file's own triangles, solved by the
box method like fvheat's triangle meshes (:mod:`fvheat.mesh.triangles`).

The case's regions are the outlines of the file's 2-D groups (see
:func:`fvheat.case.regions.parse_regions`), so each triangle takes the material of the group
it belongs to; the grid check splits every triangle into four (:func:`subdivide`).
"""

from __future__ import annotations

import math

import numpy as np

from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.mesh.mesh import Mesh
from fvheat.mesh.meshfile import MeshFileError, read_mesh_file, subdivide
from fvheat.mesh.triangles import finish_mesh, paint_triangles


def build_file_mesh(case: Case, refine: float = 1.0) -> Mesh:
    """The mesh of ``case.mesh.file``; ``refine`` ≥ 2 splits every triangle into four
    (log2(refine) times, rounded)."""
    assert case.mesh.file is not None
    try:
        data = read_mesh_file(case.mesh.file)
    except MeshFileError as err:
        raise CaseError(
            f"{case.mesh.file.name}: {err}", file=str(case.source), key="mesh.file"
        ) from None
    v, t = data.points, data.triangles
    region = _group_regions(case, data.triangle_group, v, t)
    for _ in range(max(0, round(math.log2(refine)))):
        v, t = subdivide(v, t)
        region = np.repeat(region, 4)
    return finish_mesh(case, v, t, region)


def _group_regions(case: Case, group: np.ndarray, v: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Region index per triangle: the region of its group (its part, where a group has
    several separate parts)."""
    out = np.full(len(t), -1, dtype=np.int64)
    for name in np.unique(group):
        parts = [k for k, r in enumerate(case.regions) if r.name == name]
        sel = np.flatnonzero(group == name)
        if len(parts) == 1:
            out[sel] = parts[0]
            continue
        sub = paint_triangles(case, v, t[sel])
        out[sel] = np.where(np.isin(sub, parts), sub, parts[0])
    return out
