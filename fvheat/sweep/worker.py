"""What a worker process does for one variant: the same pipeline as ``fvheat run``, with
its outputs in the variant's folder. Workers never touch the sweep's database."""

from __future__ import annotations

import logging
import time
import traceback
from dataclasses import dataclass, field
from pathlib import Path

from fvheat.errors import FvheatError
from fvheat.sweep.results import main_results

log = logging.getLogger(__name__)


@dataclass(frozen=True)
class Task:
    """One variant to run: its database row id, absolute case file path, all overrides
    (the sweep's fixed ones, then the variant's), absolute output folder, and whether to
    draw the figures (the slowest output; off unless asked for) and which field files to
    write (``fvheat run --fields``)."""

    id: int
    case_file: str
    overrides: tuple[str, ...]
    out: str
    plots: bool = False
    fields: str = "all"


@dataclass(frozen=True)
class Outcome:
    """``status`` "done" (with ``results``) or "failed" (with a one-line ``message``);
    ``seconds`` is the wall time the worker spent; ``inputs`` the SHA-256 of every file the
    variant's case read besides the case file (:func:`fvheat.sweep.identity.input_hashes`)."""

    status: str
    message: str | None = None
    results: dict[str, float] = field(default_factory=dict)
    seconds: float = 0.0
    inputs: dict[str, str] = field(default_factory=dict)


def run_task(task: Task) -> Outcome:
    """Run one variant exactly as ``fvheat run CASE --set ... --out DIR --quiet --no-plots``
    (or with figures, when ``task.plots``) does and return its main results; any error
    becomes a failed :class:`Outcome`, never an exception. A finished variant's folder
    gets its marker (:mod:`fvheat.sweep.folders`) last."""
    from fvheat.run import run_to_folder  # the very pipeline ``fvheat run`` calls
    from fvheat.sweep.folders import clear_marker, write_marker
    from fvheat.sweep.identity import input_hashes

    t0 = time.perf_counter()
    out = Path(task.out)
    try:
        clear_marker(out)
        study, summary = run_to_folder(
            Path(task.case_file), out, task.overrides, plots=task.plots, fields=task.fields
        )
        results = main_results(summary)
        inputs = input_hashes(study.solution.case)
        outcome = Outcome("done", None, results, time.perf_counter() - t0, inputs)
        write_marker(out, task.overrides, summary.get("case_sha256"), outcome)
    except FvheatError as err:
        return Outcome("failed", one_line(err), seconds=time.perf_counter() - t0)
    except Exception as err:  # a bug or a resource problem: record it, keep sweeping
        log.debug("variant %d failed:\n%s", task.id, traceback.format_exc())
        message = f"{type(err).__name__}: {one_line(err)}"
        return Outcome("failed", message, seconds=time.perf_counter() - t0)
    return outcome


def one_line(err: object) -> str:
    """``str(err)`` on one line (runs of white space as one space)."""
    return " ".join(str(err).split())
