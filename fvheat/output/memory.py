"""The fields of a finished run, held in memory, read the way a results folder is read.

:class:`SolvedFields` answers ``field(index)``, ``field_times()`` and ``surface_field()``
like :class:`fvheat.output.results.ResultsFolder`, from the solution instead of the VTU
files, so ``fvheat run`` draws its figures without reading back what it wrote, and the
field files can be written while the figures draw (the views are built once, under a lock,
and shared by both). On either mesh: grid views (:mod:`fvheat.output.view`) or triangle
views (:mod:`fvheat.output.triangle_view`).
"""

from __future__ import annotations

import threading
from collections.abc import Iterable
from dataclasses import dataclass
from typing import Protocol

import numpy as np

from fvheat.output.triangle_view import AnyFieldView, TriangleShape, TriangleViews
from fvheat.output.view import field_view
from fvheat.simulate import Solution


class FieldSource(Protocol):
    """Where figures take their fields from: a results folder or a run in memory."""

    def field_times(self) -> list[float]:
        """Times (s) of the saved fields."""
        ...

    def field(self, index: int = -1) -> AnyFieldView:
        """The saved field ``index`` (°C), as a view."""
        ...

    def surface_field(self) -> AnyFieldView | None:
        """The surface-temperature solve's field (°C), or None when there is none."""
        ...


class SolvedFields:
    """The saved states of ``solution`` (every saved time of a transient run, the final
    field of a steady one) and a junction's separate ``surface`` solve, as views."""

    def __init__(self, solution: Solution, surface: Solution | None = None) -> None:
        self.solution = solution
        self.surface = surface
        h = solution.history
        if h is None or not h.fields:
            self._states = [(float(solution.time), solution.temperature)]
        else:
            self._states = [(float(t), f) for t, f in zip(h.times, h.fields, strict=True)]
        self._views: dict[int, AnyFieldView] = {}
        self._surface_view: AnyFieldView | None = None
        self._lock = threading.Lock()
        self._triangles = _triangle_views(solution)

    def field_times(self) -> list[float]:
        """Times (s) of the saved states."""
        return [t for t, _ in self._states]

    def field(self, index: int = -1) -> AnyFieldView:
        """Saved state number ``index`` (default: the last, i.e. the end time)."""
        k = range(len(self._states))[index]
        with self._lock:
            if k not in self._views:
                t, temp = self._states[k]
                self._views[k] = self._view(self.solution, self._triangles, temp, t)
            return self._views[k]

    def surface_field(self) -> AnyFieldView | None:
        """The junction's surface-temperature field, None when there is no separate one."""
        s = self.surface
        if s is None:
            return None
        with self._lock:
            if self._surface_view is None:
                shape = self._triangles.shape if self._triangles is not None else None
                views = _triangle_views(s, shape if s.mesh is self.solution.mesh else None)
                self._surface_view = self._view(s, views, s.temperature, s.time)
            return self._surface_view

    def freeze(self, indices: Iterable[int]) -> FrozenFields:
        """The views of the saved states ``indices`` and of the surface solve, without the
        solution: small enough to send to another process (pickled)."""
        n = len(self._states)
        views = {range(n)[i]: self.field(i) for i in indices}
        return FrozenFields(self.field_times(), views, self.surface_field())

    def forget(self, index: int) -> None:
        """Drop the cached view of state ``index`` (memory of long transient runs)."""
        with self._lock:
            self._views.pop(range(len(self._states))[index], None)

    @staticmethod
    def _view(
        solution: Solution, triangles: TriangleViews | None, temp: np.ndarray, t: float
    ) -> AnyFieldView:
        if triangles is not None:
            return triangles.view(temp, t)
        return field_view(solution, temp, t)


@dataclass(frozen=True)
class FrozenFields:
    """Views of some saved states (``views`` by state index, of ``times`` s in all) and of a
    surface solve, answering like :class:`SolvedFields` for those states."""

    times: list[float]
    views: dict[int, AnyFieldView]
    surface: AnyFieldView | None = None

    def field_times(self) -> list[float]:
        """Times (s) of all saved states."""
        return list(self.times)

    def field(self, index: int = -1) -> AnyFieldView:
        """Saved state ``index``; a :class:`KeyError` for a state not kept."""
        return self.views[range(len(self.times))[index]]

    def surface_field(self) -> AnyFieldView | None:
        """The surface-temperature field, None when there is none."""
        return self.surface


def _triangle_views(solution: Solution, shape: TriangleShape | None = None) -> TriangleViews | None:
    """The view builder of a triangle-mesh ``solution`` (None on the grid)."""
    return None if solution.mesh.triangles is None else TriangleViews(solution, shape)
