"""The finite-volume mesh: cell and face arrays that assembly and evaluation work on.

Generators (``fvheat.mesh.rectilinear``; importers later) build a :class:`Mesh`; nothing
downstream knows which generator made it. All lengths in m; a 2-D mesh is one metre deep,
so a face "area" is its length (m²/m) and a cell "volume" its area (m³/m).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np


@dataclass(frozen=True)
class RectGrid:
    """Structure of a rectilinear grid, kept for interpolation and plotting.

    ``x``, ``y``: grid-line coordinates (m), ``cell_index[j, i]``: index of the active cell
    in column ``i`` and row ``j``, or −1 where the grid cell is outside the body.
    """

    x: np.ndarray
    y: np.ndarray
    cell_index: np.ndarray

    @property
    def xc(self) -> np.ndarray:
        """Column centres, m."""
        return 0.5 * (self.x[1:] + self.x[:-1])

    @property
    def yc(self) -> np.ndarray:
        """Row centres, m."""
        return 0.5 * (self.y[1:] + self.y[:-1])


@dataclass(frozen=True)
class Mesh:
    """Cell-centred finite-volume mesh.

    Cells: ``centres`` (n, 2) m, ``volumes`` (n,) m², ``material`` (n,) index into
    ``material_names``.
    Interior faces: ``owner``/``neighbour`` cell indices, ``face_area`` (m), distances from
    owner and neighbour centres to the face (``d_owner``, ``d_neighbour``, m), ``face_centre``
    and unit ``face_normal`` (owner → neighbour).
    Boundary (exterior) faces: ``b_cell``, ``b_area`` (m), ``b_dist`` (centre-to-face, m),
    ``b_centre``, outward unit ``b_normal``, ``b_boundary`` (index into ``boundary_names``,
    −1 = adiabatic) and ``b_exchange`` (fraction of the face area that exchanges heat with
    the surroundings: 1 on straight grid-aligned edges, the projection onto the edge
    normal on a stepped sloped edge, so the stepped faces sum to the true edge length).
    ``region`` (n,), when the generator knows it: index of the case region that gave
    each cell its material.

    Vertex-centred meshes (the box method on triangles, ``kind = "triangles"``) carry more:
    a control volume straddles several materials, so its conductances and capacities are
    sums over pieces, each with its own material. ``face_material``/``face_weight``
    (per interior face): the face's conductance is G = face_weight·k[face_material]
    (face_weight dimensionless, the cotangent weight ½·cot θ of the triangle the face
    piece lies in) instead of the harmonic mean of the two cells; ``piece_cell``,
    ``piece_material``, ``piece_volume`` (m²), ``piece_region``: the parts of the control
    volumes (one per cell and triangle); ``triangles`` (t, 3) cell (= vertex) indices and
    ``triangle_material`` per triangle. Boundary faces of such a mesh
    have ``b_dist`` = 0: the unknown sits on the surface, the surface temperature is the
    cell's own.
    """

    centres: np.ndarray
    volumes: np.ndarray
    material: np.ndarray
    material_names: tuple[str, ...]
    owner: np.ndarray
    neighbour: np.ndarray
    face_area: np.ndarray
    d_owner: np.ndarray
    d_neighbour: np.ndarray
    face_centre: np.ndarray
    face_normal: np.ndarray
    b_cell: np.ndarray
    b_area: np.ndarray
    b_dist: np.ndarray
    b_centre: np.ndarray
    b_normal: np.ndarray
    b_boundary: np.ndarray
    b_exchange: np.ndarray
    boundary_names: tuple[str, ...]
    grid: RectGrid | None = field(default=None, repr=False)
    region: np.ndarray | None = field(default=None, repr=False)
    kind: str = "rectilinear"
    face_material: np.ndarray | None = field(default=None, repr=False)
    face_weight: np.ndarray | None = field(default=None, repr=False)
    piece_cell: np.ndarray | None = field(default=None, repr=False)
    piece_material: np.ndarray | None = field(default=None, repr=False)
    piece_volume: np.ndarray | None = field(default=None, repr=False)
    piece_region: np.ndarray | None = field(default=None, repr=False)
    triangles: np.ndarray | None = field(default=None, repr=False)
    triangle_material: np.ndarray | None = field(default=None, repr=False)

    @property
    def n_cells(self) -> int:
        """Number of cells."""
        return int(self.volumes.size)

    @property
    def n_faces(self) -> int:
        """Number of interior faces."""
        return int(self.owner.size)

    @property
    def n_boundary_faces(self) -> int:
        """Number of boundary faces."""
        return int(self.b_cell.size)

    def boundary_faces(self, name: str) -> np.ndarray:
        """Indices of the boundary faces belonging to boundary ``name``."""
        return np.flatnonzero(self.b_boundary == self.boundary_names.index(name))

    @property
    def vertex_centred(self) -> bool:
        """Whether the unknowns sit on the vertices of a triangulation (box method)."""
        return self.triangles is not None

    def pieces(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(cell, material, volume m²) of every part of a cell with one material: the pieces
        of a vertex-centred mesh, else each cell whole."""
        if self.piece_cell is not None:
            assert self.piece_material is not None and self.piece_volume is not None
            return self.piece_cell, self.piece_material, self.piece_volume
        return np.arange(self.n_cells), self.material, self.volumes

    def stats(self) -> dict[str, float | int | str]:
        """Mesh statistics for reports: counts and cell-size range (m)."""
        out: dict[str, float | int | str] = {
            "kind": self.kind,
            "cells": self.n_cells,
            "interior_faces": self.n_faces,
            "boundary_faces": self.n_boundary_faces,
        }
        if self.grid is not None:
            dx = np.diff(self.grid.x)
            dy = np.diff(self.grid.y)
            sizes = np.concatenate([dx, dy])
            out.update(
                columns=int(dx.size),
                rows=int(dy.size),
                smallest_cell=float(sizes.min()),
                largest_cell=float(sizes.max()),
                max_neighbour_ratio=float(max(_max_ratio(dx), _max_ratio(dy))),
            )
        if self.triangles is not None:
            edges = self.centres[self.triangles] - self.centres[np.roll(self.triangles, 1, 1)]
            length = np.hypot(edges[..., 0], edges[..., 1])
            out.update(
                triangles=int(self.triangles.shape[0]),
                smallest_cell=float(length.min()),
                largest_cell=float(length.max()),
                min_angle_deg=_min_angle(edges),
            )
        return out


def face_ends(centre: np.ndarray, normal: np.ndarray, length: np.ndarray) -> np.ndarray:
    """End points (m, 2, 2) of straight faces from centres, outward unit normals and lengths
    (m), ordered so that the normal is the direction end 0 → end 1 turned clockwise."""
    tangent = np.column_stack([-normal[:, 1], normal[:, 0]])
    half = 0.5 * length[:, None] * tangent
    return np.stack([centre - half, centre + half], axis=1)


def _max_ratio(h: np.ndarray) -> float:
    if h.size < 2:
        return 1.0
    r = h[1:] / h[:-1]
    return float(np.max(np.maximum(r, 1.0 / r)))


def _min_angle(edges: np.ndarray) -> float:
    """Smallest angle (degrees) of the triangles with edge vectors (t, 3, 2): the arccos of
    the largest cosine (arccos falls), taken once."""
    a, b = edges, -np.roll(edges, -1, axis=1)
    cos = np.einsum("tij,tij->ti", a, b) / (np.hypot(*a.T).T * np.hypot(*b.T).T)
    return float(np.degrees(np.arccos(np.clip(cos.max(), -1.0, 1.0))))
