"""Meshes from files (any format meshio reads) with named physical groups.

2-D groups (triangles, quads split into two triangles each) are named after materials;
1-D groups (lines) after boundaries. Named groups are read from gmsh's physical names
(``field_data`` with the ``gmsh:physical`` cell data) or from meshio's generic
``cell_sets``. Coordinates are in metres; a z coordinate is ignored.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass
from pathlib import Path

import numpy as np

#: key of the read :class:`MeshFile` in the case loader's cache (``Context.cache``)
MESH_FILE = "mesh.file"


class MeshFileError(ValueError):
    """A mesh file that cannot be used (one line, without the file name)."""


@dataclass(frozen=True)
class MeshFile:
    """A read mesh file: ``points`` (n, 2) m, ``triangles`` (t, 3) point indices with the
    name of their 2-D group ``triangle_group`` (t,), the segments (k, 2) point indices of
    every 1-D group in ``lines``, and the SHA-256 of the file's bytes."""

    points: np.ndarray
    triangles: np.ndarray
    triangle_group: np.ndarray
    lines: dict[str, np.ndarray]
    sha256: str

    def group_edges(self, name: str) -> tuple[tuple[tuple[float, float], tuple[float, float]], ...]:
        """The segments of 1-D group ``name`` as coordinates (m)."""
        p = self.points[self.lines[name]]
        return tuple(
            ((float(a[0]), float(a[1])), (float(b[0]), float(b[1]))) for a, b in p.tolist()
        )


def read_mesh_file(path: Path) -> MeshFile:
    """Read ``path`` with meshio; raises :class:`MeshFileError` (one line) when it cannot be
    read or has no named 2-D groups."""
    import meshio

    try:
        data = Path(path).read_bytes()
        mesh = meshio.read(path)
    except FileNotFoundError:
        raise MeshFileError("file not found") from None
    except Exception as err:  # meshio raises many kinds for unreadable files
        raise MeshFileError(f"meshio cannot read it: {str(err).splitlines()[0]}") from None
    names = _block_names(mesh)
    tris, groups = [], []
    lines: dict[str, list[np.ndarray]] = {}
    for k, block in enumerate(mesh.cells):
        cells = np.asarray(block.data, dtype=np.int64)
        label = names[k]
        if block.type == "triangle":
            tris.append(cells)
            groups.append(label)
        elif block.type == "quad":
            split = np.concatenate([cells[:, [0, 1, 2]], cells[:, [0, 2, 3]]])
            tris.append(split)
            groups.append(np.concatenate([label, label]))
        elif block.type == "line":
            for name in np.unique(label[label != ""]):
                lines.setdefault(str(name), []).append(cells[label == name])
    if not tris:
        raise MeshFileError("no triangles or quads in it")
    triangles = np.concatenate(tris)
    group = np.concatenate(groups)
    if np.all(group == ""):
        raise MeshFileError("no named 2-D physical groups (name them after materials)")
    if np.any(group == ""):
        raise MeshFileError(
            f"{int(np.sum(group == ''))} triangles belong to no named 2-D physical group"
        )
    return MeshFile(
        points=np.asarray(mesh.points, float)[:, :2].copy(),
        triangles=triangles,
        triangle_group=group,
        lines={n: np.concatenate(v) for n, v in lines.items()},
        sha256=hashlib.sha256(data).hexdigest(),
    )


def _block_names(mesh) -> list[np.ndarray]:
    """Per cell block, the group name of every cell ("" where none)."""
    out = [np.full(len(b.data), "", dtype=object) for b in mesh.cells]
    if mesh.cell_sets:
        for name, per_block in mesh.cell_sets.items():
            for k, idx in enumerate(per_block):
                if idx is not None and len(idx):
                    out[k][np.asarray(idx, dtype=np.int64)] = name
    tags = mesh.cell_data.get("gmsh:physical")
    if tags is not None and mesh.field_data:
        by_tag = {(int(v[1]), int(v[0])): n for n, v in mesh.field_data.items()}
        for k, block in enumerate(mesh.cells):
            dim = {"triangle": 2, "quad": 2, "line": 1}.get(block.type)
            if dim is None:
                continue
            for tag in np.unique(tags[k]):
                name = by_tag.get((dim, int(tag)))
                if name is not None:
                    out[k][np.asarray(tags[k]) == tag] = name
    return out


def subdivide(points: np.ndarray, triangles: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Split every triangle into four at its edge midpoints (grid checks of a read mesh):
    returns the new points (the old ones first) and triangles (4t, 3), each child
    inheriting its parent's place (child 4i + j of parent i)."""
    t = np.asarray(triangles, dtype=np.int64)
    edges = np.sort(np.stack([t[:, [0, 1]], t[:, [1, 2]], t[:, [2, 0]]], axis=1), axis=2)
    unique, inverse = np.unique(edges.reshape(-1, 2), axis=0, return_inverse=True)
    mid = len(points) + inverse.reshape(-1, 3)
    new = np.concatenate([points, 0.5 * (points[unique[:, 0]] + points[unique[:, 1]])])
    a, b, c = t[:, 0], t[:, 1], t[:, 2]
    m01, m12, m20 = mid[:, 0], mid[:, 1], mid[:, 2]
    children = np.stack(
        [
            np.column_stack([a, m01, m20]),
            np.column_stack([m01, b, m12]),
            np.column_stack([m20, m12, c]),
            np.column_stack([m01, m12, m20]),
        ],
        axis=1,
    )
    return new, children.reshape(-1, 3)


def group_outlines(data: MeshFile) -> list[tuple[str, np.ndarray, tuple[np.ndarray, ...]]]:
    """(group name, counter-clockwise outline (n, 2) m, holes) of every separate part of
    every 2-D group, in the order of the groups' names."""
    import shapely
    from shapely.geometry.polygon import orient

    out = []
    for name in sorted(set(data.triangle_group.tolist())):
        tri = data.points[data.triangles[data.triangle_group == name]]
        union = shapely.coverage_union_all(shapely.polygons(tri))
        for part in shapely.get_parts(union):
            p = orient(part, 1.0)
            ring = np.asarray(p.exterior.coords)[:-1]
            holes = tuple(np.asarray(h.coords)[:-1] for h in p.interiors)
            out.append((str(name), ring, holes))
    return out
