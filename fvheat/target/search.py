"""Bracketing root search for ``fvheat target``: the value v of one key at which a run's
quantity q(v) equals the goal's target.

Illinois variant of regula falsi (Dowell & Jarratt, 1971, from memory): keep a bracket
[a, b] with q − target of opposite signs at its ends, take the secant point, and halve the
weight of the end kept when the new point falls on the same side as the last, so that
convergence stays superlinear. It stops when a run's q is within ``tolerance`` of the
target on the side that meets the goal, or after ``max_runs`` runs. Every step is one full
run of the case.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

from fvheat.target.goal import Goal


@dataclass(frozen=True)
class Step:
    """One run: key value and the goal quantity's value there."""

    value: float
    quantity: float
    stage: str  # "bracket" or "search"


@dataclass
class Search:
    """What the search did: every run, the bracket, and the answer (None if not found)."""

    goal: Goal
    tolerance: float
    steps: list[Step] = field(default_factory=list)
    bracket: tuple[Step, Step] | None = None
    answer: Step | None = None


class Unreachable(Exception):
    """The goal's target is not crossed between the two ends tried (``ends``)."""

    def __init__(self, message: str, ends: tuple[Step, Step]):
        super().__init__(message)
        self.ends = ends


def default_tolerance(goal: Goal) -> float:
    """Tolerance on the quantity: 1e-4 of |target| (1e-6 when the target is 0)."""
    return 1e-4 * abs(goal.target) if goal.target != 0.0 else 1e-6


def find_bracket(
    run: Callable[[float, str], Step],
    goal: Goal,
    start: Step,
    proposal: float | None,
    positive: bool,
    expansions: int = 8,
) -> tuple[Step, Step]:
    """Two runs on either side of the target, starting from ``start`` (the case's own
    value): first along the ``proposal`` (a Newton step from the sensitivity, when known),
    then upwards and downwards; each step from ``start`` doubles the last until the target
    is crossed, and a direction is left as soon as it moves away from the target. A
    ``positive`` key (conductivity, resistance) is only ever multiplied or divided.
    :class:`Unreachable` with the lowest and highest values tried otherwise."""
    f0 = start.quantity - goal.target
    if f0 == 0.0:
        return start, start
    tried = [start]
    directions: list[tuple[float | None, float]] = [(None, 1.0), (None, -1.0)]
    if proposal is not None and proposal != start.value:
        directions.insert(0, (proposal, 0.0))
    for prop, sign in directions:
        here = start
        for k in range(expansions):
            step = run(_next_value(start.value, prop, sign, k, positive), "bracket")
            tried.append(step)
            if (step.quantity - goal.target) * f0 <= 0.0:
                return here, step
            if abs(step.quantity - goal.target) > abs(here.quantity - goal.target):
                break  # moving away from the target
            here = step
    ends = (min(tried, key=lambda s: s.value), max(tried, key=lambda s: s.value))
    raise Unreachable(
        f"{goal.quantity} does not reach {goal.target:g} between the values tried", ends
    )


def _next_value(v0: float, proposal: float | None, sign: float, k: int, positive: bool) -> float:
    """The k-th trial value: the proposal's step doubled k times, or factors of 2 (positive
    keys) / steps of max(1, |v0|) (others) in direction ``sign``."""
    if proposal is not None:
        dv = (proposal - v0) * 2.0**k
        v = v0 + dv
        if positive and v <= 0.0:
            v = v0 / 2.0 ** (k + 1)
        return v
    if positive:
        return v0 * 2.0 ** (sign * (k + 1))
    return v0 + sign * max(1.0, abs(v0)) * 2.0**k


def illinois(
    run: Callable[[float, str], Step],
    goal: Goal,
    a: Step,
    b: Step,
    tolerance: float,
    max_runs: int = 40,
) -> Step:
    """Narrow the bracket [a, b] until a run's quantity lies in the acceptance band (the
    ``tolerance`` wide band on the side of the target that meets the goal, e.g.
    [target − tolerance, target] for ``<=``); returns that run. The search aims at the
    middle of the band. :class:`RuntimeError` after ``max_runs`` runs."""
    half = 0.5 * tolerance
    aim = goal.target - half if goal.op == "<=" else goal.target + half

    def inside(step: Step) -> bool:
        return abs(step.quantity - aim) <= half and goal.met(step.quantity)

    for end in (a, b):
        if inside(end):
            return end
    fa, fb = a.quantity - aim, b.quantity - aim
    if fa * fb > 0.0:
        raise ValueError("not a bracket")
    for _ in range(max_runs):
        v = (a.value * fb - b.value * fa) / (fb - fa)
        if not math.isfinite(v) or v == a.value or v == b.value:
            v = 0.5 * (a.value + b.value)
        c = run(v, "search")
        if inside(c):
            return c
        fc = c.quantity - aim
        if fc * fb < 0.0:
            a, fa = b, fb
        else:
            fa *= 0.5  # the kept end again: halve its weight (Illinois)
        b, fb = c, fc
    raise RuntimeError(f"no value within the tolerance after {max_runs} runs")
