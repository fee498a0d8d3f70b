"""The planar straight-line graph a triangle mesh must conform to, cleaned for `triangle`.

`triangle` needs a consistent graph: no two vertices closer than round-off, no vertex
lying inside a segment it is not an end of, no crossing or overlapping segments (it may
crash on such input rather than fail). The lines are noded with shapely; then vertices
within the tolerance are merged (clusters, not a rounding grid, so two points straddling
a grid line still merge) and segments are split at every vertex lying on them (a cut or a
probe ending on an outline a few ulp off it, which the noder does not see).
"""

from __future__ import annotations

import numpy as np
import shapely
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components
from scipy.spatial import cKDTree


def clean_graph(
    lines: list[np.ndarray], points: np.ndarray, tol: float
) -> tuple[np.ndarray, np.ndarray]:
    """Vertices (n, 2) and segments (m, 2) of the polylines ``lines`` ((k, 2) arrays, m)
    and the isolated ``points`` ((p, 2), m), cleaned as the module text says."""
    noded = shapely.node(shapely.MultiLineString([shapely.LineString(c) for c in lines]))
    coords = [np.asarray(g.coords) for g in shapely.get_parts(noded)]
    starts = np.concatenate([c[:-1] for c in coords])
    ends = np.concatenate([c[1:] for c in coords])
    allpts = np.concatenate([starts, ends, np.asarray(points, float).reshape(-1, 2)])
    label = _clusters(allpts, tol)
    first = np.unique(label, return_index=True)[1]
    vertices = allpts[first]
    n = len(starts)
    seg = np.column_stack([label[:n], label[n : 2 * n]])
    seg = seg[seg[:, 0] != seg[:, 1]]
    seg = np.unique(np.sort(seg, axis=1), axis=0)
    return vertices, _split_at_vertices(vertices, seg, tol)


def _clusters(points: np.ndarray, tol: float) -> np.ndarray:
    """A label 0..c−1 per point, equal for points linked by distances ≤ ``tol``."""
    pairs = cKDTree(points).query_pairs(tol, output_type="ndarray")
    n = len(points)
    graph = coo_matrix((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])), shape=(n, n))
    _, label = connected_components(graph, directed=False)
    return label


def _split_at_vertices(v: np.ndarray, seg: np.ndarray, tol: float) -> np.ndarray:
    """``seg`` with every segment split at the vertices lying on it within ``tol``."""
    tree = shapely.STRtree(shapely.linestrings(v[seg]))
    pi, si = tree.query(shapely.points(v), predicate="dwithin", distance=tol)
    keep = (seg[si, 0] != pi) & (seg[si, 1] != pi)
    pi, si = pi[keep], si[keep]
    if pi.size == 0:
        return seg
    a = v[seg[si, 0]]
    d = v[seg[si, 1]] - a
    u = np.einsum("ij,ij->i", v[pi] - a, d) / np.einsum("ij,ij->i", d, d)
    inner = (u > 0.0) & (u < 1.0)
    pi, si, u = pi[inner], si[inner], u[inner]
    out = [np.delete(seg, np.unique(si), axis=0)]
    order = np.lexsort((u, si))
    pi, si = pi[order], si[order]
    for s in np.unique(si):
        chain = np.concatenate([[seg[s, 0]], pi[si == s], [seg[s, 1]]])
        out.append(np.column_stack([chain[:-1], chain[1:]]))
    seg = np.concatenate(out)
    return np.unique(np.sort(seg, axis=1), axis=0)
