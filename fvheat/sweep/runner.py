"""The coordinator of a sweep: checks the plan, records every variant in the sweep's
database, hands the missing ones to an executor and records each outcome as it arrives.

Running the same sweep again resumes it: variants already done (or, unless retried,
failed) are not run again. On every resume the coordinator first

- refuses when the case, the fixed overrides or a file the case reads changed since the
  finished variants were computed (:meth:`~fvheat.sweep.store.SweepStore.claim`, and each
  finished variant's own input files),
- deletes temporary files that writers killed mid-write left in the folders of variants
  that did not finish (:func:`~fvheat.sweep.folders.remove_temporary_files`),
- takes back variants whose folder holds a finished run the database does not know of
  (:func:`~fvheat.sweep.folders.finished_outcome`: the coordinator was killed before it
  recorded it, or the database was deleted), and
- checks the folders of the finished variants (:func:`~fvheat.sweep.folders.folder_problem`):
  damaged ones are reported, and rerun with ``retry_failed``.
"""

from __future__ import annotations

import contextlib
import logging
import re
from collections.abc import Callable, Generator, Iterable, Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Protocol

from fvheat.case.load import load_case
from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.sweep.folders import finished_outcome, folder_problem, remove_temporary_files
from fvheat.sweep.identity import InputCheck, file_sha256, input_hashes
from fvheat.sweep.signals import signals_deferred
from fvheat.sweep.store import DB_NAME, Row, SweepStore
from fvheat.sweep.variants import Variant
from fvheat.sweep.worker import Outcome, Task

log = logging.getLogger(__name__)

LOCK_NAME = "sweep.lock"
#: the name of a variant folder (:func:`fvheat.sweep.store.folder_name`)
VARIANT_FOLDER = re.compile(r"v\d{4,}_[0-9a-f]{8}")


class Executor(Protocol):
    """Runs tasks somewhere and yields their outcomes as they finish."""

    def run(
        self, tasks: Iterable[Task], dispatched: Callable[[Task], None]
    ) -> Generator[tuple[Task, Outcome], None, None]:
        """Run ``tasks`` and yield ``(task, outcome)`` as they finish."""
        ...


@dataclass(frozen=True)
class SweepPlan:
    """A checked sweep: the case (absolute path), the overrides every variant gets, the
    varied keys (table columns, in the order given) and the variants; ``inputs`` the other
    files the case reads, each with its SHA-256 (:func:`fvheat.sweep.identity.input_hashes`)."""

    case_file: Path
    fixed: tuple[str, ...]
    keys: tuple[str, ...]
    variants: tuple[Variant, ...]
    out: Path
    title: str
    inputs: tuple[tuple[str, str], ...] = ()

    @property
    def database(self) -> Path:
        """Path of the sweep's database file."""
        return self.out / DB_NAME


@dataclass(frozen=True)
class SweepReport:
    """The sweep's variants as stored at the end (in plan order) and how many ran now.

    ``damaged``: finished variants whose folder is missing or damaged, with what is wrong,
    left as they are (rerun with ``retry_failed``); ``repaired``: how many such variants
    were run again; ``recovered``: variants taken back from their folders without running;
    ``cleaned``: temporary files deleted from unfinished variants' folders."""

    keys: tuple[str, ...]
    rows: tuple[Row, ...]
    ran: int
    damaged: tuple[tuple[Row, str], ...] = ()
    repaired: int = 0
    recovered: int = 0
    cleaned: int = 0

    def count(self, status: str) -> int:
        """Number of variants with ``status``."""
        return sum(r.status == status for r in self.rows)


def plan_sweep(
    case_file: str | Path,
    fixed: Sequence[str],
    keys: Sequence[str],
    variants: Sequence[Variant],
    out: str | Path,
    *,
    origin: str = "--vary",
) -> SweepPlan:
    """Check a sweep before anything is written: the case with the fixed overrides (or, for
    a case that needs the varied keys, with some variant's) must be valid, and every varied
    key must be a key path the case accepts. A bad value in some variants is not an error
    here: those variants fail and are recorded. ``origin`` names where the varied keys
    come from in messages (``"--vary"``, or ``"--variants FILE: column"``)."""
    case_path = Path(case_file)
    try:
        case: Case | None = load_case(case_path, tuple(fixed))
    except CaseError:
        case = _first_valid(case_path, tuple(fixed), variants)
        if case is None:
            raise
    assert case is not None
    fixed_keys = {o.partition("=")[0].strip() for o in fixed}
    for key in keys:
        if key in fixed_keys:
            raise CaseError("key is both varied and fixed with --set", key=f"{origin} {key}")
        _check_key(case_path, tuple(fixed), key, variants, origin)
    return SweepPlan(
        case_file=case_path.resolve(),
        fixed=tuple(fixed),
        keys=tuple(keys),
        variants=tuple(variants),
        out=Path(out).resolve(),
        title=case.title,
        inputs=tuple(input_hashes(case).items()),
    )


def _first_valid(
    case_file: Path, fixed: tuple[str, ...], variants: Sequence[Variant]
) -> Case | None:
    """The first variant's case that loads, or None."""
    for variant in variants:
        try:
            return load_case(case_file, (*fixed, *variant.overrides))
        except CaseError:
            continue
    return None


def _check_key(
    case_file: Path, fixed: tuple[str, ...], key: str, variants: Sequence[Variant], origin: str
) -> None:
    """Raise if ``key`` cannot be set in this case (not a key path it accepts)."""
    value = next((v for k, v in (p for var in variants for p in var.params) if k == key), None)
    if value is None:
        return
    try:
        load_case(case_file, (*fixed, f"{key}={value}"))
    except CaseError as err:
        where = err.key or ""
        structural = where == f"--set {key}"
        unknown = "unknown key" in str(err) and (where == key or key.startswith(where + "."))
        if structural or unknown:
            detail = str(err).split(f"{where}: ", 1)[-1]
            raise CaseError(detail, file=str(case_file), key=f"{origin} {key}") from None


def run_sweep(
    plan: SweepPlan,
    executor: Executor,
    *,
    retry_failed: bool = False,
    plots: bool = False,
    fields: str = "all",
    on_start: Callable[[int, int], None] | None = None,
    on_result: Callable[[Row], None] | None = None,
) -> SweepReport:
    """Run the plan's missing variants on ``executor``, recording each in the database;
    ``plots`` also draws each variant's figures (as ``fvheat run`` without ``--no-plots``);
    ``fields`` is passed on as ``fvheat run --fields``.

    ``on_start(to_run, total)`` is called once before the first task, ``on_result(row)``
    after each variant is recorded. Interrupting (KeyboardInterrupt) keeps everything
    recorded so far; the same plan run again picks up where it stopped.
    """
    plan.out.mkdir(parents=True, exist_ok=True)
    case = str(plan.case_file)
    with _exclusive(plan.out / LOCK_NAME), SweepStore(plan.database) as store:
        store.claim(case, file_sha256(plan.case_file), plan.fixed, plan.title, dict(plan.inputs))
        inputs = InputCheck(plan.case_file)
        _refuse_changed_inputs(store, inputs)
        rows = store.add(plan.variants)
        cleaned = _clean_unfinished(store, plan.out)
        recovered = _recover(store, plan, rows, inputs)
        if recovered:
            current = {r.id: r for r in store.rows()}
            rows = [current[r.id] for r in rows]
        damaged = _damaged(plan, rows)
        wanted = ("pending", "failed") if retry_failed else ("pending",)
        rerun = {r.id for r, _ in damaged} if retry_failed else set()
        todo = [r for r in rows if r.status in wanted or r.id in rerun]
        check = getattr(executor, "check_paths", None)
        if todo and check is not None:
            check(case, str(plan.out))
        tasks = [
            Task(r.id, case, _all(plan, r), str(plan.out / r.output), plots, fields) for r in todo
        ]
        if on_start is not None:
            on_start(len(tasks), len(rows))
        log.info("sweep %s: %d variants, %d to run", plan.out, len(rows), len(tasks))
        with contextlib.closing(executor.run(tasks, lambda t: store.dispatched(t.id))) as results:
            for task, outcome in results:
                with signals_deferred():
                    row = store.record(task.id, outcome)
                if on_result is not None:
                    on_result(row)
        final = {r.id: r for r in store.rows()}
    return SweepReport(
        plan.keys,
        tuple(final[r.id] for r in rows),
        len(tasks),
        damaged=() if retry_failed else tuple(damaged),
        repaired=len(rerun),
        recovered=recovered,
        cleaned=cleaned,
    )


def _all(plan: SweepPlan, row: Row) -> tuple[str, ...]:
    """Every override of a variant: the sweep's fixed ones, then the variant's."""
    return (*plan.fixed, *_overrides(row))


def _recover(store: SweepStore, plan: SweepPlan, rows: Sequence[Row], inputs: InputCheck) -> int:
    """Record as done the pending variants whose folder holds a finished run of them;
    return how many."""
    recovered = 0
    for r in rows:
        if r.status != "pending":
            continue
        outcome = finished_outcome(plan.out / r.output, plan.case_file, _all(plan, r), inputs)
        if outcome is not None:
            with signals_deferred():
                store.record(r.id, outcome)
            recovered += 1
    if recovered:
        log.info("took back %d finished variants from their folders", recovered)
    return recovered


def _damaged(plan: SweepPlan, rows: Sequence[Row]) -> list[tuple[Row, str]]:
    """The finished variants whose folder is missing or damaged, or whose rerun (with
    ``retry_failed``) was stopped half-way, with what is wrong."""
    found = []
    for r in rows:
        if r.status != "done":
            continue
        if r.finished is None:
            why: str | None = "it was being run again when the sweep stopped"
        else:
            why = folder_problem(plan.out / r.output, plan.case_file, _all(plan, r), r.results)
        if why is not None:
            found.append((r, why))
    return found


def _refuse_changed_inputs(store: SweepStore, inputs: InputCheck) -> None:
    """Raise :class:`CaseError` when a file a finished variant's case read has changed
    since: its results and those computed from now on would be mixed in one table."""
    for row in store.rows():
        if row.status != "done" or not row.inputs:
            continue
        changed = inputs.changed(row.inputs)
        if changed:
            raise CaseError(
                f"{inputs.path(changed[0])} changed since variant {row.output} was computed "
                "from it (the sweep would mix results of both versions): run into another "
                f"--out folder, or delete {store.path.parent} to start afresh",
                file=str(store.path),
            )


def _clean_unfinished(store: SweepStore, out: Path) -> int:
    """Delete the temporary files left (by writers killed mid-write) in the folders of the
    sweep's variants whose last run did not finish; only those folders are looked into.
    Returns how many were deleted."""
    removed = 0
    for row in store.rows():
        if row.status == "done" and row.finished is not None:
            continue  # its worker ended normally: every file it wrote is complete
        if not VARIANT_FOLDER.fullmatch(row.output):
            continue
        folder = out / row.output
        if folder.is_dir() and not folder.is_symlink():
            found = remove_temporary_files(folder)
            for path in found:
                log.info("deleted %s (left by a run that was stopped)", path)
            removed += len(found)
    return removed


def _overrides(row: Row) -> tuple[str, ...]:
    return tuple(f"{k}={v}" for k, v in row.params.items())


@contextlib.contextmanager
def _exclusive(lock: Path) -> Iterator[None]:
    """Hold an exclusive lock on ``lock`` (released by the OS even if the process is
    killed), so two coordinators never run the same sweep folder at once."""
    try:
        import fcntl
    except ImportError:  # not POSIX: no lock
        yield
        return
    with lock.open("a") as fh:
        try:
            fcntl.flock(fh, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            raise CaseError(
                "another sweep is running in this folder", file=str(lock.parent)
            ) from None
        try:
            yield
        finally:
            fcntl.flock(fh, fcntl.LOCK_UN)
