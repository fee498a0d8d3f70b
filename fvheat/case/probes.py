"""Probe points (``[[probes]]``) and probe lines (``[[probe_lines]]``)."""

from __future__ import annotations

from typing import Any

from fvheat.case.fields import (
    Context,
    Invalid,
    check_length,
    join,
    name,
    point,
    table,
    tables,
)
from fvheat.case.model import (
    Probe,
    ProbeLine,
)


def parse_probes(value: Any, ctx: Context) -> tuple[Probe, ...]:
    """Validate the ``[[probes]]`` entries (points in m; none when absent)."""
    if value is None:
        return ()
    seen: dict[str, str] = {}
    probes = []
    for i, tbl in enumerate(tables(value, "probes")):
        path = join("probes", i)
        table(tbl, path, allowed=("name", "at"), required=("name", "at"))
        probes.append(
            Probe(
                name=name(tbl["name"], join(path, "name"), seen),
                at=point(tbl["at"], join(path, "at")),
            )
        )
    return tuple(probes)


def parse_probe_lines(value: Any, ctx: Context) -> tuple[ProbeLine, ...]:
    """Validate the ``[[probe_lines]]`` entries (ends in m; none when absent)."""
    if value is None:
        return ()
    seen: dict[str, str] = {}
    lines = []
    for i, tbl in enumerate(tables(value, "probe_lines")):
        path = join("probe_lines", i)
        table(tbl, path, allowed=("name", "start", "end"), required=("name", "start", "end"))
        start = point(tbl["start"], join(path, "start"))
        end = point(tbl["end"], join(path, "end"))
        if start == end:
            raise Invalid(join(path, "end"), "must differ from start (a line needs a length)")
        check_length(start, end, join(path, "end"), "line")
        lines.append(ProbeLine(name(tbl["name"], join(path, "name"), seen), start, end))
    return tuple(lines)
