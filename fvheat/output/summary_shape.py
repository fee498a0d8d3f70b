"""The shape of a ``summary.json`` read back (``fvheat report``, ``plot``, ``collect``).

A summary edited by hand, truncated to another valid JSON, or written by another program
must be refused in one line, not fail deep inside the report or the table with a
traceback. :func:`summary_problem` checks the types of every key those readers use: the
sections are tables, the numbers are numbers, points are [x, y], lists are lists.
"""

from __future__ import annotations

import json
from collections.abc import Callable
from pathlib import Path
from typing import Any

from fvheat.errors import CaseError

#: top-level sections that are tables (null allowed: treated as absent)
TABLES = ("energy_balance", "geometry", "mesh", "project", "grid_check", "sensitivities")
#: top-level numbers (absent or null allowed)
NUMBERS = ("solve_seconds", "time_s", "cells")
#: numbers of every boundary entry, and its points
BOUNDARY_NUMBERS = ("heat_flow", "min_temperature", "max_temperature", "length")
BOUNDARY_POINTS = ("min_at", "max_at")
#: extremes over a transient run, per boundary (null allowed: no step to take them from)
OVER_RUN_NUMBERS = tuple(
    f"{e}_temperature_over_run{s}" for e in ("min", "max") for s in ("", "_time_s")
)
OVER_RUN_POINTS = ("min_temperature_over_run_at", "max_temperature_over_run_at")
#: the lowest temperature factor over a run (junction)
F_OVER_RUN_NUMBERS = tuple(
    "f_min_over_run" + s for s in ("", "_time_s", "_theta_si", "_theta_i", "_theta_e")
)
#: junction numbers that must be there, numbers that may be null, flags, points
JUNCTION_REQUIRED = ("L2D", "psi", "f_Rsi", "theta_si_min", "theta_i", "theta_e")
JUNCTION_OPTIONAL = ("heat_flow", "dew_point", "surface_rh_at_theta_si_min", "U_f")
JUNCTION_FLAGS = ("condensation_at_theta_si_min", "mould_risk_rh_80", "f_Rsi_pass")


Check = tuple[str, str, Any, Callable[[Any], bool]]


def _number(v: Any) -> bool:
    return isinstance(v, int | float) and not isinstance(v, bool)


def _number_or_null(v: Any) -> bool:
    return v is None or _number(v)


def _flag(v: Any) -> bool:
    return v is None or isinstance(v, bool)


def _table_or_null(v: Any) -> bool:
    return v is None or isinstance(v, dict)


def _point(v: Any) -> bool:
    return isinstance(v, list) and len(v) == 2 and all(_number(c) for c in v)


def _point_or_null(v: Any) -> bool:
    return v is None or _point(v)


def _strings(v: Any) -> bool:
    return isinstance(v, list) and all(isinstance(s, str) for s in v)


def _numbers_table(v: Any) -> bool:
    return isinstance(v, dict) and all(_number(x) for x in v.values())


def _tables(v: Any) -> bool:
    return isinstance(v, list) and all(isinstance(f, dict) for f in v)


def summary_problem(summary: Any) -> str | None:
    """What makes ``summary`` unreadable as an fvheat summary (one line, naming the key),
    or None."""
    if not isinstance(summary, dict) or "boundaries" not in summary:
        return "not an fvheat summary (no 'boundaries')"
    get = summary.get
    checks: list[Check] = [
        ("title", "text", get("title", ""), lambda v: isinstance(v, str)),
        ("mode", "text", get("mode", ""), lambda v: isinstance(v, str)),
        ("overrides", "a list of texts", get("overrides", []), _strings),
        ("warnings", "a list of texts", get("warnings", []), _strings),
        ("probes", "a table", get("probes", {}), lambda v: isinstance(v, dict)),
    ]
    probes = get("probes", {})
    if isinstance(probes, dict):
        checks += [(f"probes.{n}", "a number", v, _number) for n, v in probes.items()]
    checks += [(k, "a table", get(k), _table_or_null) for k in TABLES]
    checks += [(k, "a number", get(k), _number_or_null) for k in NUMBERS]
    bounds = summary["boundaries"]
    if not isinstance(bounds, dict):
        return f"boundaries: expected a table of boundaries, got {type(bounds).__name__}"
    for name, b in bounds.items():
        key = f"boundaries.{name}"
        if not isinstance(b, dict):
            return f"{key}: expected a table, got {type(b).__name__}"
        checks += [(f"{key}.{k}", "a number", b[k], _number) for k in BOUNDARY_NUMBERS if k in b]
        checks += [(f"{key}.{k}", "[x, y]", b[k], _point) for k in BOUNDARY_POINTS if k in b]
        checks += [
            (f"{key}.{k}", "a number", b[k], _number_or_null) for k in OVER_RUN_NUMBERS if k in b
        ]
        checks += [
            (f"{key}.{k}", "[x, y]", b[k], _point_or_null) for k in OVER_RUN_POINTS if k in b
        ]
    for key, what, value, ok in checks + _junction_checks(get("junction")):
        if not ok(value):
            return f"{key}: expected {what}, got {type(value).__name__}"
    return None


def _junction_checks(j: Any) -> list[Check]:
    if j is None:
        return []
    if not isinstance(j, dict):
        return [("junction", "a table", j, _table_or_null)]
    if "L2D" not in j:  # coupling coefficients only: no pair results
        return []
    p = "junction."
    out: list[Check] = [(p + k, "a number", j.get(k), _number) for k in JUNCTION_REQUIRED]
    out += [(p + k, "a number", j[k], _number_or_null) for k in JUNCTION_OPTIONAL if k in j]
    out += [(p + k, "true or false", j[k], _flag) for k in JUNCTION_FLAGS if k in j]
    out += [(p + k, "a number", j[k], _number_or_null) for k in F_OVER_RUN_NUMBERS if k in j]
    if "f_min_over_run_at" in j:
        out.append((p + "f_min_over_run_at", "[x, y]", j["f_min_over_run_at"], _point_or_null))
    # a pass or fail needs its limit
    limit_ok = _number if j.get("f_Rsi_pass") is not None else _number_or_null
    out += [
        (p + "theta_si_min_at", "[x, y]", j.get("theta_si_min_at"), _point),
        (p + "warnings", "a list of texts", j.get("warnings", []), _strings),
        (p + "f_Rsi_limit", "a number", j.get("f_Rsi_limit"), limit_ok),
        (
            p + "psi_by_dimensions",
            "a table of numbers",
            j.get("psi_by_dimensions", {}),
            _numbers_table,
        ),
        (p + "flanking", "a list of tables", j.get("flanking", []), _tables),
    ]
    return out


def read_summary(f: Path, unreadable: str) -> dict[str, Any]:
    """The parsed ``summary.json`` ``f`` with its shape checked: a :class:`CaseError`
    naming ``f`` with ``unreadable`` and the reason when it cannot be read or parsed, or
    with the shape problem (:func:`summary_problem`); a missing file is the caller's
    (:class:`FileNotFoundError` passes through)."""
    try:
        summary = json.loads(f.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise
    except (OSError, ValueError) as err:  # UnicodeDecodeError and JSONDecodeError included
        raise CaseError(f"{unreadable}: {err}", file=str(f)) from None
    problem = summary_problem(summary)
    if problem is not None:
        raise CaseError(problem, file=str(f))
    return summary
