"""A model's geometry, and a solved field on it, as plots and field files need them.

:class:`GeometryView` is the painted model: cells with their material and exterior faces
with their boundary, as the mesher made them (:func:`geometry_view`); the preview draws it
before any solve. :class:`FieldView` adds one solved field. It is built from a solution in
memory (:func:`field_view`) or read back from a results folder
(:func:`fvheat.output.fields.read_field`), so a redrawn plot is the same as the first one.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fvheat.evaluate.flux import cell_heat_flux, surface_faces
from fvheat.mesh.mesh import Mesh, RectGrid, face_ends
from fvheat.simulate import Solution


@dataclass(frozen=True)
class GeometryView:
    """Cells and exterior faces of a model on a rectilinear grid.

    Cells: ``centres`` (n, 2) m, ``material`` (n,) index into ``material_names``. Exterior
    faces: ``face_ends`` (m, 2, 2) end points m (ordered so that the outward normal is the
    direction end 0 → end 1 turned clockwise), ``face_boundary`` (m,) index into
    ``boundary_names`` (−1 adiabatic). ``grid`` is the rectilinear grid the cells belong to.
    """

    grid: RectGrid
    centres: np.ndarray
    material: np.ndarray
    material_names: tuple[str, ...]
    face_ends: np.ndarray
    face_boundary: np.ndarray
    boundary_names: tuple[str, ...]

    @property
    def n_cells(self) -> int:
        """Number of cells."""
        return int(self.material.size)

    @property
    def extent(self) -> tuple[float, float, float, float]:
        """(x0, y0, x1, y1) of the grid, m."""
        g = self.grid
        return float(g.x[0]), float(g.y[0]), float(g.x[-1]), float(g.y[-1])

    def grid_values(self, values: np.ndarray) -> np.ma.MaskedArray:
        """Cell ``values`` on the (rows, columns) grid, masked outside the body."""
        idx = self.grid.cell_index
        out = np.zeros(idx.shape, dtype=np.result_type(values, float))
        out[idx >= 0] = values[idx[idx >= 0]]
        return np.ma.masked_array(out, mask=idx < 0)


@dataclass(frozen=True)
class FieldView(GeometryView):
    """A :class:`GeometryView` with the values of one field at ``time`` (s): ``temperature``
    (n,) °C and ``flux`` (n, 2) heat-flux vectors W/m² per cell, ``face_temperature`` °C
    and ``face_flux`` W/m² into the body per exterior face.
    """

    temperature: np.ndarray
    flux: np.ndarray
    face_temperature: np.ndarray
    face_flux: np.ndarray
    time: float = 0.0


def geometry_view(mesh: Mesh) -> GeometryView:
    """The painted geometry of ``mesh`` (cells, materials, exterior faces, boundaries)."""
    if mesh.grid is None:
        raise NotImplementedError("drawing needs a rectilinear grid")
    return GeometryView(
        grid=mesh.grid,
        centres=mesh.centres,
        material=mesh.material,
        material_names=mesh.material_names,
        face_ends=face_ends(mesh.b_centre, mesh.b_normal, mesh.b_area),
        face_boundary=mesh.b_boundary,
        boundary_names=mesh.boundary_names,
    )


def field_view(
    solution: Solution, temperature: np.ndarray | None = None, time: float | None = None
) -> FieldView:
    """The view of ``temperature`` (°C, default the solution's final field) at ``time`` (s)."""
    mesh = solution.mesh
    if mesh.grid is None:
        raise NotImplementedError("field output needs a rectilinear grid")
    temp = solution.temperature if temperature is None else np.asarray(temperature, float)
    t = solution.time if time is None else float(time)
    system = solution.system_at(temp)  # the conductances of this state's phases
    faces = surface_faces(system, temp, t)
    return FieldView(
        grid=mesh.grid,
        centres=mesh.centres,
        material=mesh.material,
        material_names=mesh.material_names,
        temperature=temp,
        flux=cell_heat_flux(system, temp, t),
        face_ends=face_ends(mesh.b_centre, mesh.b_normal, mesh.b_area),
        face_boundary=mesh.b_boundary,
        boundary_names=mesh.boundary_names,
        face_temperature=faces.temperature,
        face_flux=faces.density,
        time=t,
    )
