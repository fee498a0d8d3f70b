"""The ``[solver]`` table: which linear solver to use (see :class:`SolverSettings`).

Optional; the defaults choose well for every grid size. All keys are optional:

```toml
[solver]
method = "auto"               # or "direct" (sparse LU) or "amg" (AMG-preconditioned CG)
tolerance = 1e-10             # AMG-CG: relative residual at which it stops
max_iterations = 200          # AMG-CG: iteration limit per solve
amg_above = 50000             # "auto": AMG-CG for steady solves above this many cells
transient_amg_above = 2000000 # "auto": AMG-CG for time stepping above this many cells
```
"""

from __future__ import annotations

from typing import Any, cast

from fvheat.case.fields import Context, Invalid, describe, join, number, string, table
from fvheat.case.model import SolverMethod, SolverSettings

METHODS = ("auto", "direct", "amg")
_KEYS = ("method", "tolerance", "max_iterations", "amg_above", "transient_amg_above")
#: looser AMG-CG tolerances give heat flows too inaccurate for ψ values
LARGEST_TOLERANCE = 1e-4


def parse_solver(value: Any, ctx: Context) -> SolverSettings:
    """Validate the ``[solver]`` table (defaults when absent)."""
    default = SolverSettings()
    if value is None:
        return default
    path = "solver"
    tbl = table(value, path, allowed=_KEYS)
    return SolverSettings(
        method=cast(
            "SolverMethod",
            string(tbl, "method", path, required=False, default="auto", choices=METHODS),
        ),
        tolerance=number(
            tbl,
            "tolerance",
            path,
            required=False,
            default=default.tolerance,
            gt=0,
            le=LARGEST_TOLERANCE,
        ),
        max_iterations=_count(tbl, "max_iterations", path, default.max_iterations, least=1),
        amg_above=_count(tbl, "amg_above", path, default.amg_above, least=0),
        transient_amg_above=_count(
            tbl, "transient_amg_above", path, default.transient_amg_above, least=0
        ),
    )


def _count(tbl: dict, key: str, path: str, default: int, *, least: int) -> int:
    """``tbl[key]`` as a whole number ≥ ``least`` (``default`` when absent)."""
    if key not in tbl:
        return default
    value = tbl[key]
    if isinstance(value, bool) or not isinstance(value, int):
        raise Invalid(join(path, key), f"expected a whole number, got {describe(value)}")
    if value < least:
        raise Invalid(join(path, key), f"must be at least {least}, got {value}")
    return value
