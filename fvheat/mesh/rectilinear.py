"""Rectilinear non-uniform grid generator: Case → Mesh.

Grid lines fall on every region corner and boundary-segment end; cells shrink towards
re-entrant corners of exchanging surfaces (where the inside surface is coldest) and points
where the surface's temperature condition changes; between
them cells are graded (:func:`fvheat.mesh.grading.graded_lines`). Each grid cell takes the
material of the last region containing its centre (regions are painted in order); cells no
region covers are outside the body. Exterior faces are matched to boundary segments; faces
on no segment are adiabatic.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.mesh.geometry import grid_in_polygon, points_in_polygon, points_on_segments
from fvheat.mesh.grading import LinePlan, merge_close, plan_lines
from fvheat.mesh.mesh import Mesh, RectGrid
from fvheat.mesh.segments import attach_boundaries
from fvheat.mesh.size import check_grid_size, check_node_count


def build_mesh(case: Case, refine: float = 1.0) -> Mesh:
    """Mesh the case's regions and attach its boundaries.

    ``refine`` divides the size function everywhere (``max_cell``, ``min_cell``, the corner
    cell size, and the logarithm of ``growth``), so that 2 splits every cell in about two
    in each direction (grid checks). Cells shrink to ``corner_size`` towards every
    re-entrant corner of an exchanging surface (see :func:`reentrant_corners`). Raises
    :class:`CaseError` when a boundary touches no exterior face or a probe lies outside
    the body.
    """
    names = tuple(case.materials)
    x, y = _checked_lines(case, refine, None)
    owner = paint_regions(case, x, y)
    corners = reentrant_corners(case, x, y, owner)
    if corners.size:
        x, y = _checked_lines(case, refine, corners)
        owner = paint_regions(case, x, y)
    material = np.array([names.index(r.material) for r in case.regions], dtype=np.int32)
    mat = np.where(owner >= 0, material[owner], -1).astype(np.int32)
    mesh = faces_from_grid(x, y, mat, names, tuple(b.name for b in case.boundaries))
    assert mesh.grid is not None
    mesh = replace(mesh, region=owner[mesh.grid.cell_index >= 0])
    mesh = attach_boundaries(case, mesh)
    check_probes(case, mesh)
    return mesh


#: an outline turning by more than this at a vertex makes the vertex a corner of the grid
#: (a chamfer's end, a polygon's corner); flattened arcs turn less at each chord
CORNER_TURN_DEG = 30.0


def key_lines(case: Case) -> tuple[list[np.ndarray], float]:
    """Sorted x and y coordinates (m) every grid must contain, and the tolerance (m)
    within which two coordinates are one.

    From region outlines and holes: the x of every vertex on a vertical edge, the y of
    every vertex on a horizontal edge, both coordinates of every vertex where the outline
    turns by more than :data:`CORNER_TURN_DEG` (so the chords of a flattened curve add no
    lines of their own), and the outline's extent. From boundary segments: the ends of
    grid-aligned segments that lie on the body (a segment drawn past the body's edge must
    not change the mesh).
    """
    rings = [r.vertices for r in case.regions] + [h for r in case.regions for h in r.holes]
    allpts = np.concatenate(rings)
    tol = 1e-9 * max(float(np.max(allpts.max(axis=0) - allpts.min(axis=0))), 1.0)
    xs, ys = [], []
    for ring in rings:
        on_x, on_y = _ring_keys(ring)
        # the outline's extent too, so that the grid covers the whole body
        xs += [ring[on_x, 0], [ring[:, 0].min(), ring[:, 0].max()]]
        ys += [ring[on_y, 1], [ring[:, 1].min(), ring[:, 1].max()]]
    for b in case.boundaries:
        for (x0, y0), (x1, y1) in b.edges:
            if x0 == x1 or y0 == y1:
                ends = np.array([[x0, y0], [x1, y1]])[on_body(case, np.array([[x0, y0], [x1, y1]]))]
                xs.append(ends[:, 0])
                ys.append(ends[:, 1])
    keys = [merge_close(np.concatenate(v), tol) for v in (xs, ys)]
    return keys, tol


def _ring_keys(ring: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Which vertices of a closed outline give an x key line and which a y key line."""
    e_in = ring - np.roll(ring, 1, axis=0)
    e_out = np.roll(ring, -1, axis=0) - ring
    length_in, length_out = np.hypot(*e_in.T), np.hypot(*e_out.T)
    vertical = (np.abs(e_in[:, 0]) <= 1e-12 * length_in) | (
        np.abs(e_out[:, 0]) <= 1e-12 * length_out
    )
    horizontal = (np.abs(e_in[:, 1]) <= 1e-12 * length_in) | (
        np.abs(e_out[:, 1]) <= 1e-12 * length_out
    )
    cos_turn = np.einsum("ij,ij->i", e_in, e_out) / np.maximum(length_in * length_out, 1e-300)
    corner = cos_turn < np.cos(np.radians(CORNER_TURN_DEG))
    return vertical | corner, horizontal | corner


def on_body(case: Case, points: np.ndarray) -> np.ndarray:
    """Whether each point (n, 2) m lies inside or on the outline of some region."""
    inside = np.zeros(len(points), dtype=bool)
    for r in case.regions:
        x0, y0, x1, y1 = r.bounds
        near = (
            (points[:, 0] >= x0 - 1e-9 * max(x1 - x0, 1.0))
            & (points[:, 0] <= x1 + 1e-9 * max(x1 - x0, 1.0))
            & (points[:, 1] >= y0 - 1e-9 * max(y1 - y0, 1.0))
            & (points[:, 1] <= y1 + 1e-9 * max(y1 - y0, 1.0))
            & ~inside
        )
        if near.any():
            inside[near] = points_in_polygon(points[near, 0], points[near, 1], r.vertices)
    return inside


def grid_plans(
    case: Case,
    refine: float = 1.0,
    corners: np.ndarray | None = None,
    *,
    corners_everywhere: bool = False,
) -> tuple[LinePlan, LinePlan]:
    """The x and y grid lines (m) of :func:`grid_lines`, planned (cell counts known) but
    not yet placed; ``corners_everywhere``: as if every key line ran through a re-entrant
    corner (the most cells the corner refinement can add)."""
    keys, tol = key_lines(case)
    s = case.mesh
    plans = []
    for axis in (0, 1):
        first = np.full(keys[axis].size, s.min_cell / refine)
        if corners_everywhere:
            first[:] = min(s.corner_size, s.min_cell) / refine
        elif corners is not None and corners.size:
            near = np.abs(keys[axis][:, None] - corners[None, :, axis]).min(axis=1) <= tol
            first[near] = min(s.corner_size, s.min_cell) / refine
        plans.append(
            plan_lines(
                keys[axis],
                s.max_cell / refine,
                s.min_cell / refine,
                s.growth ** (1 / refine),
                first,
            )
        )
    return plans[0], plans[1]


def grid_lines(
    case: Case, refine: float = 1.0, corners: np.ndarray | None = None
) -> tuple[np.ndarray, np.ndarray]:
    """x and y grid lines (m) through all region vertices and boundary-segment ends, the
    first cells at the key lines through ``corners`` ((k, 2) m) of size ``corner_size``."""
    px, py = grid_plans(case, refine, corners)
    return px.coordinates(), py.coordinates()


def _checked_lines(
    case: Case, refine: float, corners: np.ndarray | None
) -> tuple[np.ndarray, np.ndarray]:
    """:func:`grid_lines`, after checking the grid's size against ``[mesh] max_cells``."""
    px, py = grid_plans(case, refine, corners)
    at_most = None
    if corners is None and px.cells * py.cells > case.mesh.max_cells:
        wx, wy = grid_plans(case, refine, corners_everywhere=True)
        at_most = wx.cells * wy.cells
    check_grid_size(case, px.cells, py.cells, refined=refine > 1.0, at_most=at_most)
    return px.coordinates(), py.coordinates()


def check_refined_size(case: Case, mesh: Mesh, refine: float) -> None:
    """Raise :class:`CaseError` when the mesh refined by ``refine`` (a grid check) would
    exceed ``[mesh] max_cells``: estimated from ``mesh``'s own re-entrant corners, before
    anything is solved or allocated. A triangle mesh (no grid) refined by the grid check
    has about four nodes for each of its own."""
    g = mesh.grid
    if mesh.triangles is not None:
        check_node_count(case, mesh.n_cells * round(refine) ** 2, refined=True)
        return
    assert g is not None  # every mesh is a grid or triangles
    px, py = grid_plans(case, refine, reentrant_corners(case, g.x, g.y, g.cell_index))
    check_grid_size(case, px.cells, py.cells, refined=True)


def reentrant_corners(case: Case, x: np.ndarray, y: np.ndarray, mat: np.ndarray) -> np.ndarray:
    """Re-entrant corners (k, 2) m of the body painted as ``mat`` (≥ 0 in the body) on the
    grid ``x``, ``y``:
    grid vertices on key lines in both directions with three of their four cells in the
    body, lying on a boundary that ties the surface to a temperature (surface exchange or
    fixed temperature). The inside surface is coldest at such corners (a window reveal
    meeting the frame, a slab soffit meeting the wall), where its temperature changes
    steeply. Then the points of :func:`condition_changes`.
    """
    keys, tol = key_lines(case)
    changes = condition_changes(case, tol)
    act = np.pad(mat >= 0, 1).astype(np.int8)
    count = act[:-1, :-1] + act[:-1, 1:] + act[1:, :-1] + act[1:, 1:]
    j, i = np.nonzero(count == 3)
    if j.size == 0:
        return changes
    on_keys = _near_any(x[i], keys[0], tol) & _near_any(y[j], keys[1], tol)
    pts = np.column_stack([x[i], y[j]])[on_keys]
    segs = [e for b in case.boundaries if b.kind != "flux" for e in b.edges]
    if not segs or pts.size == 0:
        return changes
    return np.concatenate([pts[points_on_segments(pts, segs, tol)], changes])


def condition_changes(case: Case, tol: float) -> np.ndarray:
    """Points (k, 2) m where a boundary tying the surface to one temperature meets one tying
    it to another (an inside surface running on into an unheated space's, or round a corner
    into the outside's): the surface temperature changes steeply there too, and the lowest
    inside surface temperature can lie at that very point (0.2 K too warm with a plain
    grid on a wall beside an unheated stair, 5 K at a corner where inside meets outside)."""
    tied = [b for b in case.boundaries if b.ties_temperature]
    out = []
    for a, ba in enumerate(tied):
        ends = np.array([p for e in ba.edges for p in e], dtype=float).reshape(-1, 2)
        for bb in tied[a + 1 :]:
            if ba.reference_temperature == bb.reference_temperature:
                continue
            out.append(ends[points_on_segments(ends, list(bb.edges), tol)])
    return np.concatenate(out) if out else np.zeros((0, 2))


def _near_any(values: np.ndarray, keys: np.ndarray, tol: float) -> np.ndarray:
    """Whether each of ``values`` lies within ``tol`` of one of the sorted ``keys``."""
    k = np.searchsorted(keys, values)
    below = keys[np.clip(k - 1, 0, keys.size - 1)]
    above = keys[np.clip(k, 0, keys.size - 1)]
    return np.minimum(np.abs(values - below), np.abs(values - above)) <= tol


def paint_regions(case: Case, x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Index of the region that paints each grid cell, shape (rows, columns): the last one
    whose outline contains the cell centre and none of whose holes does; −1 outside every
    region."""
    owner = np.full((y.size - 1, x.size - 1), -1, dtype=np.int32)
    xc = 0.5 * (x[1:] + x[:-1])
    yc = 0.5 * (y[1:] + y[:-1])
    for k, region in enumerate(case.regions):
        x0, y0, x1, y1 = region.bounds
        i0, i1 = np.searchsorted(xc, [x0, x1])
        j0, j1 = np.searchsorted(yc, [y0, y1])
        if region.is_box and not region.holes:
            owner[j0:j1, i0:i1] = k
            continue
        xs, ys = xc[i0:i1], yc[j0:j1]
        if region.is_box:
            inside = np.ones((ys.size, xs.size), dtype=bool)
        else:
            inside = grid_in_polygon(xs, ys, region.vertices)
        for hole in region.holes:  # cells centred in a hole keep what was painted before
            inside &= ~grid_in_polygon(xs, ys, hole)
        owner[j0:j1, i0:i1][inside] = k
    return owner


def faces_from_grid(
    x: np.ndarray,
    y: np.ndarray,
    mat: np.ndarray,
    material_names: tuple[str, ...],
    boundary_names: tuple[str, ...],
) -> Mesh:
    """Build the face arrays of a rectilinear grid whose cells carry material ``mat``.

    Cells are numbered row by row (y outer, x inner). Interior faces come first on the
    vertical grid lines (owner left of neighbour), then on the horizontal ones (owner
    below). Boundary faces come out adiabatic (``b_boundary`` = −1); see
    :func:`attach_boundaries`. Work is O(cells), gathers over index arrays only.
    """
    active = mat >= 0
    n = int(np.count_nonzero(active))
    index = np.full(mat.shape, -1, dtype=np.int64)
    index[active] = np.arange(n)
    dx, dy = np.diff(x), np.diff(y)
    xc, yc = 0.5 * (x[1:] + x[:-1]), 0.5 * (y[1:] + y[:-1])
    rows, cols = np.nonzero(active)  # row-major, the order of the cell numbers
    centres = np.column_stack([xc[cols], yc[rows]])
    volumes = dx[cols] * dy[rows]

    # axis 0: vertical line x[i] between columns i − 1 (a) and i (b) of cell row j;
    # axis 1: horizontal line y[j] between rows j − 1 (a) and j (b) of cell column i
    half_x = 0.5 * np.concatenate([[0.0], dx, [0.0]])  # padded: cell column c at c + 1
    half_y = 0.5 * np.concatenate([[0.0], dy, [0.0]])

    def geometry(axis: int, j: np.ndarray, i: np.ndarray) -> tuple[np.ndarray, ...]:
        """Face length, half widths of the a- and b-cells, face centre x and y."""
        if axis == 0:
            return dy[j], half_x[i], half_x[i + 1], x[i], yc[j]
        return dx[i], half_y[j], half_y[j + 1], xc[i], y[j]

    # one pass per axis finds the faces; the output arrays are filled slice by slice
    groups = [
        _axis_faces(np.pad(index, pad, constant_values=-1), axis)
        for axis, pad in ((0, ((0, 0), (1, 1))), (1, ((1, 1), (0, 0))))
    ]
    nf = sum(g[0][0].size for g in groups)
    nb = sum(g[1][0].size + g[2][0].size for g in groups)
    own, nbr = np.empty(nf, dtype=np.int64), np.empty(nf, dtype=np.int64)
    area, d_o, d_n = np.empty(nf), np.empty(nf), np.empty(nf)
    face_centre, face_normal = np.empty((nf, 2)), np.zeros((nf, 2))
    b_cell = np.empty(nb, dtype=np.int64)
    b_area, b_dist = np.empty(nb), np.empty(nb)
    b_centre, b_normal = np.empty((nb, 2)), np.zeros((nb, 2))
    f0 = b0 = 0
    for axis, ((j, i, a, b), *exterior) in enumerate(groups):
        s = slice(f0, f0 + j.size)
        own[s], nbr[s] = a, b
        area[s], d_o[s], d_n[s], face_centre[s, 0], face_centre[s, 1] = geometry(axis, j, i)
        face_normal[s, axis] = 1.0
        f0 = s.stop
        # the a-cell's exterior face looks to +axis, the b-cell's to −axis
        for side, (j, i, cell) in zip((1.0, -1.0), exterior, strict=True):
            s = slice(b0, b0 + j.size)
            length, h_a, h_b, fx, fy = geometry(axis, j, i)
            b_cell[s], b_area[s], b_dist[s] = cell, length, h_a if side > 0 else h_b
            b_centre[s, 0], b_centre[s, 1] = fx, fy
            b_normal[s, axis] = side
            b0 = s.stop
    return Mesh(
        centres=centres,
        volumes=volumes,
        material=mat[active].astype(np.int32),
        material_names=material_names,
        owner=own,
        neighbour=nbr,
        face_area=area,
        d_owner=d_o,
        d_neighbour=d_n,
        face_centre=face_centre,
        face_normal=face_normal,
        b_cell=b_cell,
        b_area=b_area,
        b_dist=b_dist,
        b_centre=b_centre,
        b_normal=b_normal,
        b_boundary=np.full(nb, -1, dtype=np.int32),
        b_exchange=np.ones(nb),
        boundary_names=boundary_names,
        grid=RectGrid(x=x, y=y, cell_index=index),
    )


def _axis_faces(padded: np.ndarray, axis: int) -> tuple[tuple[np.ndarray, ...], ...]:
    """Faces of the grid lines across ``axis`` of a cell-index array padded with −1.

    Returns, for interior faces, exterior faces of the lower-side cell (a) and exterior
    faces of the upper-side cell (b): (face-grid rows, face-grid columns, cells...) with
    both cells (a, b) for interior faces and the one active cell for exterior ones.
    """
    if axis == 0:
        a, b = padded[:, :-1], padded[:, 1:]
    else:
        a, b = padded[:-1, :], padded[1:, :]
    has_a, has_b = a >= 0, b >= 0
    out = []
    for mask, cells in (
        (has_a & has_b, (a, b)),
        (has_a & ~has_b, (a,)),
        (has_b & ~has_a, (b,)),
    ):
        j, i = np.nonzero(mask)
        out.append((j, i, *(c[j, i] for c in cells)))
    return tuple(out)


#: points per probe line checked to lie in the body: 5 × 400 + 1, a superset of the
#: 401 equally spaced points fvheat.evaluate.fronts samples along a line
LINE_CHECK_POINTS = 2001


def check_probes(case: Case, mesh: Mesh) -> None:
    """Raise :class:`CaseError` for a probe that lies outside every cell of the body, and
    for a probe line that leaves the body anywhere along its length."""
    g = mesh.grid
    if g is None:
        return
    tol = 1e-12 * max(float(np.ptp(g.x)), float(np.ptp(g.y)), 1.0)
    for k, p in enumerate(case.probes):
        if not _in_body(g, np.array([p.at]), tol)[0]:
            raise CaseError(
                f"point {list(p.at)} is outside the body (no region covers it)",
                file=str(case.source),
                key=f"probes.{k}.at",
            )
    s = np.linspace(0.0, 1.0, LINE_CHECK_POINTS)[:, None]
    for k, line in enumerate(case.probe_lines):
        a, b = np.asarray(line.start, float), np.asarray(line.end, float)
        pts = a + s * (b - a)
        inside = _in_body(g, pts, tol)
        if not inside.all():
            x, y = pts[int(np.argmin(inside))]
            raise CaseError(
                f"the line from {list(line.start)} to {list(line.end)} leaves the body at "
                f"({x:.6g}, {y:.6g}) m (no region covers it): a probe line must run "
                "through the body over its whole length",
                file=str(case.source),
                key=f"probe_lines.{k}",
            )


def _in_body(g: RectGrid, pts: np.ndarray, tol: float) -> np.ndarray:
    """Whether each point (n, 2) m lies in, or within ``tol`` of, a cell of the body."""
    nx, ny = g.x.size - 1, g.y.size - 1
    out = np.zeros(len(pts), dtype=bool)
    for dx in (-tol, tol):
        for dy in (-tol, tol):
            i = np.searchsorted(g.x, pts[:, 0] + dx, side="right") - 1
            j = np.searchsorted(g.y, pts[:, 1] + dy, side="right") - 1
            ok = (i >= 0) & (i < nx) & (j >= 0) & (j < ny)
            cell = g.cell_index[np.clip(j, 0, ny - 1), np.clip(i, 0, nx - 1)]
            out |= ok & (cell >= 0)
    return out
