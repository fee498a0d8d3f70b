"""The coordinator of a sweep: checks the plan, records every variant in the sweep's
database, hands the missing ones to an executor and records each outcome as it arrives.

Running the same sweep again resumes it: variants already done (or, unless retried,
failed) are not run again.
"""

from __future__ import annotations

import contextlib
import hashlib
import logging
import signal
import sys
from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Protocol

from fvheat.case.load import load_case
from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.sweep.store import DB_NAME, Row, SweepStore
from fvheat.sweep.variants import Variant
from fvheat.sweep.worker import Outcome, Task

log = logging.getLogger(__name__)

LOCK_NAME = "sweep.lock"


class Executor(Protocol):
    """Runs tasks somewhere and yields their outcomes as they finish."""

    def run(
        self, tasks: Iterable[Task], dispatched: Callable[[Task], None]
    ) -> Iterator[tuple[Task, Outcome]]: ...


@dataclass(frozen=True)
class SweepPlan:
    """A checked sweep: the case (absolute path), the overrides every variant gets, the
    varied keys (table columns, in the order given) and the variants."""

    case_file: Path
    fixed: tuple[str, ...]
    keys: tuple[str, ...]
    variants: tuple[Variant, ...]
    out: Path
    title: str

    @property
    def database(self) -> Path:
        return self.out / DB_NAME


@dataclass(frozen=True)
class SweepReport:
    """The sweep's variants as stored at the end (in plan order) and how many ran now."""

    keys: tuple[str, ...]
    rows: tuple[Row, ...]
    ran: int

    def count(self, status: str) -> int:
        return sum(r.status == status for r in self.rows)


def plan_sweep(
    case_file: str | Path,
    fixed: Sequence[str],
    keys: Sequence[str],
    variants: Sequence[Variant],
    out: str | Path,
) -> SweepPlan:
    """Check a sweep before anything is written: the case with the fixed overrides (or, for
    a case that needs the varied keys, with some variant's) must be valid, and every varied
    key must be a key path the case accepts. A bad value in some variants is not an error
    here: those variants fail and are recorded."""
    case_path = Path(case_file)
    try:
        case = load_case(case_path, tuple(fixed))
    except CaseError:
        case = _first_valid(case_path, tuple(fixed), variants)
        if case is None:
            raise
    fixed_keys = {o.partition("=")[0].strip() for o in fixed}
    for key in keys:
        if key in fixed_keys:
            raise CaseError("key is both varied and fixed with --set", key=f"--vary {key}")
        _check_key(case_path, tuple(fixed), key, variants)
    return SweepPlan(
        case_file=case_path.resolve(),
        fixed=tuple(fixed),
        keys=tuple(keys),
        variants=tuple(variants),
        out=Path(out).resolve(),
        title=case.title,
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
    case_file: Path, fixed: tuple[str, ...], key: str, variants: Sequence[Variant]
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
            raise CaseError(detail, file=str(case_file), key=f"--vary {key}") from None


def case_sha256(path: Path) -> str:
    """SHA-256 of the case file's bytes."""
    return hashlib.sha256(path.read_bytes()).hexdigest()


def run_sweep(
    plan: SweepPlan,
    executor: Executor,
    *,
    retry_failed: bool = False,
    plots: bool = False,
    on_start: Callable[[int, int], None] | None = None,
    on_result: Callable[[Row], None] | None = None,
) -> SweepReport:
    """Run the plan's missing variants on ``executor``, recording each in the database;
    ``plots`` also draws each variant's figures (as ``fvheat run`` without ``--no-plots``).

    ``on_start(to_run, total)`` is called once before the first task, ``on_result(row)``
    after each variant is recorded. Interrupting (KeyboardInterrupt) keeps everything
    recorded so far; the same plan run again picks up where it stopped.
    """
    plan.out.mkdir(parents=True, exist_ok=True)
    with _exclusive(plan.out / LOCK_NAME), SweepStore(plan.database) as store:
        store.claim(str(plan.case_file), case_sha256(plan.case_file), plan.fixed, plan.title)
        rows = store.add(plan.variants)
        wanted = ("pending", "failed") if retry_failed else ("pending",)
        todo = [r for r in rows if r.status in wanted]
        check = getattr(executor, "check_paths", None)
        if todo and check is not None:
            check(str(plan.case_file), str(plan.out))
        case = str(plan.case_file)
        tasks = [
            Task(r.id, case, (*plan.fixed, *_overrides(r)), str(plan.out / r.output), plots)
            for r in todo
        ]
        if on_start is not None:
            on_start(len(tasks), len(rows))
        log.info("sweep %s: %d variants, %d to run", plan.out, len(rows), len(tasks))
        with contextlib.closing(executor.run(tasks, lambda t: store.dispatched(t.id))) as results:
            for task, outcome in results:
                with _signals_deferred():
                    row = store.record(task.id, outcome)
                if on_result is not None:
                    on_result(row)
        final = {r.id: r for r in store.rows()}
    return SweepReport(plan.keys, tuple(final[r.id] for r in rows), len(tasks))


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


@contextlib.contextmanager
def _signals_deferred() -> Iterator[None]:
    """Hold back SIGINT and SIGTERM while a result is being committed."""
    mask = getattr(signal, "pthread_sigmask", None)
    if mask is None or sys.platform == "win32":
        yield
        return
    old = mask(signal.SIG_BLOCK, {signal.SIGINT, signal.SIGTERM})
    try:
        yield
    finally:
        mask(signal.SIG_SETMASK, old)
