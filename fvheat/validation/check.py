"""One row of the validation table, and how the reference cases are solved."""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass
from pathlib import Path

from fvheat.case.load import parse_case
from fvheat.simulate import Solution, simulate


@dataclass(frozen=True)
class Check:
    """A computed quantity against its reference.

    ``tolerance`` is absolute (in ``unit``) unless ``relative``, then a fraction of the
    reference. ``source`` names where the reference comes from.
    """

    case: str
    quantity: str
    unit: str
    reference: float
    computed: float
    tolerance: float
    source: str
    relative: bool = False

    @property
    def deviation(self) -> float:
        """|computed − reference|, in ``unit`` or as a fraction of the reference."""
        d = abs(self.computed - self.reference)
        return d / abs(self.reference) if self.relative else d

    @property
    def passed(self) -> bool:
        """True when the deviation is within the tolerance (never for NaN)."""
        return math.isfinite(self.computed) and self.deviation <= self.tolerance

    def tolerance_text(self) -> str:
        """'± 0.1 K' or '± 0.1 %' (a temperature's tolerance is a difference: K)."""
        if self.relative:
            return f"± {100 * self.tolerance:g} %"
        unit = "K" if self.unit == "°C" else self.unit
        return f"± {self.tolerance:g} {unit}".rstrip()


def solve(text: str, name: str) -> Solution:
    """Validate the TOML case ``text`` (called ``name`` in messages) and solve it."""
    case = parse_case(tomllib.loads(text), Path(f"<validation case {name}>"))
    return simulate(case)
