"""Point temperatures: a sparse interpolation operator built once, applied to any field."""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

from fvheat.mesh.mesh import Mesh


def _bracket(centres: np.ndarray, p: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Indices of the centres below and above each of ``p`` and the weight of the upper one
    (held at 0 or 1 beyond the outermost centres)."""
    if centres.size == 1:
        zero = np.zeros(p.size, dtype=int)
        return zero, zero, np.zeros(p.size)
    hi = np.clip(np.searchsorted(centres, p), 1, centres.size - 1)
    lo = hi - 1
    w = np.clip((p - centres[lo]) / (centres[hi] - centres[lo]), 0.0, 1.0)
    return lo, hi, w


def probe_operator(
    mesh: Mesh, points: np.ndarray, k_material: np.ndarray | None = None
) -> sp.csr_matrix:
    """Matrix P (points × cells) with P·T the temperatures at ``points`` (m).

    Bilinear interpolation between the four surrounding cell centres of the rectilinear
    grid (exact for fields linear in x and y, and for uniform fields); beyond the outermost
    centres the value is held. Centres outside the body are dropped and the remaining
    weights renormalised; if none is left, the value of the cell containing the point.

    With ``k_material`` (W/(m·K) per material) the interpolation respects material
    interfaces: the point belongs to the best-conducting material among the cells it lies
    in or on (at a corner of a metal profile, the metal), and only centres of that
    material take part (the field's gradient jumps at an interface, so averaging across
    it is wrong by the jump times the distance; within a good conductor the field is
    nearly uniform). On the triangle mesh the field is linear in each triangle and
    continuous, so it respects interfaces already.
    """
    if mesh.triangles is not None:
        return _barycentric_operator(mesh, points)
    g = mesh.grid
    if g is None:
        raise NotImplementedError("probe interpolation needs a rectilinear grid or triangles")
    pts = np.atleast_2d(np.asarray(points, dtype=float))
    x0, x1, wx = _bracket(g.xc, pts[:, 0])
    y0, y1, wy = _bracket(g.yc, pts[:, 1])
    cell = np.stack(
        [g.cell_index[y0, x0], g.cell_index[y0, x1], g.cell_index[y1, x0], g.cell_index[y1, x1]],
        axis=1,
    )
    w = np.stack([(1 - wx) * (1 - wy), wx * (1 - wy), (1 - wx) * wy, wx * wy], axis=1)
    w = np.where(cell >= 0, w, 0.0)
    if k_material is not None:
        own = _point_material(mesh, pts, k_material)
        same = (cell >= 0) & (mesh.material[np.maximum(cell, 0)] == own[:, None])
        w = np.where(same | (own[:, None] < 0), w, 0.0)
        alone = (w.sum(axis=1) <= 0.0) & (own >= 0)
        if alone.any():  # no centre of its material around: its own cell
            cell[alone, 0] = _own_cell(mesh, pts[alone], own[alone])
            w[alone] = [1.0, 0.0, 0.0, 0.0]
    total = w.sum(axis=1)
    empty = total <= 0.0
    if empty.any():  # the grid cell that contains the point
        i = np.clip(np.searchsorted(g.x, pts[empty, 0], side="right") - 1, 0, g.xc.size - 1)
        j = np.clip(np.searchsorted(g.y, pts[empty, 1], side="right") - 1, 0, g.yc.size - 1)
        cell[empty, 0] = g.cell_index[j, i]
        w[empty] = [1.0, 0.0, 0.0, 0.0]
        total[empty] = 1.0
    w /= total[:, None]
    rows = np.repeat(np.arange(pts.shape[0]), 4)
    keep = w.ravel() > 0.0
    return sp.csr_matrix(
        (w.ravel()[keep], (rows[keep], cell.ravel()[keep])), shape=(pts.shape[0], mesh.n_cells)
    )


def _touching(mesh: Mesh, pts: np.ndarray) -> np.ndarray:
    """The (up to four) cells whose closure contains each point (n, 4), −1 where none."""
    g = mesh.grid
    assert g is not None
    tol = 1e-9 * max(float(np.ptp(g.x)), float(np.ptp(g.y)), 1.0)
    out = []
    for dx, dy in ((-tol, -tol), (tol, -tol), (-tol, tol), (tol, tol)):
        i = np.searchsorted(g.x, pts[:, 0] + dx, side="right") - 1
        j = np.searchsorted(g.y, pts[:, 1] + dy, side="right") - 1
        ok = (i >= 0) & (i < g.xc.size) & (j >= 0) & (j < g.yc.size)
        out.append(
            np.where(
                ok, g.cell_index[np.clip(j, 0, g.yc.size - 1), np.clip(i, 0, g.xc.size - 1)], -1
            )
        )
    return np.stack(out, axis=1)


def _point_material(mesh: Mesh, pts: np.ndarray, k_material: np.ndarray) -> np.ndarray:
    """Material of each point: the best-conducting one among the cells touching it (−1
    outside the body)."""
    cells = _touching(mesh, pts)
    mat = np.where(cells >= 0, mesh.material[np.maximum(cells, 0)], -1)
    k = np.where(mat >= 0, k_material[np.maximum(mat, 0)], -np.inf)
    return mat[np.arange(len(pts)), np.argmax(k, axis=1)]


def _own_cell(mesh: Mesh, pts: np.ndarray, own: np.ndarray) -> np.ndarray:
    """A cell of material ``own`` touching each point."""
    cells = _touching(mesh, pts)
    ok = (cells >= 0) & (mesh.material[np.maximum(cells, 0)] == own[:, None])
    return cells[np.arange(len(pts)), np.argmax(ok, axis=1)]


def _barycentric_operator(mesh: Mesh, points: np.ndarray) -> sp.csr_matrix:
    """Linear interpolation inside the triangle containing each point (the box method's
    own field: linear in every triangle, so one material's values only, continuous across
    interfaces); a point outside the body takes the nearest vertex's value."""
    from fvheat.mesh.triangles import find_triangles

    assert mesh.triangles is not None
    pts = np.atleast_2d(np.asarray(points, dtype=float)).reshape(-1, 2)
    if pts.shape[0] == 0:
        return sp.csr_matrix((0, mesh.n_cells))
    tri, lam = find_triangles(mesh, pts)
    cols = mesh.triangles[np.maximum(tri, 0)]
    out = tri < 0
    if out.any():
        from scipy.spatial import cKDTree

        _, nearest = cKDTree(mesh.centres).query(pts[out])
        cols[out] = np.asarray(nearest)[:, None]
        lam[out] = [1.0, 0.0, 0.0]
    rows = np.repeat(np.arange(pts.shape[0]), 3)
    return sp.csr_matrix((lam.ravel(), (rows, cols.ravel())), shape=(pts.shape[0], mesh.n_cells))
