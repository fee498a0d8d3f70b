"""``fvheat target``: the value of one key at which a goal on a result is met."""

from __future__ import annotations

import json
import sys
from pathlib import Path

from fvheat.cautions import CAUTION
from fvheat.output.files import atomic_write_text
from fvheat.output.paths import check_output_folder
from fvheat.output.workers import RUN_WORKERS, FigureWorkers
from fvheat.run import run_to_folder
from fvheat.target.goal import parse_goal
from fvheat.target.runner import search_target
from fvheat.target.search import Step, Unreachable, default_tolerance

TARGET_FILE = "target.json"


def default_target_out(case_file: Path) -> Path:
    """Default folder of the final run: ``<case stem>_target``."""
    return Path(f"{case_file.stem}_target")


def target_case(
    case_file: Path,
    key: str,
    goal_text: str,
    *,
    between: tuple[float, float] | None,
    out: Path | None,
    overrides: tuple[str, ...],
    tolerance: float | None,
    quiet: bool,
) -> int:
    """Search, print every run, write the final run's folder with ``target.json``; exit
    code 0, or 1 when the goal cannot be reached (both ends printed)."""
    goal = parse_goal(goal_text)
    out = out if out is not None else default_target_out(case_file)
    check_output_folder(out, "--out")
    tol = tolerance if tolerance is not None else default_tolerance(goal)

    def show(n: int, step: Step) -> None:
        if not quiet:
            print(
                f"run {n:2d} ({step.stage}): {key} = {step.value:.6g} → {goal.quantity} = "
                f"{step.quantity:.6g}"
            )

    try:
        search = search_target(
            case_file,
            key,
            goal,
            overrides=overrides,
            between=between,
            tolerance=tol,
            on_step=show,
        )
    except Unreachable as err:
        a, b = err.ends
        print(
            f"fvheat: goal {goal} not reachable: {err}; {key} = {a.value:.6g} gives "
            f"{goal.quantity} = {a.quantity:.6g}, {key} = {b.value:.6g} gives "
            f"{goal.quantity} = {b.quantity:.6g}",
            file=sys.stderr,
        )
        return 1
    except RuntimeError as err:
        print(f"fvheat: goal {goal} not found: {err}", file=sys.stderr)
        return 1
    answer = search.answer
    assert answer is not None
    final = (*overrides, f"{key}={answer.value!r}")
    with FigureWorkers(RUN_WORKERS) as workers:  # the final run, drawn as `fvheat run` draws
        run_to_folder(case_file, out, final, workers=workers)
    record = {
        "key": key,
        "value": answer.value,
        "goal": str(goal),
        "quantity": goal.quantity,
        "target": goal.target,
        "achieved": answer.quantity,
        "met": goal.met(answer.quantity),
        "tolerance": tol,
        "method": "Illinois (modified regula falsi) on full runs",
        "iterations": [
            {"value": s.value, goal.quantity: s.quantity, "stage": s.stage} for s in search.steps
        ],
        "overrides": list(final),
        "caution": CAUTION,
    }
    atomic_write_text(out / TARGET_FILE, json.dumps(record, indent=2) + "\n")
    if not quiet:
        print(
            f"{key} = {answer.value:.6g} gives {goal.quantity} = {answer.quantity:.6g} "
            f"(goal {goal}, tolerance {tol:.2g}) after {len(search.steps)} runs; "
            f"results in {out}/"
        )
        print(f"Caution: {CAUTION}")
    return 0
