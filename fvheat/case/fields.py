"""Typed readers for case-file values.

Each reader checks one value and, when it is wrong, raises :class:`Invalid` with the dotted
key path of that value (0-based list indices, as in ``--set`` overrides). The loader turns
:class:`Invalid` into a :class:`~fvheat.errors.CaseError` that also names the file, so section
parsers (including ones other modules register) never need to know which file they read.
"""

from __future__ import annotations

import difflib
import math
import re
from collections.abc import Collection, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal, overload

NAME_PATTERN = re.compile(r"[A-Za-z0-9_.-]+")
"""Allowed names of materials, boundaries and probes (they become CSV column names)."""

ABSOLUTE_ZERO = -273.15
"""°C."""

HIGHEST_TEMPERATURE = 10_000.0
"""°C: the highest temperature a case may give (a building fire is about 1 200 °C; above
this the radiation terms lose their meaning and the number is a slip)."""

COORDINATE_LIMIT = 1e6
"""m: the largest |x| or |y| of any point of a case (after unit conversion); a building
junction is metres across, so a coordinate beyond a thousand kilometres is a typing or
unit slip (and would defeat the mesher's tolerances)."""

SMALLEST_CELL = 1e-6
"""m: the smallest cell edge ``[mesh]`` accepts (1 µm; films thinner than that are
modelled as surface resistances, not meshed)."""


class Invalid(Exception):
    """A bad value at the dotted ``key`` path; ``message`` says what is wrong and how to fix it."""

    def __init__(self, key: str, message: str):
        super().__init__(f"{key}: {message}" if key else message)
        self.key = key
        self.message = message


@dataclass
class Context:
    """What section parsers share: the case file, and the sections parsed so far (by name)."""

    source: Path
    parsed: dict[str, Any] = field(default_factory=dict)
    cache: dict[Any, Any] = field(default_factory=dict)

    @property
    def folder(self) -> Path:
        """Folder against which relative file names in the case are resolved."""
        return self.source.parent


def join(path: str, key: str | int) -> str:
    """The dotted path of ``key`` inside ``path`` (``""`` is the top level)."""
    return f"{path}.{key}" if path else str(key)


def describe(value: Any) -> str:
    """A short description of a TOML value for messages."""
    if isinstance(value, bool):
        return f"boolean {str(value).lower()}"
    if isinstance(value, int | float):
        return f"number {value!r}"
    if isinstance(value, str):
        return f"string {value!r}"
    if isinstance(value, list):
        return f"an array of {len(value)} item{'' if len(value) == 1 else 's'}"
    if isinstance(value, dict):
        return "a table"
    return f"{type(value).__name__} {value!r}"


def check_keys(tbl: Mapping[str, Any], path: str, allowed: Collection[str]) -> None:
    """Reject keys of ``tbl`` that are not in ``allowed``, listing the allowed ones."""
    for key in tbl:
        if key not in allowed:
            close = difflib.get_close_matches(key, list(allowed), n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            raise Invalid(
                join(path, key), f"unknown key{hint}; allowed keys here: {', '.join(allowed)}"
            )


def table(
    value: Any, path: str, *, allowed: Collection[str], required: Collection[str] = ()
) -> dict[str, Any]:
    """``value`` checked to be a table with only ``allowed`` keys and every ``required`` one."""
    if not isinstance(value, dict):
        raise Invalid(path, f"expected a table, got {describe(value)}")
    check_keys(value, path, allowed)
    for key in required:
        if key not in value:
            raise Invalid(join(path, key), "required key is missing")
    return value


def tables(value: Any, path: str) -> list[dict[str, Any]]:
    """``value`` checked to be an array of tables (``[[path]]`` entries)."""
    if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
        raise Invalid(
            path, f"expected an array of tables ([[{path}]] entries), got {describe(value)}"
        )
    return value


def to_number(
    value: Any,
    path: str,
    *,
    gt: float | None = None,
    ge: float | None = None,
    lt: float | None = None,
    le: float | None = None,
) -> float:
    """``value`` as a finite float within the given bounds (ints accepted, booleans not)."""
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise Invalid(path, f"expected a number, got {describe(value)}")
    try:
        x = float(value)
    except OverflowError:
        x = math.inf
    if not math.isfinite(x):
        raise Invalid(path, f"expected a finite number, got {value!r}")
    for bound, ok, words in (
        (gt, gt is None or x > gt, "greater than"),
        (ge, ge is None or x >= ge, "at least"),
        (lt, lt is None or x < lt, "less than"),
        (le, le is None or x <= le, "at most"),
    ):
        if not ok:
            raise Invalid(path, f"must be {words} {bound:g}, got {x:g}")
    return x


# A required key, or one with a float default, always reads as a float
@overload
def number(
    tbl: Mapping[str, Any],
    key: str,
    path: str,
    *,
    required: Literal[True] = ...,
    default: float | None = ...,
    gt: float | None = ...,
    ge: float | None = ...,
    lt: float | None = ...,
    le: float | None = ...,
) -> float: ...
@overload
def number(
    tbl: Mapping[str, Any],
    key: str,
    path: str,
    *,
    required: bool = ...,
    default: float,
    gt: float | None = ...,
    ge: float | None = ...,
    lt: float | None = ...,
    le: float | None = ...,
) -> float: ...
@overload
def number(
    tbl: Mapping[str, Any],
    key: str,
    path: str,
    *,
    required: bool = ...,
    default: None = ...,
    gt: float | None = ...,
    ge: float | None = ...,
    lt: float | None = ...,
    le: float | None = ...,
) -> float | None: ...
def number(
    tbl: Mapping[str, Any],
    key: str,
    path: str,
    *,
    required: bool = True,
    default: float | None = None,
    gt: float | None = None,
    ge: float | None = None,
    lt: float | None = None,
    le: float | None = None,
) -> float | None:
    """``tbl[key]`` as a bounded finite float; ``default`` when absent and not ``required``."""
    if key not in tbl:
        if required:
            raise Invalid(join(path, key), "required key is missing")
        return default
    return to_number(tbl[key], join(path, key), gt=gt, ge=ge, lt=lt, le=le)


@overload
def string(
    tbl: Mapping[str, Any],
    key: str,
    path: str,
    *,
    required: Literal[True] = ...,
    default: str | None = ...,
    choices: Collection[str] | None = ...,
) -> str: ...
@overload
def string(
    tbl: Mapping[str, Any],
    key: str,
    path: str,
    *,
    required: bool = ...,
    default: str,
    choices: Collection[str] | None = ...,
) -> str: ...
@overload
def string(
    tbl: Mapping[str, Any],
    key: str,
    path: str,
    *,
    required: bool = ...,
    default: None = ...,
    choices: Collection[str] | None = ...,
) -> str | None: ...
def string(
    tbl: Mapping[str, Any],
    key: str,
    path: str,
    *,
    required: bool = True,
    default: str | None = None,
    choices: Collection[str] | None = None,
) -> str | None:
    """``tbl[key]`` checked to be a string (one of ``choices`` if given)."""
    if key not in tbl:
        if required:
            raise Invalid(join(path, key), "required key is missing")
        return default
    value = tbl[key]
    if not isinstance(value, str):
        raise Invalid(join(path, key), f"expected a string, got {describe(value)}")
    if choices is not None and value not in choices:
        options = ", ".join(repr(c) for c in choices)
        raise Invalid(join(path, key), f"must be one of {options}, got {value!r}")
    return value


def name(value: Any, path: str, seen: dict[str, str]) -> str:
    """A unique name (materials, boundaries, probes); ``seen`` maps names to their key paths."""
    if not isinstance(value, str):
        raise Invalid(path, f"expected a name (string), got {describe(value)}")
    if not NAME_PATTERN.fullmatch(value):
        raise Invalid(
            path,
            f"name {value!r} may contain only letters, digits, '_', '.' and '-' "
            "(names become CSV column names)",
        )
    if value in seen:
        raise Invalid(
            path, f"name {value!r} is already used by {seen[value]}; names must be unique"
        )
    seen[value] = path
    return value


def boundary_list(value: Any, path: str, known: Collection[str]) -> tuple[str, ...]:
    """A list of boundary names (one name alone is a list of one), each of ``known`` and
    none twice (a boundary listed twice would count its heat flow twice)."""
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, list) or not value or not all(isinstance(v, str) for v in value):
        raise Invalid(path, f"expected a list of boundary names, got {describe(value)}")
    for v in value:
        if v not in known:
            raise Invalid(
                path, f"no boundary is called {v!r}; boundaries: {', '.join(sorted(known))}"
            )
    twice = sorted({v for v in value if value.count(v) > 1})
    if twice:
        raise Invalid(path, f"{', '.join(map(repr, twice))} listed more than once")
    return tuple(value)


def coordinate(value: Any, path: str) -> float:
    """One coordinate (m), finite and within ±:data:`COORDINATE_LIMIT`; every point of a
    case (regions, boundaries, probes, junction cuts) is read through this."""
    x = to_number(value, path)
    if abs(x) > COORDINATE_LIMIT:
        raise Invalid(
            path,
            f"coordinate {x:g} m is beyond ±{COORDINATE_LIMIT:g} m; a junction is metres "
            "across: check the number and the units ([geometry] units)",
        )
    return x


def check_coordinates(points: Any, path: str, what: str) -> None:
    """Raise :class:`Invalid` at ``path`` when an array of points (m) taken from elsewhere
    (a drawing) holds a non-finite value or one beyond ±:data:`COORDINATE_LIMIT`;
    ``what`` names the points in the message."""
    import numpy as np

    p = np.asarray(points, dtype=float)
    bad = ~np.isfinite(p) | (np.abs(np.where(np.isfinite(p), p, 0.0)) > COORDINATE_LIMIT)
    if bad.any():
        v = float(p.ravel()[int(np.flatnonzero(bad.ravel())[0])])
        raise Invalid(
            path,
            f"{what} has the coordinate {v:g} m, beyond ±{COORDINATE_LIMIT:g} m (or not "
            "finite): check the drawing and [geometry] units",
        )


def point(value: Any, path: str) -> tuple[float, float]:
    """A point ``[x, y]`` (m), each coordinate read by :func:`coordinate`."""
    if not isinstance(value, list) or len(value) != 2:
        raise Invalid(path, f"expected a point [x, y] (m), got {describe(value)}")
    return coordinate(value[0], join(path, 0)), coordinate(value[1], join(path, 1))


def check_length(
    start: tuple[float, float], end: tuple[float, float], path: str, what: str = "segment"
) -> None:
    """Raise :class:`Invalid` at ``path`` when the ``what`` from ``start`` to ``end`` (m)
    is shorter than :data:`SMALLEST_CELL` (a round-off length no grid can hold)."""
    length = math.hypot(end[0] - start[0], end[1] - start[1])
    if length < SMALLEST_CELL:
        raise Invalid(
            path,
            f"the {what} is {length:g} m long, shorter than {SMALLEST_CELL:g} m (its two "
            "points coincide or differ by round-off)",
        )


def whole_number(
    tbl: Mapping[str, Any],
    key: str,
    path: str,
    *,
    default: int,
    least: int = 0,
    most: int | None = None,
) -> int:
    """``tbl[key]`` as a whole number from ``least`` to ``most`` (``default`` when absent);
    a float with no fraction (``4e6``) is accepted."""
    if key not in tbl:
        return default
    value = tbl[key]
    kpath = join(path, key)
    if isinstance(value, float) and math.isfinite(value) and value.is_integer():
        value = int(value)
    if isinstance(value, bool) or not isinstance(value, int):
        raise Invalid(kpath, f"expected a whole number, got {describe(value)}")
    if value < least:
        raise Invalid(kpath, f"must be at least {least}, got {value}")
    if most is not None and value > most:
        raise Invalid(kpath, f"must be at most {most:,}, got {value:.4g}")
    return value


def temperature(value: float, path: str) -> float:
    """``value`` (°C) checked to be above absolute zero and at most
    :data:`HIGHEST_TEMPERATURE`."""
    if value <= ABSOLUTE_ZERO:
        raise Invalid(path, f"{value:g} °C is not above absolute zero ({ABSOLUTE_ZERO} °C)")
    if value > HIGHEST_TEMPERATURE:
        raise Invalid(
            path, f"{value:g} °C is above {HIGHEST_TEMPERATURE:g} °C: check the number and its unit"
        )
    return value
