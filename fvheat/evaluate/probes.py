"""Point temperatures: a sparse interpolation operator built once, applied to any field.

On the grid the operator interpolates between cell centres and holds the value beyond the
outermost ones, so a point between a surface and its cell's centre would read the cell's
temperature; :class:`PointTemperatures` adds, for such points, the surface's own part:
the surface temperature the solver balanced at that face, linearly over the half cell
(exact for a 1-D profile). A probe on an exchanging surface thus reports the surface
temperature, as the boundary results do (it read the cell's: 1.2 K off at an insulation
surface of 2 cm cells).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
import scipy.sparse as sp

from fvheat.mesh.mesh import Mesh

if TYPE_CHECKING:
    from fvheat.assembly.boundary import SurfaceTerms
    from fvheat.assembly.system import System


@dataclass(frozen=True)
class PointTemperatures:
    """Temperatures (°C) at points: ``operator`` (points × cells) applied to the cell field,
    plus, for the points ``point`` within half a cell of a surface face (the surface
    terms' index ``term``), ``weight`` × (surface − cell temperature) of that face."""

    operator: sp.csr_matrix
    point: np.ndarray
    term: np.ndarray
    weight: np.ndarray

    def __call__(self, system: System, temp: np.ndarray, t: float) -> np.ndarray:
        """The point temperatures (°C) of the cell field ``temp`` at ``t`` s, ``system``
        giving the surface balance (at the field's phases)."""
        values = self.operator @ temp
        if self.point.size:
            s = system.surface
            ts = s.surface_state(temp, t)[0][self.term]
            values[self.point] += self.weight * (ts - temp[s.cell[self.term]])
        return values


def point_temperatures(
    mesh: Mesh, surface: SurfaceTerms, points: np.ndarray, k_material: np.ndarray | None = None
) -> PointTemperatures:
    """:class:`PointTemperatures` of ``points`` (n, 2) m: :func:`probe_operator`, and on the
    grid the surface part of points lying within half a cell of a face with a boundary
    condition (the face whose strip holds the point nearest to it: depth below the face's
    centre-to-face distance, within the face's length along it)."""
    pts = np.atleast_2d(np.asarray(points, dtype=float)).reshape(-1, 2)
    operator = probe_operator(mesh, pts, k_material)
    none = np.zeros(0, dtype=np.int64)
    if mesh.grid is None or surface.face.size == 0 or pts.shape[0] == 0:
        return PointTemperatures(operator, none, none, np.zeros(0))
    f = surface.face
    centre, normal, dist = mesh.b_centre[f], mesh.b_normal[f], mesh.b_dist[f]
    tol = 1e-9 * max(float(np.ptp(mesh.centres)), 1.0)
    term = np.zeros(len(pts), dtype=np.int64)
    depth = np.full(len(pts), np.inf)
    for a in range(0, len(pts), CHUNK):  # (points, faces) arrays a chunk of points at a time
        rel = pts[a : a + CHUNK, None, :] - centre[None, :, :]
        d = -np.einsum("pfi,fi->pf", rel, normal)  # into the body from the face
        along = np.abs(rel[..., 0] * normal[:, 1] - rel[..., 1] * normal[:, 0])
        strip = (d >= -tol) & (d < dist - tol) & (along <= 0.5 * mesh.b_area[f] + tol)
        rank = np.where(strip, d, np.inf)
        term[a : a + CHUNK] = np.argmin(rank, axis=1)
        depth[a : a + CHUNK] = rank[np.arange(rank.shape[0]), term[a : a + CHUNK]]
    point = np.flatnonzero(np.isfinite(depth))
    term = term[point]
    weight = 1.0 - np.clip(depth[point], 0.0, None) / dist[term]
    return PointTemperatures(operator, point, term, weight)


#: points whose surface faces are searched at once (bounds a points × faces array)
CHUNK = 64


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
