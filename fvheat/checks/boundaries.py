"""Boundary segments that are only partly on the body, and exterior edges left adiabatic
between surfaces of the same side (a segment left out or mistyped)."""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp
from scipy.sparse.csgraph import connected_components

from fvheat.case.model import Case
from fvheat.mesh.geometry import coincident_ids
from fvheat.mesh.mesh import Mesh, face_ends
from fvheat.mesh.segments import FaceLocator, segment_faces

#: a grid-aligned segment is exact; a sloped one is stepped, so its faces cover it only
#: approximately
ALIGNED_COVERAGE, SLOPED_COVERAGE = 0.99, 0.9


def coverage_warnings(case: Case, mesh: Mesh) -> list[str]:
    """One warning per segment lying on the body's outline for only part of its length."""
    locator = FaceLocator(mesh)
    out = []
    for k, b in enumerate(case.boundaries):
        for e, seg in enumerate(b.edges):
            _, _, covered = segment_faces(locator, seg)
            (x0, y0), (x1, y1) = seg
            aligned = x0 == x1 or y0 == y1
            if covered < (ALIGNED_COVERAGE if aligned else SLOPED_COVERAGE):
                length = float(np.hypot(x1 - x0, y1 - y0))
                out.append(
                    f"boundary {b.name!r} (boundaries.{k}.edges.{e}): the segment "
                    f"({x0:.6g}, {y0:.6g})–({x1:.6g}, {y1:.6g}) m lies on the body's outline "
                    f"for {100 * covered:.0f} % of its {length:.4g} m; the rest is off the body "
                    "or along an inner interface: check its end points"
                )
    return out


def adiabatic_gap_warnings(case: Case, mesh: Mesh) -> list[str]:
    """Warn about each run of adiabatic exterior faces that continues a surface straight on
    (a face of the run and a boundary face beside it share their normal) between boundaries
    of the same side: the same boundary, both warm or both cold sides of the junction, or
    boundaries with the same constant temperature. A cut-off plane cuts across the
    construction instead, at an angle to the surfaces it separates."""
    adiabatic = np.flatnonzero(mesh.b_boundary < 0)
    if adiabatic.size == 0 or not case.boundaries:
        return []
    ends = face_ends(mesh.b_centre, mesh.b_normal, mesh.b_area)
    scale = max(float(np.ptp(mesh.centres)), 1.0)
    # vertex ids of both ends of every boundary face (ends within 1e-9 of the size joined)
    vertex = coincident_ids(ends.reshape(-1, 2) / (1e-9 * scale)).reshape(-1, 2)
    nv = int(vertex.max()) + 1
    # the boundary faces meeting at each vertex
    faces_at = sp.coo_matrix(
        (np.ones(vertex.size), (vertex.ravel(), np.repeat(np.arange(vertex.shape[0]), 2))),
        shape=(nv, vertex.shape[0]),
    ).tocsr()
    # runs: adiabatic faces joined through shared vertices
    link = faces_at[:, adiabatic]
    count, run = connected_components((link.T @ link).tocsr(), directed=False)
    out = []
    for r in range(count):
        faces = adiabatic[run == r]
        beside = np.setdiff1d(faces_at[np.unique(vertex[faces])].indices, faces)
        neighbours = sorted({int(b) for b in mesh.b_boundary[beside] if b >= 0})
        if not neighbours or not _same_side(case, neighbours):
            continue
        if not _continues(mesh, vertex, faces, beside[mesh.b_boundary[beside] >= 0]):
            continue
        length = float(mesh.b_area[faces].sum())
        pts = ends[faces].reshape(-1, 2)
        (x0, y0), (x1, y1) = pts.min(axis=0), pts.max(axis=0)
        names = " and ".join(repr(case.boundaries[b].name) for b in neighbours)
        out.append(
            f"{1000 * length:.4g} mm of exterior edge between {names}, from ({x0:.4g}, "
            f"{y0:.4g}) to ({x1:.4g}, {y1:.4g}) m, is adiabatic (no boundary covers it): "
            "was a segment left out or mistyped?"
        )
    return out


def _continues(mesh: Mesh, vertex: np.ndarray, run: np.ndarray, beside: np.ndarray) -> bool:
    """Whether a boundary face of ``beside`` shares a vertex and its normal with a face of
    the adiabatic ``run``: the run goes on along the same straight surface."""
    for f in beside:
        at = run[np.isin(vertex[run], vertex[f]).any(axis=1)]
        if np.any(mesh.b_normal[at] @ mesh.b_normal[f] > 0.999):
            return True
    return False


def _same_side(case: Case, bids: list[int]) -> bool:
    """Whether the boundaries are on one side: all the same boundary, all on one side of
    the junction, or all tying the surface to the same constant temperature."""
    if len(bids) == 1:
        return True
    names = [case.boundaries[b].name for b in bids]
    j = case.junction
    if j is not None and (set(names) <= set(j.inside) or set(names) <= set(j.outside)):
        return True
    temps = set()
    for b in bids:
        sig = case.boundaries[b].reference_temperature
        if sig is None or not sig.is_constant:
            return False
        temps.add(float(sig.at(0.0)))
    return len(temps) == 1
