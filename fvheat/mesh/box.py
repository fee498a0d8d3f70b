"""The box method's mesh arrays from a triangulation: control volumes bounded by the median
dual (edge midpoints joined to centroids), faces per triangle and edge with the conductance
weight ½·cot of the opposite angle, volume pieces per triangle and vertex, and the
boundary edges; all O(triangles), vectorised. :mod:`fvheat.mesh.triangles` makes the
triangulation; :mod:`fvheat.mesh.imported` reads one.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from fvheat.mesh.mesh import Mesh


def triangle_areas(v: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Signed areas (m², positive counter-clockwise) of triangles ``t`` on points ``v``."""
    x, y = v[:, 0], v[:, 1]
    x0, y0 = x[t[:, 0]], y[t[:, 0]]
    return 0.5 * ((x[t[:, 1]] - x0) * (y[t[:, 2]] - y0) - (y[t[:, 1]] - y0) * (x[t[:, 2]] - x0))


def box_mesh(
    v: np.ndarray,
    t: np.ndarray,
    tri_material: np.ndarray,
    material_names: tuple[str, ...],
    boundary_names: tuple[str, ...],
    edges: tuple[np.ndarray, np.ndarray] | None = None,
    tri_region: np.ndarray | None = None,
) -> Mesh:
    """The vertex-centred :class:`Mesh` of triangles ``t`` (k, 3) on vertices ``v`` (m):
    control volumes bounded by the median dual (edge midpoints joined to centroids).
    ``edges``: the boundary edges as :func:`boundary_edges` finds them, when known;
    ``tri_region``: the region of each triangle, when known (``piece_region``, ``region``).

    Interior faces: one per triangle and edge (owner → neighbour along the edge), weight
    ½·cot of the opposite angle, material of the triangle. Pieces: one per triangle and
    vertex, a third of the triangle's area. Boundary faces: the two halves of every
    boundary edge, each belonging to its end vertex, centred at the quarter point, with
    ``b_dist`` = 0. All O(triangles), vectorised. Arrays equal by construction are one
    array, read-only (``d_owner`` and ``d_neighbour``, ``face_material`` and
    ``piece_material``): fewer fresh pages.
    """
    t = np.asarray(t, dtype=np.int64)
    nv = len(v)
    nf = 3 * len(t)
    area = np.empty(len(t))
    a, b = np.empty(nf, dtype=np.int64), np.empty(nf, dtype=np.int64)
    weight, length, half_edge = np.empty(nf), np.empty(nf), np.empty(nf)
    normal, face_centre = np.empty((nf, 2)), np.empty((nf, 2))
    # in blocks of triangles: the temporaries stay small (in cache, no fresh pages)
    for lo in range(0, len(t), BLOCK):
        hi = min(len(t), lo + BLOCK)
        block = t[lo:hi]  # (a view: turned counter-clockwise in place)
        signed = triangle_areas(v, block)
        flip = signed < 0
        block[flip] = block[flip][:, [0, 2, 1]]
        np.abs(signed, out=area[lo:hi])
        f = slice(3 * lo, 3 * hi)
        _faces(
            v,
            t[lo:hi],
            area[lo:hi],
            a[f],
            b[f],
            weight[f],
            length[f],
            half_edge[f],
            normal[f],
            face_centre[f],
        )
    face_material = np.repeat(np.asarray(tri_material, dtype=np.int32), 3)
    face_material.flags.writeable = False
    half_edge.flags.writeable = False

    piece_cell = t.ravel()
    area /= 3.0
    piece_volume = np.repeat(area, 3)
    volumes = np.bincount(piece_cell, weights=piece_volume, minlength=nv)

    # counter-clockwise triangles: the body lies left of a → b
    ea, eb = edges if edges is not None else boundary_edges(a, b, nv)
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
        d_neighbour=half_edge,
        face_centre=face_centre,
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
        piece_material=face_material,
        piece_volume=piece_volume,
        triangles=t,
        triangle_material=np.asarray(tri_material, dtype=np.int32),
    )
    best = largest_piece(mesh)
    if tri_region is None:
        return replace(mesh, material=face_material[best])
    piece_region = np.repeat(tri_region, 3)
    return replace(
        mesh, material=face_material[best], piece_region=piece_region, region=piece_region[best]
    )


#: triangles per block of :func:`box_mesh`'s face arithmetic (its temporaries, some 100 kB
#: each, stay in the core's cache: 0.14 → 0.12 s at 400 000 triangles against 32 768)
BLOCK = 1 << 12


def _faces(
    v: np.ndarray,
    t: np.ndarray,
    area: np.ndarray,
    a: np.ndarray,
    b: np.ndarray,
    weight: np.ndarray,
    length: np.ndarray,
    half_edge: np.ndarray,
    normal: np.ndarray,
    face_centre: np.ndarray,
) -> None:
    """The face pieces of counter-clockwise triangles ``t`` (areas ``area``, m²) on ``v``
    (m), written into the given arrays (3 per triangle, piece 3i + e on edge e): end
    points ``a`` → ``b``, cotangent weight, dual segment length (m), half edge length (m),
    unit normal towards ``b`` and centre (m)."""
    # local edge e: vertices (e+1, e+2), opposite vertex e
    a.reshape(-1, 3)[:] = t[:, [1, 2, 0]]
    b.reshape(-1, 3)[:] = t[:, [2, 0, 1]]
    c = t.ravel()
    x, y = v[:, 0], v[:, 1]
    xa, ya, xc, yc = x[a], y[a], x[c], y[c]
    ux, uy = xa - xc, ya - yc
    wx, wy = np.subtract(x[b], xc, out=xc), np.subtract(y[b], yc, out=yc)
    # ½·cot θ = ½·(u·w)/(u × w), and u × w is twice the (counter-clockwise) triangle's area
    np.multiply(ux, wx, out=weight)
    weight += uy * wy
    weight /= np.repeat(4.0 * area, 3)
    # the dual segment: centroid − edge midpoint = (2c − a − b)/6 = −(u + w)/6
    dx, dy = ux + wx, uy + wy
    dx /= -6.0
    dy /= -6.0
    np.multiply(dx, dx, out=length)
    length += dy * dy
    np.sqrt(length, out=length)
    ax, ay = np.subtract(wx, ux, out=wx), np.subtract(wy, uy, out=wy)  # the edge a → b
    # the dual segment turned clockwise, pointing from a towards b (a counter-clockwise
    # triangle's centroid lies left of a → b, so this is the sign that crosses to b)
    turn = np.multiply(dy, ax, out=ux)
    turn -= np.multiply(dx, ay, out=uy)
    np.sign(turn, out=turn)
    turn /= length
    np.multiply(dy, turn, out=normal[:, 0])
    np.negative(turn, out=turn)
    np.multiply(dx, turn, out=normal[:, 1])
    np.multiply(ax, ax, out=half_edge)
    half_edge += ay * ay
    np.sqrt(half_edge, out=half_edge)
    half_edge *= 0.5
    # halfway along the dual segment: (a + b + 2d)/2
    xa += x[b]
    xa += dx
    np.multiply(xa, 0.5, out=face_centre[:, 0])
    ya += y[b]
    ya += dy
    np.multiply(ya, 0.5, out=face_centre[:, 1])


def boundary_edges(a: np.ndarray, b: np.ndarray, n: int) -> tuple[np.ndarray, np.ndarray]:
    """The edges a → b (vertex indices < ``n``) of consistently oriented triangles that no
    other triangle has, in either direction: the boundary edges, sorted by (min, max)."""
    big = np.int64(n)
    lo, hi = np.minimum(a, b), np.maximum(a, b)
    # the undirected edge, and its direction in the lowest bit; one sort finds the pairs
    key = np.sort((lo * big + hi) * 2 + (a > b))
    edge = key >> 1
    single = np.ones(len(key), dtype=bool)
    pair = edge[1:] == edge[:-1]
    single[1:] &= ~pair
    single[:-1] &= ~pair
    key = key[single]
    turned = (key & 1).astype(bool)
    lo, hi = np.divmod(key >> 1, big)
    return np.where(turned, hi, lo), np.where(turned, lo, hi)


def largest_piece(mesh: Mesh) -> np.ndarray:
    """Per cell, the index of its largest piece (of equal ones the last): what the cell is
    drawn and summarised as."""
    assert mesh.piece_cell is not None and mesh.piece_volume is not None
    cell, vol = mesh.piece_cell, mesh.piece_volume
    best = np.zeros(mesh.n_cells)
    np.maximum.at(best, cell, vol)
    win = np.flatnonzero(vol == best[cell])
    out = np.full(mesh.n_cells, -1, dtype=np.int64)
    np.maximum.at(out, cell[win], win)
    return out


def open_edges(
    v: np.ndarray, t: np.ndarray, keep: np.ndarray, neighbours: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """The edges a → b (the kept triangle's interior on the left) of kept triangles whose
    neighbour across is missing or dropped: the body's boundary edges."""
    alive = np.append(keep, False)  # index −1: no neighbour
    tk, nk = t[keep], np.asarray(neighbours)[keep]
    rows, j = np.nonzero(~alive[nk])
    a, b = tk[rows, (j + 1) % 3], tk[rows, (j + 2) % 3]
    turned = triangle_areas(v, tk[rows]) < 0  # (triangle makes them counter-clockwise)
    return np.where(turned, b, a), np.where(turned, a, b)


def sorted_edges(a: np.ndarray, b: np.ndarray, n: int) -> tuple[np.ndarray, np.ndarray]:
    """Edges a → b in the order :func:`boundary_edges` gives them (by min, then max)."""
    order = np.argsort(np.minimum(a, b) * np.int64(n) + np.maximum(a, b), kind="stable")
    return a[order], b[order]
