"""The project's own reference cases, run on the installed version (``fvheat validate``).

Each module builds its case as TOML text, solves it through the whole pipeline (case
validation, meshing, assembly, solve, evaluation) and compares a few numbers with a
reference from outside the project, naming its source: a standard's hand method, a
textbook solution, an independent library's solve (stored; the tests recompute it) or
tabulated property values. The references are never tuned to the
solver; the tolerances are those of the method (ISO 10211 case 1: 0.1 K) or stated.
"""

from __future__ import annotations

from collections.abc import Callable

from fvheat.validation import composite, humidity, rectangle, semi_infinite, wall
from fvheat.validation.check import Check

__all__ = ["CASES", "Check", "run_validation"]

#: every reference case, in the order of the table
CASES: tuple[Callable[[], list[Check]], ...] = (
    wall.checks,
    rectangle.checks,
    composite.checks,
    semi_infinite.checks,
    humidity.checks,
)


def run_validation() -> list[Check]:
    """Run every reference case; the rows of the validation table."""
    return [row for case in CASES for row in case()]
