"""``fvheat target`` without printing: one full run per step, the bracket, the search."""

from __future__ import annotations

import tomllib
from collections.abc import Callable, Sequence
from pathlib import Path

from fvheat.case.load import load_case
from fvheat.case.overrides import apply_overrides, read_value
from fvheat.errors import CaseError
from fvheat.sensitivity.named import named_results
from fvheat.study import Study, run_study
from fvheat.target.goal import Goal
from fvheat.target.search import Search, Step, Unreachable, find_bracket, illinois

#: keys whose values stay positive: the bracket is searched by factors, not steps
POSITIVE = ("conductivity", "resistance", "convection", "density", "specific_heat")


def current_value(case_file: Path, overrides: Sequence[str], key: str) -> float:
    """The number at ``key`` in the case file (after ``overrides``), or :class:`CaseError`."""
    try:
        with Path(case_file).open("rb") as f:
            data = tomllib.load(f)
    except (OSError, tomllib.TOMLDecodeError) as err:
        raise CaseError(f"cannot read the case file: {err}", file=str(case_file)) from None
    data = apply_overrides(data, overrides, str(case_file))
    value = read_value(data, key, str(case_file))
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise CaseError(
            f"--vary needs a number here, found {value!r}; give --between LO HI",
            file=str(case_file),
            key=key,
        )
    return float(value)


def search_target(
    case_file: Path,
    key: str,
    goal: Goal,
    *,
    overrides: Sequence[str] = (),
    between: tuple[float, float] | None = None,
    tolerance: float,
    on_step: Callable[[int, Step], None] | None = None,
    max_runs: int = 40,
) -> Search:
    """Find the value of ``key`` at which ``goal`` is met within ``tolerance`` of its
    target. Raises :class:`Unreachable` (with the two ends) when the bracket does not
    straddle the target, :class:`CaseError` for bad input."""
    search = Search(goal, tolerance)
    case = load_case(case_file, overrides)  # the case itself must be valid
    del case

    studies: list[Study] = []

    def run(value: float, stage: str) -> Step:
        studies[:] = [_study(case_file, overrides, key, value)]
        results = named_results(studies[0])
        if goal.quantity not in results:
            names = ", ".join(results)
            raise CaseError(f"this case has no {goal.quantity!r} (it has {names})", key="--goal")
        step = Step(value, results[goal.quantity], stage)
        search.steps.append(step)
        if on_step is not None:
            on_step(len(search.steps), step)
        if len(search.steps) > max_runs:
            raise RuntimeError(f"no value within the tolerance after {max_runs} runs")
        return step

    if between is not None:
        lo, hi = run(between[0], "bracket"), run(between[1], "bracket")
        if (lo.quantity - goal.target) * (hi.quantity - goal.target) > 0.0:
            raise Unreachable(
                f"{goal.quantity} does not reach {goal.target:g} between {between[0]:g} and "
                f"{between[1]:g}",
                (lo, hi),
            )
    else:
        v0 = current_value(case_file, overrides, key)
        start = run(v0, "bracket")
        proposal = _newton_proposal(studies[0], key, goal, start)
        positive = v0 > 0.0 and (key.split(".")[-1] in POSITIVE or key.startswith("parameters."))
        lo, hi = find_bracket(run, goal, start, proposal, positive)
    search.bracket = (lo, hi)
    search.answer = illinois(run, goal, lo, hi, tolerance, max_runs)
    return search


def _study(case_file: Path, overrides: Sequence[str], key: str, value: float) -> Study:
    """One full run (no grid check) with ``key`` set to ``value``."""
    case = load_case(case_file, (*overrides, f"{key}={value!r}"))
    return run_study(case, check_grid=False, keep_fields=False)


def _newton_proposal(study: Study, key: str, goal: Goal, start: Step) -> float | None:
    """v0 − (q0 − target)/(dq/dv) from the adjoint sensitivity of the start run when
    ``key`` has one (steady cases, conductivities and surface coefficients), else None."""
    from fvheat.sensitivity.quantities import study_sensitivities

    if study.solution.case.transient:
        return None
    try:
        d = study_sensitivities(study).derivative(goal.quantity, key)
    except (CaseError, KeyError):
        return None
    if d == 0.0:
        return None
    return start.value - (start.quantity - goal.target) / d
