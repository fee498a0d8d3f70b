"""Field files of a run on the triangle mesh: VTU through meshio, the real triangles.

Layout (as for the grid, without ``fields.json``, which describes grids)::

    fields/field.vtu                      steady run
    fields/field_0000.vtu, ... field.pvd  transient run: one file per saved time
    fields/surface_solve.vtu              junction: the surface-temperature solve

Each VTU holds the triangles (the mesh's vertices are its points, in the solver's order)
and the exterior edges as lines. Point data: ``temperature`` (°C, the solver's unknowns:
the field is linear in every triangle). Cell data: ``material`` (index, −1 on lines),
``boundary`` (index on lines, −1 adiabatic and on triangles), ``heat_flux`` (W/m², z = 0;
q = −k∇T, constant in each triangle: the flux the box method's faces carry; 0 on lines).
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from fvheat.output.fields import FIELDS_DIR, SURFACE_FILE, write_pvd
from fvheat.output.files import atomic_write_file
from fvheat.simulate import Solution

if TYPE_CHECKING:
    import meshio


def to_meshio(solution: Solution, temperature: np.ndarray) -> meshio.Mesh:
    """The triangle mesh with ``temperature`` (°C per vertex) as a :class:`meshio.Mesh`."""
    import meshio

    mesh = solution.mesh
    assert mesh.triangles is not None and mesh.triangle_material is not None
    # exterior edges: the two half-faces of an edge share its outward normal and midpoint
    first = np.arange(mesh.n_boundary_faces // 2)
    a = mesh.b_cell[first]
    b = mesh.b_cell[first + mesh.n_boundary_faces // 2]
    lines = np.column_stack([a, b])
    points = np.column_stack([mesh.centres, np.zeros(mesh.n_cells)])
    n_t, n_l = mesh.triangles.shape[0], lines.shape[0]
    q = triangle_flux(solution, temperature)
    return meshio.Mesh(
        points,
        [("triangle", mesh.triangles), ("line", lines)],
        point_data={"temperature": np.asarray(temperature, float)},
        cell_data={
            "material": [mesh.triangle_material.astype(np.int32), np.full(n_l, -1, np.int32)],
            "boundary": [np.full(n_t, -1, np.int32), mesh.b_boundary[first].astype(np.int32)],
            "heat_flux": [np.column_stack([q, np.zeros(n_t)]), np.zeros((n_l, 3))],
        },
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


def triangle_flux(solution: Solution, temperature: np.ndarray) -> np.ndarray:
    """Heat-flux vectors (t, 2) W/m² of every triangle: q = −k∇T."""
    mesh = solution.mesh
    k = solution.system.k_material
    assert mesh.triangles is not None and mesh.triangle_material is not None and k is not None
    grad = triangle_gradients(mesh.centres, mesh.triangles, temperature)
    return -k[mesh.triangle_material][:, None] * grad


def node_flux(solution: Solution, temperature: np.ndarray) -> np.ndarray:
    """Heat-flux vectors (n, 2) W/m² at the nodes: the area-weighted mean over the
    triangles around each node (over its control volume's pieces)."""
    mesh = solution.mesh
    assert mesh.piece_cell is not None and mesh.piece_volume is not None
    q = triangle_flux(solution, temperature)[np.arange(mesh.piece_cell.size) // 3]
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


def write_vtu(path: Path, solution: Solution, temperature: np.ndarray) -> Path:
    """One field as binary, zlib-compressed VTU, written atomically."""
    import meshio

    m = to_meshio(solution, temperature)
    return atomic_write_file(
        path, lambda tmp: meshio.vtu.write(tmp, m, binary=True, compression="zlib")
    )


def write_triangle_fields(
    solution: Solution, out: str | Path, surface: Solution | None = None, fields: str = "all"
) -> list[Path]:
    """Write the field files of a run on the triangle mesh into ``out/fields``: every saved
    state (``fields`` "all") or only the last one ("last"), and the surface solve."""
    folder = Path(out) / FIELDS_DIR
    folder.mkdir(parents=True, exist_ok=True)
    h = solution.history
    if h is None or not h.fields:
        states = [(solution.time, solution.temperature, "field.vtu")]
    else:
        states = [
            (t, f, f"field_{k:04d}.vtu")
            for k, (t, f) in enumerate(zip(h.times, h.fields, strict=True))
        ]
    if fields == "last":
        states = states[-1:]
    written = [write_vtu(folder / name, solution, temp) for _, temp, name in states]
    if len(states) > 1 or solution.case.transient:
        written.append(write_pvd(folder / "field.pvd", [(float(t), n) for t, _, n in states]))
    if surface is not None:
        written.append(write_vtu(folder / SURFACE_FILE, surface, surface.temperature))
    return written
