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


def probe_operator(mesh: Mesh, points: np.ndarray) -> sp.csr_matrix:
    """Matrix P (points × cells) with P·T the temperatures at ``points`` (m).

    Bilinear interpolation between the four surrounding cell centres of the rectilinear
    grid (exact for fields linear in x and y, and for uniform fields); beyond the outermost
    centres the value is held. Centres outside the body are dropped and the remaining
    weights renormalised; if none is left, the value of the cell containing the point.
    """
    g = mesh.grid
    if g is None:
        raise NotImplementedError("probe interpolation needs a rectilinear grid")
    pts = np.atleast_2d(np.asarray(points, dtype=float))
    x0, x1, wx = _bracket(g.xc, pts[:, 0])
    y0, y1, wy = _bracket(g.yc, pts[:, 1])
    cell = np.stack(
        [g.cell_index[y0, x0], g.cell_index[y0, x1], g.cell_index[y1, x0], g.cell_index[y1, x1]],
        axis=1,
    )
    w = np.stack([(1 - wx) * (1 - wy), wx * (1 - wy), (1 - wx) * wy, wx * wy], axis=1)
    w = np.where(cell >= 0, w, 0.0)
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
