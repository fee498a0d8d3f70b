"""The fields of a finished run, held in memory, read the way a results folder is read.

:class:`SolvedFields` answers ``field(index)``, ``field_times()`` and ``surface_field()``
like :class:`fvheat.output.results.ResultsFolder`, from the solution instead of the VTU
files, so ``fvheat run`` draws its figures without reading back what it wrote, and the
field files can be written while the figures draw (the views are built once, under a lock,
and shared by both).
"""

from __future__ import annotations

import threading
from collections.abc import Iterable
from dataclasses import dataclass
from typing import Protocol

from fvheat.output.view import FieldView, field_view
from fvheat.simulate import Solution


class FieldSource(Protocol):
    """Where figures take their fields from: a results folder or a run in memory."""

    def field_times(self) -> list[float]:
        """Times (s) of the saved fields."""
        ...

    def field(self, index: int = -1) -> FieldView:
        """The saved field ``index`` (°C), as a view."""
        ...

    def surface_field(self) -> FieldView | None:
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
        self._views: dict[int, FieldView] = {}
        self._surface_view: FieldView | None = None
        self._lock = threading.Lock()

    def field_times(self) -> list[float]:
        """Times (s) of the saved states."""
        return [t for t, _ in self._states]

    def field(self, index: int = -1) -> FieldView:
        """Saved state number ``index`` (default: the last, i.e. the end time)."""
        k = range(len(self._states))[index]
        with self._lock:
            if k not in self._views:
                t, temp = self._states[k]
                self._views[k] = field_view(self.solution, temp, t)
            return self._views[k]

    def surface_field(self) -> FieldView | None:
        """The junction's surface-temperature field, None when there is no separate one."""
        if self.surface is None:
            return None
        with self._lock:
            if self._surface_view is None:
                self._surface_view = field_view(self.surface)
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


@dataclass(frozen=True)
class FrozenFields:
    """Views of some saved states (``views`` by state index, of ``times`` s in all) and of a
    surface solve, answering like :class:`SolvedFields` for those states."""

    times: list[float]
    views: dict[int, FieldView]
    surface: FieldView | None = None

    def field_times(self) -> list[float]:
        """Times (s) of all saved states."""
        return list(self.times)

    def field(self, index: int = -1) -> FieldView:
        """Saved state ``index``; a :class:`KeyError` for a state not kept."""
        return self.views[range(len(self.times))[index]]

    def surface_field(self) -> FieldView | None:
        """The surface-temperature field, None when there is none."""
        return self.surface
