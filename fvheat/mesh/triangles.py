"""Conforming triangle meshes: Case → vertex-centred Mesh (the box method).

Every region outline and hole, every boundary segment, flanking cut and probe point is a
constraint of the triangulation (the `triangle` library: constrained, quality-bounded
Delaunay). Sizes follow ``[mesh]``: edges of about ``max_cell`` far from corners, shrinking
to ``min_cell`` at every outline corner and boundary-segment end (``corner_cell`` at
corners on surfaces tied to a temperature, a quarter of it at their re-entrant corners),
growing by ``growth`` per cell in between.
Each triangle takes the material of the last region containing its centroid (triangles
never straddle an outline, so this is exact); triangles no region covers are dropped.

The faces are those of the box method (:func:`box_faces`): every triangle contributes a
piece of dual edge (edge midpoint → centroid) to each of its three edges with the
conductance k_T·½·cot θ (θ the angle opposite the edge), which makes the conduction matrix
the P1 finite-element stiffness matrix, symmetric and exact at material interfaces.
"""

from __future__ import annotations

import logging

import numpy as np
from scipy.spatial import cKDTree

from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.mesh.geometry import points_in_polygon, segment_frame
from fvheat.mesh.lattice import SPACING, seed_points
from fvheat.mesh.mesh import Mesh
from fvheat.mesh.rectilinear import CORNER_TURN_DEG, on_body
from fvheat.mesh.segments import attach_boundaries
from fvheat.mesh.size import check_node_count

log = logging.getLogger(__name__)

#: smallest angle (degrees) triangle keeps in every triangle it makes (where the input
#: angles allow): 25° keeps the refinement terminating for any input
MIN_ANGLE_DEG = 25.0
#: refinement passes towards the size function
PASSES = 6
#: edges at a re-entrant corner of a surface tied to a temperature are ``corner_cell``
#: divided by this. The box method reads the surface temperature at the corner node itself,
#: and the node's two half-edges exchange heat at the node value (lumped), so the corner
#: value's error falls about linearly with the corner edge (measured on
#: cases/wall_window_junction.toml, glass meets frame, against the scikit-fem reference of
#: tests/validation/test_corner_points.py: +0.064, +0.023, −0.005 K at 1, 0.5, 0.25 mm),
#: where the grid extrapolates to the corner from a face centre half a cell away.
REENTRANT_DIVISOR = 4.0


def build_triangle_mesh(case: Case, refine: float = 1.0) -> Mesh:
    """Triangulate the case's regions and attach its boundaries (see the module text).

    ``refine`` divides every size (and the logarithm of ``growth``), as for the
    rectilinear grid. Raises :class:`CaseError` for a boundary on no exterior edge, an edge
    two boundaries claim, or a probe outside the body.
    """
    import triangle

    points, segments, _ = constraints(case)
    size = size_function(case, refine)
    pslg = {"vertices": points, "segments": segments}
    rough = triangle.triangulate(pslg, "pQ")
    region = paint_triangles(case, rough["vertices"], rough["triangles"])
    outside = rough["vertices"][rough["triangles"][region < 0]].mean(axis=1)
    if outside.size:
        pslg["holes"] = outside
    flags = f"pq{MIN_ANGLE_DEG:g}Q"
    # triangle reads the area bound as a plain decimal (no exponent)
    # the body at the largest size alone: about one node per two triangles, before any is made
    body = float(_triangle_areas(rough["vertices"], rough["triangles"][region >= 0]).sum())
    check_node_count(case, int(body / float(_area(size.largest)) / 2), refined=refine > 1.0)
    largest = np.format_float_positional(float(_area(size.largest)), trim="-")
    seeds = seed_points(
        points,
        segments,
        SPACING * size.largest,
        lambda p: paint_points(case, p) >= 0,
        size,
        size.largest,
    )
    pslg["vertices"] = np.vstack([points, seeds])
    tri = triangle.triangulate(pslg, flags + f"a{largest}")
    for _ in range(PASSES if size.graded else 0):
        v, t = tri["vertices"], tri["triangles"]
        target = _area(size(v[t].mean(axis=1)))
        area = _triangle_areas(v, t)
        if np.all(area <= 1.3 * target):
            break  # every triangle within 1.3 × its target area
        # the triangles this pass will make (each at most its target area), before it runs
        planned = float((area / target).clip(1.0).sum())
        check_node_count(case, int(planned / 2), refined=refine > 1.0)
        tri = triangle.triangulate(dict(tri, triangle_max_area=target), "r" + flags + "a")
    v, t = tri["vertices"], tri["triangles"].astype(np.int64)
    return finish_mesh(case, v, t, paint_triangles(case, v, t))


def finish_mesh(case: Case, v: np.ndarray, t: np.ndarray, region: np.ndarray) -> Mesh:
    """The box-method mesh of triangles ``t`` on points ``v`` (m) painted by ``region``
    (index of the case region per triangle, −1: dropped), with the case's boundaries
    attached and its probes checked."""
    from dataclasses import replace

    from fvheat.mesh.ordering import spatial_order

    keep = region >= 0
    used, t = np.unique(t[keep], return_inverse=True)
    # nodes along a Z-order curve, triangles by their first node: memory locality for
    # assembly, the AMG hierarchy and every matrix product (see mesh/ordering.py)
    order = spatial_order(v[used])
    used = used[order]
    rank = np.empty_like(order)
    rank[order] = np.arange(order.size)
    t = rank[t.reshape(-1, 3)]
    by_node = np.argsort(t.min(axis=1), kind="stable")
    t = t[by_node]
    tri_region = region[keep][by_node]
    names = tuple(case.materials)
    material = np.array([names.index(r.material) for r in case.regions], dtype=np.int32)
    mesh = box_mesh(v[used], t, material[tri_region], names, tuple(b.name for b in case.boundaries))
    mesh = replace(
        mesh,
        piece_region=np.repeat(tri_region, 3),
        region=_dominant(mesh, np.repeat(tri_region, 3)),
    )
    mesh = attach_boundaries(case, mesh)
    check_probes(case, mesh)
    return mesh


def _area(h: np.ndarray | float) -> np.ndarray:
    """Area (m²) of an equilateral triangle of edge ``h`` (m)."""
    return np.sqrt(3.0) / 4.0 * np.asarray(h, float) ** 2


def _triangle_areas(v: np.ndarray, t: np.ndarray) -> np.ndarray:
    a, b, c = v[t[:, 0]], v[t[:, 1]], v[t[:, 2]]
    return 0.5 * (
        (b[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1]) - (b[:, 1] - a[:, 1]) * (c[:, 0] - a[:, 0])
    )


#: corner groups up to this many points are measured point by point, larger ones by a tree
FEW_CORNERS = 4


class SizeFunction:
    """Target edge length h(x) = min(max_cell, min over corners c of s_c + (g − 1)·|x − c|)
    (m), with s_c the corner's first size and g the growth ratio."""

    def __init__(self, largest: float, groups: list[tuple[np.ndarray, float]], growth: float):
        self.largest = largest
        self.growth = growth
        # a group whose size is not below the largest cannot lower h anywhere
        self.groups = [(np.asarray(p, float), s) for p, s in groups if len(p) and s < largest]
        self.trees = [cKDTree(p) if len(p) > FEW_CORNERS else None for p, _ in self.groups]

    @property
    def graded(self) -> bool:
        """Whether any corner asks for edges shorter than the largest."""
        return bool(self.groups)

    def __call__(self, x: np.ndarray) -> np.ndarray:
        """h (m) at the points ``x`` (n, 2) m."""
        h = np.full(len(x), self.largest)
        slope = self.growth - 1.0
        for (p, s), tree in zip(self.groups, self.trees, strict=True):
            # beyond (largest − s)/slope of every corner the group cannot lower h: the
            # tree stops searching there (distance inf), most points of a large mesh
            reach = (self.largest - s) / slope if slope > 0.0 else np.inf
            if tree is not None:
                d, _ = tree.query(x, distance_upper_bound=reach * (1.0 + 1e-9))
            else:  # a few corners: all distances, vectorised, cheaper than the tree
                d = np.full(len(x), np.inf)
                for c in p:
                    d = np.minimum(d, np.hypot(x[:, 0] - c[0], x[:, 1] - c[1]))
            h = np.minimum(h, s + slope * d)
        return h


def size_function(case: Case, refine: float = 1.0) -> SizeFunction:
    """The size function of the case's ``[mesh]`` settings (see :class:`SizeFunction`)."""
    s = case.mesh
    corners, tied = corner_points(case)
    sharp = tied & reentrant(case, corners)
    groups = [
        (corners[~tied], s.min_cell / refine),
        (corners[tied & ~sharp], s.corner_size / refine),
        (corners[sharp], s.corner_size / REENTRANT_DIVISOR / refine),
    ]
    return SizeFunction(s.max_cell / refine, groups, s.growth ** (1.0 / refine))


def corner_points(case: Case) -> tuple[np.ndarray, np.ndarray]:
    """Corner points (k, 2) m: outline vertices turning by more than
    :data:`~fvheat.mesh.rectilinear.CORNER_TURN_DEG` and boundary-segment ends on the body;
    and whether each lies on a boundary tying the surface to a temperature."""
    pts = []
    for ring in _rings(case):
        e_in = ring - np.roll(ring, 1, axis=0)
        e_out = np.roll(ring, -1, axis=0) - ring
        cos = np.einsum("ij,ij->i", e_in, e_out) / np.maximum(
            np.hypot(*e_in.T) * np.hypot(*e_out.T), 1e-300
        )
        pts.append(ring[cos < np.cos(np.radians(CORNER_TURN_DEG))])
    ends = np.array([p for b in case.boundaries for e in b.edges for p in e], float).reshape(-1, 2)
    if len(ends):
        pts.append(ends[on_body(case, ends)])
    corners = np.unique(np.concatenate(pts), axis=0) if pts else np.zeros((0, 2))
    segs = [e for b in case.boundaries if b.ties_temperature for e in b.edges]
    tied = np.zeros(len(corners), dtype=bool)
    scale = _scale(case)
    for p0, p1 in segs:
        tied |= _distance_to_segment(corners, np.asarray(p0), np.asarray(p1)) <= 1e-9 * scale
    return corners, tied


#: directions sampled around a corner point to tell whether it is re-entrant
_AROUND = 64


def reentrant(case: Case, points: np.ndarray) -> np.ndarray:
    """Whether the body covers more than half of a small circle around each point (n, 2) m
    (a re-entrant corner: the inside surface is coldest there). Vectorised over points and
    directions."""
    if len(points) == 0:
        return np.zeros(0, dtype=bool)
    angle = (np.arange(_AROUND) + 0.5) * (2.0 * np.pi / _AROUND)
    step = 1e-6 * _scale(case) * np.column_stack([np.cos(angle), np.sin(angle)])
    around = (points[:, None, :] + step[None, :, :]).reshape(-1, 2)
    covered = on_body(case, around).reshape(len(points), _AROUND).mean(axis=1)
    return covered > 0.5 + 1.0 / _AROUND


def _rings(case: Case) -> list[np.ndarray]:
    return [r.vertices for r in case.regions] + [h for r in case.regions for h in r.holes]


def _scale(case: Case) -> float:
    allpts = np.concatenate(_rings(case))
    return max(float(np.max(np.ptp(allpts, axis=0))), 1.0)


def _distance_to_segment(p: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    d = b - a
    u = np.clip(((p - a) @ d) / max(float(d @ d), 1e-300), 0.0, 1.0)
    return np.hypot(*(p - a - u[:, None] * d).T)


def constraints(case: Case) -> tuple[np.ndarray, np.ndarray, float]:
    """The planar straight-line graph to triangulate: vertices (n, 2) m, segments (m, 2)
    vertex indices, cleaned by :func:`fvheat.mesh.pslg.clean_graph`, and the tolerance (m)
    within which two points are one. Region outlines and holes, boundary segments, flanking
    cuts and probe points."""
    from fvheat.mesh.pslg import clean_graph

    lines = [np.vstack([r, r[:1]]) for r in _rings(case)]
    lines += [np.asarray(e, float) for b in case.boundaries for e in b.edges]
    if case.junction is not None:
        lines += [np.asarray(f.cut, float) for f in case.junction.flanking if f.cut is not None]
    probes = np.array([p.at for p in case.probes], float).reshape(-1, 2)
    tol = 1e-9 * _scale(case)
    vertices, segments = clean_graph(lines, probes, tol)
    return vertices, segments, tol


def paint_triangles(case: Case, v: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Index of the region painting each triangle (by its centroid; −1 outside the body)."""
    return paint_points(case, v[t].mean(axis=1))


def paint_points(case: Case, c: np.ndarray) -> np.ndarray:
    """Index of the region painting each point (n, 2) m (the last region containing it,
    holes excepted; −1 outside the body)."""
    owner = np.full(len(c), -1, dtype=np.int64)
    for k, r in enumerate(case.regions):
        x0, y0, x1, y1 = r.bounds
        near = (c[:, 0] >= x0) & (c[:, 0] <= x1) & (c[:, 1] >= y0) & (c[:, 1] <= y1)
        idx = np.flatnonzero(near)
        if idx.size == 0:
            continue
        px, py = c[idx, 0], c[idx, 1]
        inside = np.ones(idx.size, bool) if r.is_box else points_in_polygon(px, py, r.vertices)
        for hole in r.holes:
            inside &= ~points_in_polygon(px, py, hole)
        owner[idx[inside]] = k
    return owner


def box_mesh(
    v: np.ndarray,
    t: np.ndarray,
    tri_material: np.ndarray,
    material_names: tuple[str, ...],
    boundary_names: tuple[str, ...],
) -> Mesh:
    """The vertex-centred :class:`Mesh` of triangles ``t`` (k, 3) on vertices ``v`` (m):
    control volumes bounded by the median dual (edge midpoints joined to centroids).

    Interior faces: one per triangle and edge (owner → neighbour along the edge), weight
    ½·cot of the opposite angle, material of the triangle. Pieces: one per triangle and
    vertex, a third of the triangle's area. Boundary faces: the two halves of every
    boundary edge, each belonging to its end vertex, centred at the quarter point, with
    ``b_dist`` = 0. All O(triangles), vectorised.
    """
    t = np.asarray(t, dtype=np.int64)
    area = _triangle_areas(v, t)
    flip = area < 0
    t[flip] = t[flip][:, [0, 2, 1]]
    area = np.abs(area)
    nv = len(v)
    # local edge e: vertices (e+1, e+2), opposite vertex e
    a = t[:, [1, 2, 0]].ravel()
    b = t[:, [2, 0, 1]].ravel()
    c = t.ravel()
    va, vb, vc = v[a], v[b], v[c]  # gathered once: these arrays are 3 × triangles long
    u, w = va - vc, vb - vc
    cross = u[:, 0] * w[:, 1] - u[:, 1] * w[:, 0]
    weight = 0.5 * (u[:, 0] * w[:, 0] + u[:, 1] * w[:, 1]) / cross
    centroid = (va + vb + vc) / 3.0
    mid = 0.5 * (va + vb)
    dual = centroid - mid
    length = np.hypot(dual[:, 0], dual[:, 1])
    along = vb - va
    # the dual segment turned clockwise, pointing from a towards b (a counter-clockwise
    # triangle's centroid lies left of a → b, so this is the sign that crosses to b)
    normal = np.column_stack([dual[:, 1], -dual[:, 0]]) / length[:, None]
    normal *= np.sign(normal[:, 0] * along[:, 0] + normal[:, 1] * along[:, 1])[:, None]
    half_edge = 0.5 * np.hypot(along[:, 0], along[:, 1])
    face_material = np.repeat(tri_material, 3).astype(np.int32)

    piece_cell = t.ravel()
    piece_volume = np.repeat(area / 3.0, 3)
    piece_material = face_material.copy()
    volumes = np.bincount(piece_cell, weights=piece_volume, minlength=nv)

    # boundary edges: used by one triangle only
    key = np.minimum(a, b) * np.int64(nv) + np.maximum(a, b)
    _, first, count = np.unique(key, return_index=True, return_counts=True)
    edge = first[count == 1]
    ea, eb = a[edge], b[edge]  # counter-clockwise triangle: the body lies left of a → b
    d = v[eb] - v[ea]
    elen = np.hypot(*d.T)
    out = np.column_stack([d[:, 1], -d[:, 0]]) / elen[:, None]
    b_cell = np.concatenate([ea, eb])
    b_centre = np.concatenate([0.75 * v[ea] + 0.25 * v[eb], 0.25 * v[ea] + 0.75 * v[eb]])
    nb = b_cell.size
    mesh = Mesh(
        centres=v.copy(),
        volumes=volumes,
        material=np.zeros(nv, dtype=np.int32),
        material_names=material_names,
        owner=a,
        neighbour=b,
        face_area=length,
        d_owner=half_edge,
        d_neighbour=half_edge.copy(),
        face_centre=0.5 * (centroid + mid),
        face_normal=normal,
        b_cell=b_cell,
        b_area=np.concatenate([0.5 * elen, 0.5 * elen]),
        b_dist=np.zeros(nb),
        b_centre=b_centre,
        b_normal=np.concatenate([out, out]),
        b_boundary=np.full(nb, -1, dtype=np.int32),
        b_exchange=np.ones(nb),
        boundary_names=boundary_names,
        kind="triangles",
        face_material=face_material,
        face_weight=weight,
        piece_cell=piece_cell,
        piece_material=piece_material,
        piece_volume=piece_volume,
        triangles=t,
        triangle_material=np.asarray(tri_material, dtype=np.int32),
    )
    from dataclasses import replace

    return replace(mesh, material=_dominant(mesh, piece_material).astype(np.int32))


def _dominant(mesh: Mesh, piece_value: np.ndarray) -> np.ndarray:
    """Per cell, the value of its largest piece (for drawing and summaries only): pieces
    written in order of increasing volume, the last write wins."""
    assert mesh.piece_cell is not None and mesh.piece_volume is not None
    # pieces 3i, 3i + 1, 3i + 2 are triangle i's thirds: sorting the triangles is enough
    by_tri = np.argsort(mesh.piece_volume[::3], kind="stable")
    order = (3 * by_tri[:, None] + np.arange(3)).ravel()
    out = np.zeros(mesh.n_cells, dtype=np.int64)
    out[mesh.piece_cell[order]] = piece_value[order]
    return out


def exact_segment_faces(
    mesh: Mesh,
    seg: tuple[tuple[float, float], tuple[float, float]],
    cand: np.ndarray,
    tol: float,
) -> tuple[np.ndarray, np.ndarray, float]:
    """The exterior faces lying on segment ``seg`` of a mesh that follows the geometry
    exactly (centre within ``tol`` m of the segment, normal across it), looked for among
    the boundary faces ``cand`` (those near the segment); a mask over all boundary faces,
    their exchange fractions (1) and the fraction of the segment's length they cover."""
    p0, p1 = np.asarray(seg[0], float), np.asarray(seg[1], float)
    t, n, length = segment_frame(p0, p1)
    rel = mesh.b_centre[cand] - p0
    along = rel @ t
    near = (
        (np.abs(rel @ n) <= tol)
        & (along > tol)
        & (along < length - tol)
        & (np.abs(mesh.b_normal[cand] @ n) > 1.0 - 1e-6)
    )
    on = np.zeros(mesh.n_boundary_faces, dtype=bool)
    on[cand[near]] = True
    return on, np.ones(mesh.n_boundary_faces), float(np.sum(mesh.b_area[on])) / length


#: up to this many points are located by testing every triangle
FEW_POINTS = 8


def find_triangles(mesh: Mesh, points: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Triangle containing each point (−1 outside the body) and the barycentric weights
    (n, 3) of its vertices. Points within round-off of the body's edge count as inside.

    Candidates are the triangles with the nearest centroids (a k-d tree); a point none of
    them contains is tested against every triangle (vectorised), so the answer does not
    depend on the mesh's quality."""
    assert mesh.triangles is not None
    v, t = mesh.centres, mesh.triangles
    pts = np.atleast_2d(np.asarray(points, dtype=float)).reshape(-1, 2)
    tol = 1e-9
    found = np.full(len(pts), -1, dtype=np.int64)
    lam = np.zeros((len(pts), 3))
    if len(pts) == 0:
        return found, lam
    if len(pts) <= FEW_POINTS:  # a few probes: every triangle, no tree to build
        for i in range(len(pts)):
            b = _barycentric_many(v[t], np.broadcast_to(pts[i], (len(t), 2)))
            best = int(np.argmax(b.min(axis=1)))
            if b[best].min() >= -tol:
                found[i], lam[i] = best, b[best]
        return found, np.clip(lam, 0.0, 1.0)
    k = min(16, len(t))
    _, near = cKDTree(v[t].mean(axis=1)).query(pts, k=k)
    near = np.asarray(near).reshape(len(pts), k)
    for col in range(k):
        todo = np.flatnonzero(found < 0)
        if todo.size == 0:
            break
        cand = near[todo, col]
        b = _barycentric_many(v[t[cand]], pts[todo])
        hit = b.min(axis=1) >= -tol
        found[todo[hit]] = cand[hit]
        lam[todo[hit]] = b[hit]
    for miss in np.flatnonzero(found < 0):  # far from any centroid: every triangle
        b = _barycentric_many(v[t], np.repeat(pts[miss : miss + 1], len(t), axis=0))
        best = int(np.argmax(b.min(axis=1)))
        if b[best].min() >= -tol:
            found[miss], lam[miss] = best, b[best]
    return found, np.clip(lam, 0.0, 1.0)


def _barycentric_many(tv: np.ndarray, p: np.ndarray) -> np.ndarray:
    a, b, c = tv[:, 0], tv[:, 1], tv[:, 2]
    det = (b[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1]) - (b[:, 1] - a[:, 1]) * (c[:, 0] - a[:, 0])
    l1 = (
        (p[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1]) - (p[:, 1] - a[:, 1]) * (c[:, 0] - a[:, 0])
    ) / det
    l2 = (
        (b[:, 0] - a[:, 0]) * (p[:, 1] - a[:, 1]) - (b[:, 1] - a[:, 1]) * (p[:, 0] - a[:, 0])
    ) / det
    return np.column_stack([1.0 - l1 - l2, l1, l2])


def check_probes(case: Case, mesh: Mesh) -> None:
    """Raise :class:`CaseError` for a probe outside every triangle of the body."""
    if not case.probes:
        return
    k, _ = find_triangles(mesh, np.array([p.at for p in case.probes], float))
    for i, p in enumerate(case.probes):
        if k[i] < 0:
            raise CaseError(
                f"point {list(p.at)} is outside the body (no region covers it)",
                file=str(case.source),
                key=f"probes.{i}.at",
            )
