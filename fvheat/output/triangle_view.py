"""A triangle-mesh model, and a solved field on it, as figures and field files need them.

The triangle mesh's counterpart of :mod:`fvheat.output.view`. :class:`TriangleShape` holds
the triangles and what drawing derives from them (the matplotlib triangulation, point
location (:mod:`fvheat.output.triangle_locator`), the edges between materials), computed
once and shared by every view of a run.
:class:`TriangleGeometryView` adds the exterior edges with their boundaries;
:class:`TriangleFieldView` one solved field: temperatures at the nodes (the box method's
unknowns; the field is linear in each triangle), q = −k∇T per triangle, and per exterior
edge its mean temperature and the heat flow into the body per unit length. Views are built
from a solution in memory (:class:`TriangleViews`) or read back from the VTU
(:func:`fvheat.output.triangle_fields.read_triangle_field`), with the same numbers.
"""

from __future__ import annotations

import threading
from dataclasses import dataclass
from functools import cached_property
from typing import TYPE_CHECKING, Any

import numpy as np

from fvheat.mesh.mesh import Mesh
from fvheat.output.triangle_locator import TriangleLocator
from fvheat.output.view import FieldView, GeometryView

if TYPE_CHECKING:
    from matplotlib.tri import Triangulation

    from fvheat.simulate import Solution


#: point sets whose location is kept per shape
RECENT = 2


class TriangleShape:
    """Vertices ``points`` (n, 2) m, ``triangles`` (t, 3) vertex indices and
    ``triangle_material`` (t,) of a triangle mesh, with derived drawing data cached."""

    def __init__(self, points: np.ndarray, triangles: np.ndarray, material: np.ndarray) -> None:
        self.points = np.asarray(points, float)
        self.triangles = np.asarray(triangles, np.int64)
        self.triangle_material = np.asarray(material, np.int32)
        self._recent: dict[tuple, tuple[np.ndarray, np.ndarray]] = {}
        self._lock = threading.Lock()

    def __getstate__(self) -> dict[str, Any]:
        """The arrays and the numpy caches (locator, interfaces), for a figure worker: the
        lock, the recent lookups and matplotlib's triangulation are rebuilt there."""
        state = dict(self.__dict__)
        for name in ("_lock", "_recent", "triangulation"):
            state.pop(name, None)
        return state

    def __setstate__(self, state: dict[str, Any]) -> None:
        self.__dict__.update(state)
        self._recent = {}
        self._lock = threading.Lock()

    @cached_property
    def triangulation(self) -> Triangulation:
        """The matplotlib triangulation of the mesh."""
        from matplotlib.tri import Triangulation

        return Triangulation(self.points[:, 0], self.points[:, 1], self.triangles)

    @cached_property
    def locator(self) -> TriangleLocator:
        """The point locator of the triangles (built once)."""
        return TriangleLocator(self.points, self.triangles)

    @cached_property
    def interfaces(self) -> np.ndarray:
        """Edges (k, 2, 2), m, between triangles of different material."""
        t, n = self.triangles, self.points.shape[0]
        a, b = t[:, [0, 1, 2]].ravel(), t[:, [1, 2, 0]].ravel()
        key = np.minimum(a, b) * np.int64(n) + np.maximum(a, b)
        owner = np.repeat(self.triangle_material, 3)
        order = np.argsort(key, kind="stable")
        key, owner = key[order], owner[order]
        same = key[1:] == key[:-1]  # an interior edge: two triangles in a row
        differ = np.flatnonzero(same & (owner[1:] != owner[:-1]))
        k = key[differ]
        ends = np.column_stack([k // n, k % n])
        return self.points[ends]

    def _located(self, x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Triangle and barycentric coordinates of each point; the last few point sets are
        kept (the maps of one run share their pixel and sample lattices)."""
        x, y = np.asarray(x, float), np.asarray(y, float)
        key = (x.shape, y.shape, hash(x.tobytes()), hash(y.tobytes()))
        with self._lock:
            if key in self._recent:
                return self._recent[key]
        found = self.locator.locate(x, y)
        with self._lock:
            self._recent[key] = found
            while len(self._recent) > RECENT:
                self._recent.pop(next(iter(self._recent)))
        return found

    def locate(self, x: np.ndarray, y: np.ndarray) -> np.ndarray:
        """Index of the triangle holding each point (m), −1 outside the body."""
        return self._located(x, y)[0]

    def inside(self, x: np.ndarray, y: np.ndarray) -> np.ndarray:
        """True where the point (``x``, ``y``) m lies in a triangle of the body."""
        return self.locate(x, y) >= 0

    def interpolate(self, values: np.ndarray, x: np.ndarray, y: np.ndarray) -> np.ma.MaskedArray:
        """Node ``values`` (n,) interpolated linearly within the triangles at points (m);
        masked outside the body."""
        tri, bary = self._located(x, y)
        corners = np.asarray(values, float)[self.triangles[np.maximum(tri, 0)]]
        return np.ma.masked_array(np.sum(bary * corners, axis=-1), mask=tri < 0)

    def sample_triangles(
        self, values: np.ndarray, x: np.ndarray, y: np.ndarray
    ) -> np.ma.MaskedArray:
        """Per-triangle ``values`` (t, ...) at points (m): the value of the triangle holding
        each point (they are constant in it), masked outside the body."""
        where = self.locate(x, y)
        vals = np.asarray(values)[np.maximum(where, 0)]
        mask = np.broadcast_to((where < 0)[(...,) + (None,) * (vals.ndim - where.ndim)], vals.shape)
        return np.ma.masked_array(vals, mask=mask.copy())


@dataclass(frozen=True)
class TriangleGeometryView:
    """The triangles (``shape``), material names, and the exterior edges: ``face_nodes``
    (m, 2) their vertices, ordered so that the outward normal is end 0 → end 1 turned
    clockwise (as in :class:`fvheat.output.view.GeometryView`), ``face_boundary`` (m,)
    index into ``boundary_names`` (−1 adiabatic)."""

    shape: TriangleShape
    material_names: tuple[str, ...]
    face_nodes: np.ndarray
    face_boundary: np.ndarray
    boundary_names: tuple[str, ...]

    @cached_property
    def face_ends(self) -> np.ndarray:
        """End points (m, 2, 2), m, of the exterior edges."""
        return self.shape.points[self.face_nodes]

    @property
    def centres(self) -> np.ndarray:
        """Nodes (n, 2), m: the control volumes' centres."""
        return self.shape.points

    @property
    def n_cells(self) -> int:
        """Number of nodes (control volumes)."""
        return int(self.shape.points.shape[0])

    @property
    def n_triangles(self) -> int:
        """Number of triangles."""
        return int(self.shape.triangles.shape[0])

    @property
    def extent(self) -> tuple[float, float, float, float]:
        """(x0, y0, x1, y1) of the nodes, m."""
        (x0, y0), (x1, y1) = self.centres.min(axis=0), self.centres.max(axis=0)
        return float(x0), float(y0), float(x1), float(y1)


@dataclass(frozen=True)
class TriangleFieldView(TriangleGeometryView):
    """A :class:`TriangleGeometryView` with one field at ``time`` (s): ``temperature`` (n,)
    °C at the nodes, ``flux`` (t, 2) W/m² per triangle (q = −k∇T), ``face_temperature``
    (m,) °C (the mean of each exterior edge's end nodes: the field at its midpoint) and
    ``face_flux`` (m,) W/m² into the body per exterior edge (its heat flow over its
    length, from the solver's surface balance)."""

    temperature: np.ndarray
    flux: np.ndarray
    face_temperature: np.ndarray
    face_flux: np.ndarray
    time: float = 0.0


#: a view of either mesh
AnyGeometryView = GeometryView | TriangleGeometryView
AnyFieldView = FieldView | TriangleFieldView


def exterior_edges(mesh: Mesh) -> np.ndarray:
    """Vertex pairs (m, 2) of the exterior edges of a box-method mesh, in the order of its
    first half of boundary faces, oriented with the body on the left (outward normal:
    end 0 → end 1 turned clockwise): half-face k and k + m are the two halves of edge k."""
    half = mesh.n_boundary_faces // 2
    return np.column_stack([mesh.b_cell[:half], mesh.b_cell[half:]])


def edge_temperature(temperature: np.ndarray, lines: np.ndarray) -> np.ndarray:
    """Mean node temperature (°C) of each edge ``lines`` (m, 2): its midpoint value."""
    t = np.asarray(temperature, float)
    return 0.5 * (t[lines[:, 0]] + t[lines[:, 1]])


def triangle_geometry_view(mesh: Mesh, shape: TriangleShape | None = None) -> TriangleGeometryView:
    """The geometry of a triangle ``mesh`` (``shape`` reused when given)."""
    assert mesh.triangles is not None and mesh.triangle_material is not None
    if shape is None:
        shape = TriangleShape(mesh.centres, mesh.triangles, mesh.triangle_material)
    half = mesh.n_boundary_faces // 2
    return TriangleGeometryView(
        shape=shape,
        material_names=mesh.material_names,
        face_nodes=exterior_edges(mesh),
        face_boundary=mesh.b_boundary[:half],
        boundary_names=mesh.boundary_names,
    )


def any_geometry_view(mesh: Mesh) -> AnyGeometryView:
    """The geometry view of either kind of mesh."""
    from fvheat.output.view import geometry_view

    return triangle_geometry_view(mesh) if mesh.triangles is not None else geometry_view(mesh)


class TriangleViews:
    """Field views of one triangle-mesh ``solution``, its geometry built once (``shape``
    reused from another run on the same mesh when given)."""

    def __init__(self, solution: Solution, shape: TriangleShape | None = None) -> None:
        self.solution = solution
        self.geometry = triangle_geometry_view(solution.mesh, shape)

    @property
    def shape(self) -> TriangleShape:
        """The triangles and their cached drawing data."""
        return self.geometry.shape

    def view(self, temperature: np.ndarray, time: float) -> TriangleFieldView:
        """The view of node ``temperature`` (°C) at ``time`` (s)."""
        from fvheat.evaluate.flux import surface_faces
        from fvheat.output.triangle_fields import triangle_flux

        sol, g = self.solution, self.geometry
        temp = np.asarray(temperature, float)
        system = sol.system_at(temp)  # the conductances of this state's phases
        flow = surface_faces(system, temp, time).flow
        half = flow.size // 2
        d = g.face_ends[:, 1] - g.face_ends[:, 0]
        return TriangleFieldView(
            shape=g.shape,
            material_names=g.material_names,
            face_nodes=g.face_nodes,
            face_boundary=g.face_boundary,
            boundary_names=g.boundary_names,
            temperature=temp,
            flux=triangle_flux(sol.mesh, system, temp),
            face_temperature=edge_temperature(temp, g.face_nodes),
            face_flux=(flow[:half] + flow[half:]) / np.hypot(d[:, 0], d[:, 1]),
            time=float(time),
        )
