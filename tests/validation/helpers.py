"""Shared helpers of the validation tests: build cases from TOML text, run them, report numbers.

Every case goes through the whole pipeline: TOML text is written to a file, read by
:func:`fvheat.case.load.load_case` (with optional ``--set`` overrides) and solved by
:func:`fvheat.simulate.simulate`.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

import numpy as np
from casefiles import load, write_case  # noqa: F401  (re-exported for the tests here)

from fvheat.simulate import Solution, simulate


def run(
    folder: Path, text: str, overrides: Sequence[str] = (), name: str = "case.toml"
) -> Solution:
    """Write, load and solve the TOML case ``text``."""
    return simulate(load(folder, text, overrides, name))


def observed_order(h: Sequence[float], err: Sequence[float]) -> float:
    """Slope of log(err) against log(h): the observed order of convergence."""
    return float(np.polyfit(np.log(h), np.log(err), 1)[0])


def report(check: str, **values: object) -> None:
    """Print the measured numbers of a check (shown by ``pytest -s``)."""
    parts = []
    for key, value in values.items():
        if isinstance(value, float):
            parts.append(f"{key}={value:.3e}")
        elif isinstance(value, list | tuple) and value and isinstance(value[0], float):
            parts.append(f"{key}=[" + ", ".join(f"{v:.3e}" for v in value) + "]")
        else:
            parts.append(f"{key}={value}")
    print(f"\n[validation] {check}: " + ", ".join(parts))


def toml_list(values: Sequence[float]) -> str:
    """A TOML array of numbers, written with full precision."""
    return "[" + ", ".join(repr(float(v)) for v in values) + "]"


def probes_toml(points: dict[str, Sequence[float]]) -> str:
    """``[[probes]]`` entries for the named points (m)."""
    return "".join(
        f'\n[[probes]]\nname = "{name}"\nat = {toml_list(p)}\n' for name, p in points.items()
    )
