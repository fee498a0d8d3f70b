"""Rectilinear non-uniform grid generator: Case → Mesh.

Grid lines fall on every region corner and boundary-segment end; between them cells are
graded (:func:`fvheat.mesh.grading.graded_lines`). Each grid cell takes the material of the
last region containing its centre (regions are painted in order); cells no region covers
are outside the body. Exterior faces are matched to boundary segments; faces on no segment
are adiabatic.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.mesh.geometry import points_in_polygon, segment_frame
from fvheat.mesh.grading import graded_lines, merge_close
from fvheat.mesh.mesh import Mesh, RectGrid


def build_mesh(case: Case, refine: float = 1.0) -> Mesh:
    """Mesh the case's regions and attach its boundaries.

    ``refine`` divides ``max_cell`` and ``min_cell`` (2 gives about four times the cells),
    for grid checks. Raises :class:`CaseError` when a boundary touches no exterior face or
    a probe lies outside the body.
    """
    x, y = grid_lines(case, refine)
    names = tuple(case.materials)
    mat = paint(case, x, y, names)
    mesh = faces_from_grid(x, y, mat, names, tuple(b.name for b in case.boundaries))
    mesh = attach_boundaries(case, mesh)
    check_probes(case, mesh)
    return mesh


def grid_lines(case: Case, refine: float = 1.0) -> tuple[np.ndarray, np.ndarray]:
    """x and y grid lines (m) through all region vertices and boundary-segment ends."""
    pts = [r.vertices for r in case.regions]
    pts += [np.asarray(e, float) for b in case.boundaries for e in b.edges]
    allpts = np.concatenate(pts)
    lo, hi = allpts.min(axis=0), allpts.max(axis=0)
    tol = 1e-9 * max(float(np.max(hi - lo)), 1.0)
    # only coordinates inside the regions' extent are grid lines
    rlo = np.min([r.vertices.min(axis=0) for r in case.regions], axis=0)
    rhi = np.max([r.vertices.max(axis=0) for r in case.regions], axis=0)
    s = case.mesh
    lines = []
    for axis in (0, 1):
        c = allpts[:, axis]
        c = c[(c >= rlo[axis] - tol) & (c <= rhi[axis] + tol)]
        keys = merge_close(c, tol)
        lines.append(graded_lines(keys, s.max_cell / refine, s.min_cell / refine, s.growth))
    return lines[0], lines[1]


def paint(case: Case, x: np.ndarray, y: np.ndarray, names: tuple[str, ...]) -> np.ndarray:
    """Material index per grid cell, shape (rows, columns); −1 outside every region."""
    mat = np.full((y.size - 1, x.size - 1), -1, dtype=np.int32)
    xc = 0.5 * (x[1:] + x[:-1])
    yc = 0.5 * (y[1:] + y[:-1])
    for region in case.regions:
        m = names.index(region.material)
        x0, y0, x1, y1 = region.bounds
        i0, i1 = np.searchsorted(xc, [x0, x1])
        j0, j1 = np.searchsorted(yc, [y0, y1])
        if region.is_box:
            mat[j0:j1, i0:i1] = m
            continue
        px, py = np.meshgrid(xc[i0:i1], yc[j0:j1])
        inside = points_in_polygon(px, py, region.vertices)
        mat[j0:j1, i0:i1][inside] = m
    return mat


def faces_from_grid(
    x: np.ndarray,
    y: np.ndarray,
    mat: np.ndarray,
    material_names: tuple[str, ...],
    boundary_names: tuple[str, ...],
) -> Mesh:
    """Build the face arrays of a rectilinear grid whose cells carry material ``mat``.

    Boundary faces come out adiabatic (``b_boundary`` = −1); see :func:`attach_boundaries`.
    """
    active = mat >= 0
    index = np.full(mat.shape, -1, dtype=np.int64)
    index[active] = np.arange(int(active.sum()))
    dx, dy = np.diff(x), np.diff(y)
    xc, yc = 0.5 * (x[1:] + x[:-1]), 0.5 * (y[1:] + y[:-1])
    DX, DY = np.meshgrid(dx, dy)
    XC, YC = np.meshgrid(xc, yc)

    centres = np.column_stack([XC[active], YC[active]])
    volumes = (DX * DY)[active]

    # Pad with inactive cells so every grid cell has four neighbours.
    pidx = np.pad(index, 1, constant_values=-1)
    own, nbr, area, d_o, d_n, fc, fn = [], [], [], [], [], [], []
    b_cell, b_area, b_dist, b_c, b_n = [], [], [], [], []
    # axis 0: faces on vertical grid lines (a left of b); axis 1: horizontal lines (a below b)
    for axis in (0, 1):
        if axis == 0:
            a, b = pidx[1:-1, :-1], pidx[1:-1, 1:]  # left/right cell of each vertical line
            fx = np.broadcast_to(x[None, :], a.shape)
            fy = np.broadcast_to(yc[:, None], a.shape)
            length = np.broadcast_to(dy[:, None], a.shape)
            half_a = np.broadcast_to(0.5 * np.pad(dx, (1, 0))[None, :], a.shape)
            half_b = np.broadcast_to(0.5 * np.pad(dx, (0, 1))[None, :], a.shape)
            normal = (1.0, 0.0)
        else:
            a, b = pidx[:-1, 1:-1], pidx[1:, 1:-1]  # below/above cell of each horizontal line
            fx = np.broadcast_to(xc[None, :], a.shape)
            fy = np.broadcast_to(y[:, None], a.shape)
            length = np.broadcast_to(dx[None, :], a.shape)
            half_a = np.broadcast_to(0.5 * np.pad(dy, (1, 0))[:, None], a.shape)
            half_b = np.broadcast_to(0.5 * np.pad(dy, (0, 1))[:, None], a.shape)
            normal = (0.0, 1.0)
        n = np.array(normal)
        inner = (a >= 0) & (b >= 0)
        own.append(a[inner])
        nbr.append(b[inner])
        area.append(length[inner])
        d_o.append(half_a[inner])
        d_n.append(half_b[inner])
        fc.append(np.column_stack([fx[inner], fy[inner]]))
        fn.append(np.tile(n, (int(inner.sum()), 1)))
        for cell, half, sign in ((a, half_a, 1.0), (b, half_b, -1.0)):
            other = b if sign > 0 else a
            ext = (cell >= 0) & (other < 0)
            b_cell.append(cell[ext])
            b_area.append(length[ext])
            b_dist.append(half[ext])
            b_c.append(np.column_stack([fx[ext], fy[ext]]))
            b_n.append(np.tile(sign * n, (int(ext.sum()), 1)))

    nb = sum(c.size for c in b_cell)
    return Mesh(
        centres=centres,
        volumes=volumes,
        material=mat[active].astype(np.int32),
        material_names=material_names,
        owner=np.concatenate(own),
        neighbour=np.concatenate(nbr),
        face_area=np.concatenate(area),
        d_owner=np.concatenate(d_o),
        d_neighbour=np.concatenate(d_n),
        face_centre=np.concatenate(fc),
        face_normal=np.concatenate(fn),
        b_cell=np.concatenate(b_cell),
        b_area=np.concatenate(b_area),
        b_dist=np.concatenate(b_dist),
        b_centre=np.concatenate(b_c),
        b_normal=np.concatenate(b_n),
        b_boundary=np.full(nb, -1, dtype=np.int32),
        b_exchange=np.ones(nb),
        boundary_names=boundary_names,
        grid=RectGrid(x=x, y=y, cell_index=index),
    )


def attach_boundaries(case: Case, mesh: Mesh) -> Mesh:
    """Mark the exterior faces lying on each boundary's segments (later boundaries win).

    On a grid-aligned segment a face belongs to it when its centre lies on the segment and
    it is parallel to it. On a sloped segment the body's edge is stepped: exterior faces
    whose centre lies within half a cell diagonal of the segment and that look out on the
    segment's outer side belong to it, with ``b_exchange`` their projection
    |n_face · n_segment| scaled so the stepped faces sum to the segment's true length.
    """
    bid = mesh.b_boundary.copy()
    exch = mesh.b_exchange.copy()
    c, nrm = mesh.b_centre, mesh.b_normal
    if mesh.grid is not None:
        dx = np.diff(mesh.grid.x)
        dy = np.diff(mesh.grid.y)
        # half-diagonal of the owning grid cell
        cols = np.searchsorted(mesh.grid.x, mesh.centres[mesh.b_cell, 0]) - 1
        rows = np.searchsorted(mesh.grid.y, mesh.centres[mesh.b_cell, 1]) - 1
        reach = 0.5 * np.hypot(dx[cols], dy[rows])
    else:
        reach = np.sqrt(mesh.volumes[mesh.b_cell])
    scale = max(float(np.ptp(mesh.centres)), 1.0)
    tol = 1e-9 * scale
    for k, b in enumerate(case.boundaries):
        hit = np.zeros(mesh.n_boundary_faces, dtype=bool)
        for e, (p0, p1) in enumerate(b.edges):
            t, n, length = segment_frame(np.array(p0), np.array(p1))
            rel = c - np.asarray(p0, float)
            along = rel @ t
            off = np.abs(rel @ n)
            proj = np.abs(nrm @ n)
            aligned = abs(t[0]) < 1e-12 or abs(t[1]) < 1e-12
            if aligned:
                on = (off <= tol) & (along > tol) & (along < length - tol) & (proj > 0.5)
                exch_e = np.ones_like(proj)
            else:
                near = (off <= reach) & (along > -tol) & (along < length + tol)
                # keep the faces looking out on the side the staircase faces mostly look to
                # (not those of a neighbouring straight edge at a shared corner), and scale
                # their projections so the stepped faces sum to the true length
                side = nrm @ n
                outward = np.sign(np.sum(mesh.b_area[near] * side[near]))
                on = near & (side * outward > 0.0)
                total = float(np.sum(mesh.b_area[on] * proj[on]))
                exch_e = proj * (length / total if total > 0 else 1.0)
            if not on.any():
                raise CaseError(
                    f"segment {list(map(list, (p0, p1)))} lies on no exterior edge of the body "
                    "(check its coordinates against the regions)",
                    file=str(case.source),
                    key=f"boundaries.{k}.edges.{e}",
                )
            hit |= on
            exch = np.where(on, exch_e, exch)
        bid[hit] = k
    return replace(mesh, b_boundary=bid, b_exchange=exch)


def check_probes(case: Case, mesh: Mesh) -> None:
    """Raise :class:`CaseError` for a probe that lies outside every cell of the body."""
    g = mesh.grid
    if g is None:
        return
    tol = 1e-12 * max(float(np.ptp(g.x)), float(np.ptp(g.y)), 1.0)
    for k, p in enumerate(case.probes):
        px, py = p.at
        cols = np.flatnonzero((g.x[:-1] <= px + tol) & (g.x[1:] >= px - tol))
        rows = np.flatnonzero((g.y[:-1] <= py + tol) & (g.y[1:] >= py - tol))
        if not (g.cell_index[np.ix_(rows, cols)] >= 0).any():
            raise CaseError(
                f"point {list(p.at)} is outside the body (no region covers it)",
                file=str(case.source),
                key=f"probes.{k}.at",
            )
