"""Conforming triangle meshes: Case → vertex-centred Mesh (the box method).

Every region outline and hole, every boundary segment, flanking cut and probe point is a
constraint of the triangulation (the `triangle` library: constrained, quality-bounded
Delaunay). Sizes follow ``[mesh]``: edges of about ``max_cell`` far from corners, shrinking
to ``min_cell`` at every outline corner and boundary-segment end (``corner_cell`` at
corners on surfaces tied to a temperature, a quarter of it at their re-entrant corners),
growing by ``growth`` per cell in between. Where the size is at its largest the mesh is
seeded with a hexagonal lattice (:mod:`fvheat.mesh.lattice`: equilateral triangles), the
corners' graded zones come from a coarse mesh refined there (:func:`_graded`), and one
final triangulation joins them; the lattice's triangles clear of every constraint (its
patch) are taken as they are, and that triangulation covers only the band between them and
the constraints (:func:`_seeded`).
Each triangle takes the material of the last region containing its centroid (triangles
never straddle an outline, so this is exact; a patch triangle its nodes'); triangles no
region covers are dropped.

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
from fvheat.mesh.box import box_mesh, open_edges, sorted_edges, triangle_areas
from fvheat.mesh.geometry import points_in_polygon, segment_frame
from fvheat.mesh.lattice import SPACING, Seeds, lattice_seeds
from fvheat.mesh.mesh import Mesh
from fvheat.mesh.segments import attach_boundaries
from fvheat.mesh.size import check_node_count
from fvheat.mesh.triangle_sizes import SizeFunction, case_scale, outline_rings, size_function

log = logging.getLogger(__name__)

#: smallest angle (degrees) triangle keeps in every triangle it makes (where the input
#: angles allow): 25° keeps the refinement terminating for any input
MIN_ANGLE_DEG = 25.0
#: refinement passes towards the size function
PASSES = 6


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
    body = float(triangle_areas(rough["vertices"], rough["triangles"][region >= 0]).sum())
    check_node_count(case, int(body / float(_area(size.largest)) / 2), refined=refine > 1.0)
    largest = np.format_float_positional(float(_area(size.largest)), trim="-")
    if size.graded:  # the corners' graded zones first, on a coarse mesh
        pslg, inner = _graded(case, pslg, size, flags, refine > 1.0)
    else:
        inner = np.zeros((0, 2))
    seeds = lattice_seeds(
        pslg["vertices"],
        pslg["segments"],
        SPACING * size.largest,
        lambda p: paint_points(case, p),
        size,
        body,
        inner,
    )
    # "n": the neighbours of each triangle come free, and give the boundary edges
    joined = _seeded(pslg, inner, seeds, flags + f"na{largest}")
    if joined is None:  # every seed a vertex of one triangulation
        graph = dict(pslg, vertices=np.vstack([pslg["vertices"], inner, seeds.points]))
        tri = triangle.triangulate(graph, flags + f"na{largest}")
        v, t, patch = tri["vertices"], tri["triangles"], np.zeros((0, 2), dtype=np.int64)
    else:
        tri, v, t, patch = joined
    # the band triangulated by triangle comes first, then the lattice patch's triangles,
    # whose region is known and which meet the size function (see _patch_within_sizes)
    band = len(tri["triangles"])
    checked = band if _patch_within_sizes(size) else len(t)
    centroid = _centroids(v, t[:checked])
    for _ in range(PASSES if size.graded else 0):
        h = size(centroid)
        # elsewhere h is the largest, which the area bound of the last call already met
        near = np.flatnonzero(h < size.largest)
        if np.all(triangle_areas(v, t[near]) <= 1.3 * _area(h[near])):
            break  # every triangle within 1.3 × its target area
        centroid = _centroids(v, t)
        target, area = _area(size(centroid)), triangle_areas(v, t)
        # the triangles this pass will make (each at most its target area), before it runs
        planned = float((area / target).clip(1.0).sum())
        check_node_count(case, int(planned / 2), refined=refine > 1.0)
        graph = {"vertices": v, "triangles": t, "segments": _constraint_segments(tri)}
        tri = triangle.triangulate(dict(graph, triangle_max_area=target), "r" + flags + "na")
        v, t, patch = tri["vertices"], tri["triangles"], np.zeros((0, 2), dtype=np.int64)
        band = checked = len(t)
        centroid = _centroids(v, t)
    region = paint_points(case, centroid[:band])
    if band < len(t):
        region = np.concatenate([region, seeds.region])
    edges = open_edges(v, t[:band], region[:band] >= 0, tri["neighbors"])
    if len(patch):  # the band's open edges along the patch are inside the body
        n = np.int64(len(v))
        inside = np.isin(edges[0] * n + edges[1], patch[:, 1] * n + patch[:, 0])
        edges = (edges[0][~inside], edges[1][~inside])
    return finish_mesh(case, v, np.asarray(t, dtype=np.int64), region, edges)


def _patch_within_sizes(size: SizeFunction) -> bool:
    """Whether every triangle of a lattice patch is certainly within 1.3 × the target area
    of the size function ``size``: its nodes have h = largest (L), every point of it lies
    within SPACING·L/√3 of a node and h changes by at most (growth − 1) per metre, so
    h ≥ L·(1 − (growth − 1)·SPACING/√3) in it, against the SPACING·L/√1.3 its edges need."""
    slope = size.growth - 1.0
    return 1.0 - slope * SPACING / np.sqrt(3.0) >= SPACING / np.sqrt(1.3)


#: segment marker of the constraint graph's segments and of the lattice patch's edges
CONSTRAINT, PATCH = 1, 2


def _constraint_segments(tri: dict) -> np.ndarray:
    """The segments (m, 2) of triangle's output ``tri`` that split the constraint graph's
    (not the lattice patch's edges)."""
    if "segment_markers" not in tri:
        return tri["segments"]
    return tri["segments"][np.ravel(tri["segment_markers"]) != PATCH]


def _seeded(
    pslg: dict, inner: np.ndarray, seeds: Seeds, flags: str
) -> tuple[dict, np.ndarray, np.ndarray, np.ndarray] | None:
    """The final triangulation with the lattice patch taken as it is: triangle meshes the
    graph ``pslg`` with the ``inner`` nodes (k, 2) m of the graded zones and the seeds
    outside the patch, the patch's boundary edges as segments and the patch as a hole; the
    patch's own triangles are then added. triangle's output, the vertices (m) and
    triangles (the band's first, as triangle numbers them), and the patch's boundary edges
    (patch on the left); None when there is no patch or triangle split one of its edges
    (a vertex it placed came too near)."""
    import triangle

    if len(seeds.triangles) == 0:
        return None
    first = len(pslg["vertices"]) + len(inner)
    band = ~seeds.inner
    number = np.empty(len(seeds.points), dtype=np.int64)
    number[band] = first + np.arange(int(band.sum()))
    patch = number[seeds.edges]
    segments = np.vstack([pslg["segments"], patch])
    markers = np.full(len(segments), PATCH, dtype=np.int32)
    markers[: len(pslg["segments"])] = CONSTRAINT
    holes = seeds.holes if "holes" not in pslg else np.vstack([pslg["holes"], seeds.holes])
    graph = dict(
        pslg,
        vertices=np.vstack([pslg["vertices"], inner, seeds.points[band]]),
        segments=segments,
        segment_markers=markers,
        holes=holes,
    )
    tri = triangle.triangulate(graph, flags)
    if np.count_nonzero(np.ravel(tri["segment_markers"]) == PATCH) != len(patch):
        log.debug("lattice patch: an edge was split, one triangulation of every seed instead")
        return None
    nv = len(tri["vertices"])
    number[seeds.inner] = nv + np.arange(int(seeds.inner.sum()))
    v = np.vstack([tri["vertices"], seeds.points[seeds.inner]])
    t = np.vstack([tri["triangles"], number[seeds.triangles]])
    return tri, v, t, patch


#: the coarse mesh of :func:`_graded` has edges of this many times the largest
COARSE = 4.0


def _graded(
    case: Case, pslg: dict, size: SizeFunction, flags: str, refined: bool
) -> tuple[dict, np.ndarray]:
    """The constraint graph with its segments split as the size function asks near the
    corners, and the nodes (k, 2) m of the corners' graded zones (where h < largest), both
    from a mesh refined there (the passes of :func:`build_triangle_mesh`) and coarse
    (:data:`COARSE` × the largest edge) everywhere else: refinement passes on this small
    mesh cost little, where on the final one each pass re-triangulates every node."""
    import triangle

    cap = COARSE * size.largest
    bound = np.format_float_positional(float(_area(cap)), trim="-")
    tri = triangle.triangulate(pslg, flags + "a" + bound)
    for _ in range(PASSES):
        v, t = tri["vertices"], tri["triangles"]
        h = size(_centroids(v, t))
        target = _area(np.where(h < size.largest, h, cap))
        area = triangle_areas(v, t)
        if np.all(area <= 1.3 * target):
            break
        check_node_count(case, int((area / target).clip(1.0).sum() / 2), refined=refined)
        tri = triangle.triangulate(dict(tri, triangle_max_area=target), "r" + flags + "a")
    v, seg = tri["vertices"], tri["segments"]
    # the graph's own vertices (triangle keeps them first, in order: probes among them)
    # and the vertices splitting its segments
    kept = np.zeros(len(v), dtype=bool)
    kept[seg] = True
    kept[: len(pslg["vertices"])] = True
    inner = v[~kept & (size(v) < size.largest * (1.0 - 1e-9))]
    used = np.flatnonzero(kept)
    rank = np.zeros(len(v), dtype=np.int64)
    rank[used] = np.arange(len(used))
    return dict(pslg, vertices=v[used], segments=rank[seg]), inner


def finish_mesh(
    case: Case,
    v: np.ndarray,
    t: np.ndarray,
    region: np.ndarray,
    edges: tuple[np.ndarray, np.ndarray] | None = None,
) -> Mesh:
    """The box-method mesh of triangles ``t`` on points ``v`` (m) painted by ``region``
    (index of the case region per triangle, −1: dropped), with the case's boundaries
    attached and its probes checked. ``edges``, the boundary edges a → b of the kept
    triangles (their interior on the left, as :func:`open_edges` finds them from the
    triangulation's neighbours), spare the search for them."""

    from fvheat.mesh.ordering import spatial_order

    keep = region >= 0
    if not keep.all():  # (a copy only when some are dropped)
        t, region = t[keep], region[keep]
    mark = np.zeros(len(v), dtype=bool)
    mark[t] = True
    used = np.flatnonzero(mark)
    # nodes along a Z-order curve, triangles by their first node: memory locality for
    # assembly, the AMG hierarchy and every matrix product (see mesh/ordering.py)
    used = used[spatial_order(v[used])]
    rank = np.empty(len(v), dtype=np.int64)
    rank[used] = np.arange(used.size)
    t = rank[t]
    by_node = np.argsort(t.min(axis=1), kind="stable")
    t = t[by_node]
    tri_region = region[by_node]
    names = tuple(case.materials)
    material = np.array([names.index(r.material) for r in case.regions], dtype=np.int32)
    if edges is not None:
        edges = sorted_edges(rank[edges[0]], rank[edges[1]], used.size)
    mesh = box_mesh(
        v[used],
        t,
        material[tri_region],
        names,
        tuple(b.name for b in case.boundaries),
        edges,
        tri_region,
    )
    mesh = attach_boundaries(case, mesh)
    check_probes(case, mesh)
    return mesh


def _area(h: np.ndarray | float) -> np.ndarray:
    """Area (m²) of an equilateral triangle of edge ``h`` (m)."""
    return np.sqrt(3.0) / 4.0 * np.asarray(h, float) ** 2


def _centroids(v: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Centroids (k, 2) m of triangles ``t`` on points ``v`` (three gathers, no (k, 3, 2)
    temporary)."""
    return (v[t[:, 0]] + v[t[:, 1]] + v[t[:, 2]]) / 3.0


def constraints(case: Case) -> tuple[np.ndarray, np.ndarray, float]:
    """The planar straight-line graph to triangulate: vertices (n, 2) m, segments (m, 2)
    vertex indices, cleaned by :func:`fvheat.mesh.pslg.clean_graph`, and the tolerance (m)
    within which two points are one. Region outlines and holes, boundary segments, flanking
    cuts and probe points."""
    from fvheat.mesh.pslg import clean_graph

    lines = [np.vstack([r, r[:1]]) for r in outline_rings(case)]
    lines += [np.asarray(e, float) for b in case.boundaries for e in b.edges]
    if case.junction is not None:
        lines += [np.asarray(f.cut, float) for f in case.junction.flanking if f.cut is not None]
    probes = np.array([p.at for p in case.probes], float).reshape(-1, 2)
    tol = 1e-9 * case_scale(case)
    vertices, segments = clean_graph(lines, probes, tol)
    return vertices, segments, tol


def paint_triangles(case: Case, v: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Index of the region painting each triangle (by its centroid; −1 outside the body)."""
    return paint_points(case, _centroids(v, t))


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
    if len(pts) <= FEW_POINTS:  # a few probes: no tree to build
        for i in range(len(pts)):
            # first the triangles around the nearest node (a probe is a node of the
            # meshes fvheat makes), then, if none holds the point, every triangle
            node = int(np.argmin(np.hypot(v[:, 0] - pts[i, 0], v[:, 1] - pts[i, 1])))
            # (a node is once at most in a triangle: the triangles around it, in order)
            for cand in (np.flatnonzero(t.ravel() == node) // 3, np.arange(len(t))):
                b = _barycentric_many(v[t[cand]], np.broadcast_to(pts[i], (len(cand), 2)))
                best = int(np.argmax(b.min(axis=1)))
                if b[best].min() >= -tol:
                    found[i], lam[i] = cand[best], b[best]
                    break
        return found, np.clip(lam, 0.0, 1.0)
    k = min(16, len(t))
    _, near = cKDTree(_centroids(v, t)).query(pts, k=k)
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
