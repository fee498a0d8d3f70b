"""The case file's length unit: ``[geometry] units`` = "m" (default), "cm" or "mm".

Every coordinate and length typed in the case file (and given by ``--set``) is in that unit;
:func:`in_metres` converts them all to metres before the sections are validated, so the
validated :class:`~fvheat.case.model.Case` and everything after it hold metres. The
converted keys are listed in :data:`LENGTH_KEYS`; a key added to the case format that
holds a length belongs there too. Values are divided by the number of units per metre
(an exact integer), so ``360`` mm gives the same float as ``0.36`` typed in metres.
"""

from __future__ import annotations

import copy
import re
from typing import Any

from fvheat.case.fields import Invalid, describe

#: length units of a case file: units per metre
UNITS: dict[str, int] = {"m": 1, "cm": 100, "mm": 1000}

#: dotted key paths holding coordinates or lengths ("*": every item of an array); every
#: number inside them (points, segments, tables of lengths) is converted
LENGTH_KEYS = (
    "mesh.max_cell",
    "mesh.min_cell",
    "mesh.corner_cell",
    "regions.*.box",
    "regions.*.polygon",
    "boundaries.*.edges",
    "probes.*.at",
    "probe_lines.*.start",
    "probe_lines.*.end",
    "junction.centre",
    "junction.frame_width",
    "junction.flanking.*.cut",
    "junction.flanking.*.length",
    "junction.flanking.*.thickness",
    "ground.width",
    "ground.floor_edge",
    "ground.ground_level",
    "ground.wall_outside",
    "ground.wall_thickness",
)

_PATTERNS = tuple(re.compile(re.escape(k).replace(r"\*", r"\d+") + r"(\..*)?") for k in LENGTH_KEYS)


def case_units(data: dict) -> str:
    """The validated ``[geometry] units`` of the case ``data`` ("m" when not given)."""
    geometry = data.get("geometry")
    if not isinstance(geometry, dict) or "units" not in geometry:
        return "m"
    units = geometry["units"]
    if not isinstance(units, str) or units not in UNITS:
        options = ", ".join(repr(u) for u in UNITS)
        raise Invalid("geometry.units", f"must be one of {options}, got {describe(units)}")
    return units


def in_metres(data: dict, units: str) -> dict:
    """The case ``data`` with every length of :data:`LENGTH_KEYS` divided by the units per
    metre (a copy; ``data`` itself when the unit is the metre). Values that are not numbers
    are left for the section parsers to reject."""
    per_metre = UNITS[units]
    if per_metre == 1:
        return data
    result = copy.deepcopy(data)
    for key in LENGTH_KEYS:
        _convert(result, key.split("."), per_metre)
    return result


def converted_note(units: str, key: str) -> str:
    """A note for an error message at ``key`` when it may quote converted lengths."""
    if units == "m" or not any(p.fullmatch(key) for p in _PATTERNS):
        return ""
    return f" (lengths in this message are in m: the case's {units} were converted)"


def _convert(node: Any, keys: list[str], per_metre: int) -> None:
    """Divide every number under the path ``keys`` of ``node`` by ``per_metre`` in place."""
    head, rest = keys[0], keys[1:]
    if head == "*":
        items: list[tuple[Any, Any]] = list(enumerate(node)) if isinstance(node, list) else []
    elif isinstance(node, dict) and head in node:
        items = [(head, node[head])]
    else:
        items = []
    for k, child in items:
        if rest:
            _convert(child, rest, per_metre)
        else:
            node[k] = _scaled(child, per_metre)


def _scaled(value: Any, per_metre: int) -> Any:
    if isinstance(value, bool):
        return value
    if isinstance(value, int | float):
        try:
            return value / per_metre
        except OverflowError:  # an integer beyond floats: the parser reports it
            return value
    if isinstance(value, list):
        return [_scaled(v, per_metre) for v in value]
    if isinstance(value, dict):
        return {k: _scaled(v, per_metre) for k, v in value.items()}
    return value
