"""Field files of a run on the triangle mesh: VTU through meshio, the real triangles.

The layout is the grid's (:mod:`fvheat.output.fields`, which writes both: file names,
``field.pvd``, ``surface_solve.vtu``, the compression rule); ``fields/fields.json`` has the
format :data:`FORMAT`, the material and boundary names and the file list, no grid lines.

Each VTU holds the triangles (the mesh's vertices are its points, in the solver's order)
and the exterior edges as lines, oriented with the body on their left. Point data:
``temperature`` (°C, the solver's unknowns: the field is linear in every triangle). Cell
data: ``material`` (index, −1 on lines), ``boundary`` (index on lines, −1 adiabatic and
on triangles), ``heat_flux`` (W/m², z = 0; q = −k∇T, constant in each triangle: the flux
the box method's faces carry; 0 on lines), ``surface_heat_flux`` (heat flow into the body
per unit length of each exterior edge, W/m², from the solver's surface balance; NaN on
triangles). Reading a file back gives the view the run drew its figures from
(:func:`read_triangle_field`).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from fvheat.output.triangle_view import (
    TriangleFieldView,
    TriangleShape,
    edge_temperature,
)
from fvheat.simulate import Solution

if TYPE_CHECKING:
    import meshio

    from fvheat.assembly.system import System
    from fvheat.mesh.mesh import Mesh

FORMAT = "fvheat-triangle-fields-1"


def to_meshio(view: TriangleFieldView) -> meshio.Mesh:
    """The triangle-mesh view as a :class:`meshio.Mesh`."""
    import meshio

    points, blocks, cell_data, point_data = vtu_arrays(view)
    return meshio.Mesh(points, blocks, point_data=point_data, cell_data=cell_data)


def vtu_arrays(
    view: TriangleFieldView,
) -> tuple[
    np.ndarray, list[tuple[str, np.ndarray]], dict[str, list[np.ndarray]], dict[str, np.ndarray]
]:
    """Points (k, 3) m, cell blocks (triangles, exterior edges), cell data per block and
    point data of the VTU of ``view``."""
    shape, lines = view.shape, view.face_nodes
    n_t, n_l = view.n_triangles, lines.shape[0]
    points = np.column_stack([shape.points, np.zeros(view.n_cells)])
    cell_data = {
        "material": [shape.triangle_material.astype(np.int32), np.full(n_l, -1, np.int32)],
        "boundary": [np.full(n_t, -1, np.int32), view.face_boundary.astype(np.int32)],
        "heat_flux": [np.column_stack([view.flux, np.zeros(n_t)]), np.zeros((n_l, 3))],
        "surface_heat_flux": [np.full(n_t, np.nan), np.asarray(view.face_flux, float)],
    }
    blocks = [("triangle", shape.triangles), ("line", lines)]
    return points, blocks, cell_data, {"temperature": np.asarray(view.temperature, float)}


def vtu_writer(view: TriangleFieldView) -> tuple[Callable[[Path, Any, bool], Path], int]:
    """A writer ``(path, view, compress) -> path`` of binary VTU files of views on the mesh
    of ``view``, and the cells per file the compression rule counts (triangles)."""
    from fvheat.output.vtu import write_raw_vtu

    def write(path: Path, v: TriangleFieldView, compress: bool) -> Path:
        return write_raw_vtu(path, *vtu_arrays(v), compress=compress)

    return write, view.n_triangles


def read_triangle_field(
    path: str | Path,
    meta: dict[str, Any],
    time: float = 0.0,
    shape: TriangleShape | None = None,
) -> TriangleFieldView:
    """The view stored in the VTU ``path`` (written by :func:`vtu_writer`; names from the
    field index ``meta``); ``shape`` is reused when given (the files of one run share it)."""
    from fvheat.output.vtu import read_vtu

    mesh = read_vtu(path)
    blocks = {b.type: k for k, b in enumerate(mesh.cells)}
    tb, lb = blocks["triangle"], blocks["line"]
    pts = np.asarray(mesh.points[:, :2], float)
    cd = mesh.cell_data
    if shape is None:
        shape = TriangleShape(pts, mesh.cells[tb].data, cd["material"][tb])
    lines = np.asarray(mesh.cells[lb].data)
    temp = np.asarray(mesh.point_data["temperature"], float)
    return TriangleFieldView(
        shape=shape,
        material_names=tuple(meta["materials"]),
        face_nodes=lines,
        face_boundary=np.asarray(cd["boundary"][lb], dtype=np.int32),
        boundary_names=tuple(meta["boundaries"]),
        temperature=temp,
        flux=np.asarray(cd["heat_flux"][tb], float)[:, :2],
        face_temperature=edge_temperature(temp, lines),
        face_flux=np.asarray(cd["surface_heat_flux"][lb], float),
        time=time,
    )


def triangle_gradients(v: np.ndarray, t: np.ndarray, values: np.ndarray) -> np.ndarray:
    """Gradient (t, 2) of the field linear in each triangle with ``values`` at the vertices
    ``v`` (m): K/m for temperatures."""
    p0, p1, p2 = v[t[:, 0]], v[t[:, 1]], v[t[:, 2]]
    f = np.asarray(values, float)
    d1, d2 = p1 - p0, p2 - p0
    det = d1[:, 0] * d2[:, 1] - d1[:, 1] * d2[:, 0]
    f1, f2 = f[t[:, 1]] - f[t[:, 0]], f[t[:, 2]] - f[t[:, 0]]
    gx = (f1 * d2[:, 1] - f2 * d1[:, 1]) / det
    gy = (f2 * d1[:, 0] - f1 * d2[:, 0]) / det
    return np.column_stack([gx, gy])


def triangle_flux(mesh: Mesh, system: System, temperature: np.ndarray) -> np.ndarray:
    """Heat-flux vectors (t, 2) W/m² of every triangle of ``mesh``: q = −k∇T, k the
    conductivity ``system`` gives the triangle (with phase-dependent conductivity: at the
    system's phase state, see :meth:`fvheat.simulate.Solution.system_at`)."""
    k = system.k_material
    assert mesh.triangles is not None and mesh.triangle_material is not None and k is not None
    grad = triangle_gradients(mesh.centres, mesh.triangles, temperature)
    if system.phase_material is not None and system.phase_material.any():
        k_tri = system.triangle_conductivity(system.k)[::3]  # face 3i + e: triangle i
    else:
        k_tri = k[mesh.triangle_material]
    return -k_tri[:, None] * grad


def node_flux(solution: Solution, temperature: np.ndarray) -> np.ndarray:
    """Heat-flux vectors (n, 2) W/m² at the nodes: the area-weighted mean over the
    triangles around each node (over its control volume's pieces)."""
    mesh = solution.mesh
    assert mesh.piece_cell is not None and mesh.piece_volume is not None
    system = solution.system_at(temperature)
    q = triangle_flux(mesh, system, temperature)[np.arange(mesh.piece_cell.size) // 3]
    w = mesh.piece_volume
    sums = [
        np.bincount(mesh.piece_cell, weights=w * q[:, i], minlength=mesh.n_cells) for i in (0, 1)
    ]
    return np.column_stack(sums) / mesh.volumes[:, None]


def write_node_csv(path: Path, solution: Solution) -> Path:
    """``cells.csv`` of a triangle-mesh run: one row per node (control volume) with the
    columns of the grid's file: position (m), material (of its largest piece), temperature
    (°C), heat flux (W/m², :func:`node_flux`)."""
    from fvheat.output.fields import write_cells_table

    mesh, temp = solution.mesh, solution.temperature
    q = node_flux(solution, temp)
    return write_cells_table(path, mesh.centres, mesh.material_names, mesh.material, temp, q)
