"""Goals of ``fvheat target``: ``"psi<=0.20"``, ``"f_Rsi>=0.75"``, ``"heat_flow_outside>=-40"``."""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from fvheat.errors import CaseError
from fvheat.evaluate.junction import JUNCTION_QUANTITIES

#: quantities a goal may name besides ``heat_flow_<boundary>``
QUANTITIES = tuple(JUNCTION_QUANTITIES)
_GOAL = re.compile(r"^\s*([A-Za-z_][A-Za-z0-9_.-]*)\s*(<=|>=)\s*(\S+)\s*$")


@dataclass(frozen=True)
class Goal:
    """``quantity`` ``op`` (``"<="`` or ``">="``) ``target``, in the quantity's unit."""

    quantity: str
    op: str
    target: float

    def met(self, value: float, tolerance: float = 0.0) -> bool:
        """True when ``value`` meets the goal (within ``tolerance`` of the target)."""
        if self.op == "<=":
            return value <= self.target + tolerance
        return value >= self.target - tolerance

    def __str__(self) -> str:
        return f"{self.quantity}{self.op}{self.target:g}"


def parse_goal(text: str) -> Goal:
    """A :class:`Goal` from ``text``; :class:`CaseError` (key ``--goal``) when it is not one."""
    m = _GOAL.match(text)
    if m is None:
        raise CaseError(
            f'expected QUANTITY<=VALUE or QUANTITY>=VALUE (e.g. "psi<=0.20"), got {text!r}',
            key="--goal",
        )
    name, op, number = m.groups()
    if name not in QUANTITIES and not name.startswith("heat_flow_"):
        raise CaseError(
            f"unknown quantity {name!r}; goals name one of {', '.join(QUANTITIES)} or "
            "heat_flow_<boundary>",
            key="--goal",
        )
    try:
        target = float(number)
    except ValueError:
        raise CaseError(f"the target {number!r} is not a number", key="--goal") from None
    if not math.isfinite(target):
        raise CaseError(f"the target {number!r} is not a finite number", key="--goal")
    return Goal(name, op, target)
