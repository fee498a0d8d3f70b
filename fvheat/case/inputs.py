"""Every file a loaded case reads: the case file, then the files it points to (CSV series of
boundary values and humidities, the DXF drawing, ...).

A sweep folder's identity covers all of them (:mod:`fvheat.sweep.identity`), so results
computed from a changed input file are never mixed with older ones. A new kind of file a
case can point to is one more entry in :data:`FINDERS`.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable, Iterable, Iterator
from pathlib import Path
from typing import Any

from fvheat.case.model import Case
from fvheat.case.signals import Series


def _series_files(case: Case) -> Iterator[Path]:
    """The CSV file of every tabulated series anywhere in the case (boundary values,
    condensation humidity and air temperature, and wherever a series is added later)."""
    for value in _walk(case):
        if isinstance(value, Series) and value.source:
            yield Path(value.source)


def _drawing(case: Case) -> list[Path]:
    """The DXF drawing of ``[geometry] drawing``."""
    g = case.geometry
    return [g.drawing] if g is not None and g.drawing is not None else []


def _mesh_file(case: Case) -> list[Path]:
    """The mesh of ``[mesh] file``."""
    return [case.mesh.file] if case.mesh.file is not None else []


#: one function per kind of file a case reads, each giving the files of its kind
FINDERS: tuple[Callable[[Case], Iterable[Path]], ...] = (_series_files, _drawing, _mesh_file)


def case_inputs(case: Case) -> list[Path]:
    """The case file, then every other file the case reads, each once (absolute, in the
    order found)."""
    found: dict[Path, None] = {Path(case.source).absolute(): None}
    for finder in FINDERS:
        for path in finder(case):
            found.setdefault(Path(path).absolute(), None)
    return list(found)


def _walk(value: Any) -> Iterator[Any]:
    """``value`` and everything inside it: dataclass fields, list / tuple / set items and
    dict values, depth first."""
    yield value
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        for f in dataclasses.fields(value):
            yield from _walk(getattr(value, f.name))
    elif isinstance(value, dict):
        for item in value.values():
            yield from _walk(item)
    elif isinstance(value, list | tuple | set | frozenset):
        for item in value:
            yield from _walk(item)
