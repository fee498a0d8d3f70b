"""Which exterior faces of a mesh lie on a boundary segment.

A :class:`FaceLocator` sorts the boundary faces along x once, so each segment looks only
at the faces inside its own bounding box: meshing an outline of thousands of segments
costs about one pass over the boundary faces, not one pass per segment.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.mesh.geometry import segment_frame
from fvheat.mesh.mesh import Mesh

Segment = tuple[tuple[float, float], tuple[float, float]]


def face_reach(mesh: Mesh) -> np.ndarray:
    """Half the diagonal (m) of each boundary face's grid cell: how far a stepped face may
    lie from the sloped segment it belongs to."""
    if mesh.grid is None:
        return np.sqrt(mesh.volumes[mesh.b_cell])
    dx = np.diff(mesh.grid.x)
    dy = np.diff(mesh.grid.y)
    cols = np.searchsorted(mesh.grid.x, mesh.centres[mesh.b_cell, 0]) - 1
    rows = np.searchsorted(mesh.grid.y, mesh.centres[mesh.b_cell, 1]) - 1
    return 0.5 * np.hypot(dx[cols], dy[rows])


class FaceLocator:
    """The boundary faces of ``mesh`` sorted by the x of their centres, with their reach
    (:func:`face_reach`, m) and the mesh's coordinate tolerance (m)."""

    def __init__(self, mesh: Mesh):
        self.mesh = mesh
        self.reach = face_reach(mesh)
        self.tol = 1e-9 * max(float(np.ptp(mesh.centres)), 1.0)
        self.order = np.argsort(mesh.b_centre[:, 0], kind="stable")
        self.sorted_x = mesh.b_centre[self.order, 0]
        self.margin = float(self.reach.max(initial=0.0)) + self.tol

    def near(self, seg: Segment) -> np.ndarray:
        """Indices (sorted) of the boundary faces whose centre lies within the largest
        reach of the segment's bounding box: every face that can belong to it."""
        (x0, y0), (x1, y1) = seg
        m = self.margin
        lo, hi = np.searchsorted(self.sorted_x, [min(x0, x1) - m, max(x0, x1) + m])
        cand = self.order[lo:hi]
        y = self.mesh.b_centre[cand, 1]
        return np.sort(cand[(y >= min(y0, y1) - m) & (y <= max(y0, y1) + m)])


def segment_faces(locator: FaceLocator, seg: Segment) -> tuple[np.ndarray, np.ndarray, float]:
    """The exterior faces on segment ``seg`` ((x0, y0), (x1, y1)) m, their exchange
    fractions, and the fraction of the segment's length they cover (1 when the segment
    lies on the body's outline over its whole length). The first two are arrays over all
    boundary faces of the locator's mesh (a mask, and fractions that are 1 off the
    segment).

    On a grid-aligned segment a face belongs to it when its centre lies on the segment and
    it is parallel to it. On a sloped segment the body's edge is stepped: exterior faces
    whose centre lies within ``reach`` of the segment and that look out on the segment's
    outer side belong to it, with exchange fractions their projections |n_face · n_segment|
    scaled so the stepped faces sum to the segment's true length. On a mesh that follows
    the geometry (triangles) the faces lie on the segment itself.
    """
    mesh, tol = locator.mesh, locator.tol
    if mesh.vertex_centred:  # the mesh follows the geometry: faces lie on the segment
        from fvheat.mesh.triangles import exact_segment_faces

        return exact_segment_faces(mesh, seg, locator.near(seg), tol)
    nb = mesh.b_centre.shape[0]
    on_all, exch_all = np.zeros(nb, dtype=bool), np.ones(nb)
    cand = locator.near(seg)
    p0, p1 = np.asarray(seg[0], float), np.asarray(seg[1], float)
    c, nrm, area = mesh.b_centre[cand], mesh.b_normal[cand], mesh.b_area[cand]
    t, n, length = segment_frame(p0, p1)
    rel = c - p0
    along = rel @ t
    off = np.abs(rel @ n)
    proj = np.abs(nrm @ n)
    if abs(t[0]) < 1e-12 or abs(t[1]) < 1e-12:
        on = (off <= tol) & (along > tol) & (along < length - tol) & (proj > 0.5)
        on_all[cand] = on
        return on_all, exch_all, float(np.sum(area[on])) / length
    near = (off <= locator.reach[cand]) & (along > -tol) & (along < length + tol)
    # keep the faces looking out on the side the staircase faces mostly look to (not those
    # of a neighbouring straight edge at a shared corner); a full staircase's projections
    # sum to the segment's length
    side = nrm @ n
    outward = np.sign(np.sum(area[near] * side[near]))
    on = near & (side * outward > 0.0)
    total = float(np.sum(area[on] * proj[on]))
    on_all[cand] = on
    exch_all[cand] = proj * (length / total if total > 0 else 1.0)
    return on_all, exch_all, total / length


def attach_boundaries(case: Case, mesh: Mesh) -> Mesh:
    """Mark the exterior faces lying on each boundary's segments (:func:`segment_faces`),
    on either mesh.

    Raises :class:`CaseError` for a segment that lies on no exterior face and for a face
    that two boundaries claim.
    """
    bid = mesh.b_boundary.copy()
    exch = mesh.b_exchange.copy()
    locator = FaceLocator(mesh)
    for k, b in enumerate(case.boundaries):
        for e, seg in enumerate(b.edges):
            on, exch_e, _ = segment_faces(locator, seg)
            key = f"boundaries.{k}.edges.{e}"
            if not on.any():
                raise CaseError(
                    f"segment {_seg_text(seg)} lies on no exterior edge of the body "
                    "(check its coordinates against the regions)",
                    file=str(case.source),
                    key=key,
                )
            taken = on & (bid >= 0) & (bid != k)
            if taken.any():
                f = int(np.flatnonzero(taken)[0])
                other = case.boundaries[bid[f]].name
                x, y = mesh.b_centre[f]
                raise CaseError(
                    f"boundary {b.name!r} and boundary {other!r} both claim the exterior "
                    f"edge at ({x:.4g}, {y:.4g}) m ({int(taken.sum())} faces); a face can "
                    "have one condition only: shorten one of the segments",
                    file=str(case.source),
                    key=key,
                )
            bid[on] = k
            exch = np.where(on, exch_e, exch)
    return replace(mesh, b_boundary=bid, b_exchange=exch)


def _seg_text(seg: Segment) -> str:
    (x0, y0), (x1, y1) = seg
    return f"({x0:.6g}, {y0:.6g})–({x1:.6g}, {y1:.6g}) m"
