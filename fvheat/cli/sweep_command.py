"""``fvheat sweep``: run many variants of a case in parallel, resumably, into one table."""

from __future__ import annotations

import contextlib
import signal
import sys
from collections.abc import Iterator, Sequence
from pathlib import Path
from typing import TYPE_CHECKING

from fvheat.cautions import CAUTION
from fvheat.errors import CaseError
from fvheat.output.paths import check_output_file, check_output_folder
from fvheat.sweep.local_executor import LocalExecutor
from fvheat.sweep.runner import SweepReport, plan_sweep, run_sweep
from fvheat.sweep.store import Row
from fvheat.sweep.values import display_value

if TYPE_CHECKING:
    from rich.progress import TaskID

    from fvheat.sweep.dask_executor import DaskExecutor

#: rows of the end-of-sweep table printed to the terminal (all are in the database)
SHOWN_ROWS = 40
#: finished variants with a damaged folder named one per line
SHOWN_DAMAGED = 10
#: results shown in that table when the case declares a junction
JUNCTION_SHOWN = ("psi", "f_Rsi")


def default_sweep_out(case_file: Path) -> Path:
    """Default sweep folder: ``<case stem>_sweep`` in the current folder."""
    return Path(f"{case_file.stem}_sweep")


@contextlib.contextmanager
def _terminate_as_interrupt() -> Iterator[None]:
    """Treat SIGTERM like Ctrl-C while the sweep command runs, so workers are stopped
    cleanly."""

    def handler(signum: int, frame: object) -> None:
        raise KeyboardInterrupt

    try:
        old = signal.signal(signal.SIGTERM, handler)
    except ValueError:  # not the main thread: leave signals alone
        yield
        return
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, old)


@_terminate_as_interrupt()
def sweep_case(
    case_file: Path,
    vary: Sequence[str],
    variants_file: Path | None,
    *,
    zipped: bool,
    fixed: tuple[str, ...],
    jobs: int | None,
    out: Path | None,
    table: Path | None,
    retry_failed: bool,
    plots: bool,
    scheduler: str | None,
    fields: str = "all",
    quiet: bool,
) -> int:
    """Check the sweep (bad arguments raise :class:`CaseError` before anything is written),
    run the missing variants, export the table; 1 if any variant failed, else 0.

    SIGTERM is treated like Ctrl-C (KeyboardInterrupt) from the start, so a sweep stopped
    while its workers start stops them cleanly too."""
    from fvheat.sweep.variants import vary_variants
    from fvheat.sweep.variants_file import read_variants_file

    if variants_file is not None:
        if vary:
            raise CaseError("give --vary or --variants, not both", key="--variants")
        if zipped:
            raise CaseError("--zip pairs --vary lists; a variants file lists variants", key="--zip")
        keys, variants = read_variants_file(variants_file)
        origin = f"--variants {variants_file}: column"
    else:
        keys, variants = vary_variants(vary, zipped=zipped)
        origin = "--vary"
    from fvheat.run import check_fields_choice

    check_fields_choice(fields)
    if jobs is not None and jobs < 1:
        raise CaseError(f"must be at least 1, got {jobs}", key="--jobs")
    if table is not None and table.suffix.lower() != ".csv":
        raise CaseError("expected a .csv file name", key=f"--table {table}")
    out = out if out is not None else default_sweep_out(case_file)
    check_output_folder(out, "--out")
    if table is not None:
        check_output_file(table, "--table", made=(out,))
    executor = _executor(scheduler, jobs)  # local workers start warming up now
    plan = plan_sweep(case_file, fixed, keys, variants, out, origin=origin)
    with executor, _progress(quiet) as progress:
        try:
            report = run_sweep(
                plan,
                executor,
                retry_failed=retry_failed,
                plots=plots,
                fields=fields,
                on_start=progress.start,
                on_result=progress.advance,
            )
        except KeyboardInterrupt:
            progress.stop()
            print(
                f"fvheat: sweep interrupted after {progress.recorded} variants "
                f"this run; all finished ones are in {plan.database}; run the same command "
                "again to resume",
                file=sys.stderr,
            )
            raise
        where = executor.describe()
    if table is not None:
        from fvheat.sweep.table import from_store, write_csv

        write_csv(from_store(plan.database, plan.keys, readonly=False), table)
    if not quiet:
        _print_report(report, plan.database, table, where)
        print_damaged(report)
    return 1 if report.count("failed") else 0


def print_damaged(report: SweepReport) -> None:
    """One warning line on standard error per finished variant whose folder is missing or
    damaged (at most :data:`SHOWN_DAMAGED`, then how many more)."""
    for row, why in report.damaged[:SHOWN_DAMAGED]:
        print(
            f"fvheat: warning: {row.output}: {why} (its results are in the database); "
            "--retry-failed runs it again",
            file=sys.stderr,
        )
    more = len(report.damaged) - SHOWN_DAMAGED
    if more > 0:
        print(
            f"fvheat: warning: {more} more finished variants with damaged folders", file=sys.stderr
        )


def _executor(scheduler: str | None, jobs: int | None) -> LocalExecutor | DaskExecutor:
    if scheduler is not None:
        from fvheat.sweep.dask_executor import DaskExecutor

        return DaskExecutor(scheduler, in_flight=jobs)
    return LocalExecutor(jobs)


class _Bar:
    """A rich progress bar on stderr (nothing when quiet) and a count of recorded variants."""

    def __init__(self, quiet: bool):
        self.bar = None
        self.task: TaskID | None = None
        self.recorded = 0
        self.failed = 0
        if not quiet:
            from rich.console import Console
            from rich.progress import (
                BarColumn,
                MofNCompleteColumn,
                Progress,
                TextColumn,
                TimeElapsedColumn,
                TimeRemainingColumn,
            )

            self.bar = Progress(
                TextColumn("sweep"),
                BarColumn(),
                MofNCompleteColumn(),
                TextColumn("{task.fields[failed]} failed"),
                TimeElapsedColumn(),
                TimeRemainingColumn(),
                transient=True,
                console=Console(stderr=True),
            )

    def start(self, to_run: int, total: int) -> None:
        if self.bar is not None:
            self.bar.start()
            self.task = self.bar.add_task("sweep", total=to_run, failed=0)

    def advance(self, row: Row) -> None:
        self.recorded += 1
        self.failed += row.status == "failed"
        if self.bar is not None and self.task is not None:
            self.bar.update(self.task, advance=1, failed=self.failed)

    def stop(self) -> None:
        if self.bar is not None:
            self.bar.stop()


@contextlib.contextmanager
def _progress(quiet: bool) -> Iterator[_Bar]:
    bar = _Bar(quiet)
    try:
        yield bar
    finally:
        bar.stop()


def _print_report(report: SweepReport, database: Path, table: Path | None, where: str) -> None:
    from rich.console import Console
    from rich.table import Table

    con = Console()
    rows = report.rows
    results = _shown_results(rows)
    t = Table(title=f"sweep: {len(rows)} variants", title_justify="left")
    for key in report.keys:
        t.add_column(key, justify="right")
    t.add_column("status")
    for name in results:
        t.add_column(name, justify="right")
    for row in rows[:SHOWN_ROWS]:
        params = [display_value(row.params[k]) if k in row.params else "" for k in report.keys]
        values = [_fmt(row.results.get(n)) for n in results]
        t.add_row(*params, row.status, *values)
    con.print(t)
    if len(rows) > SHOWN_ROWS:
        con.print(f"... {len(rows) - SHOWN_ROWS} more rows in the database")
    for row in rows:
        if row.status == "failed":
            con.print(f"failed {row.output}: {row.message}", markup=False, highlight=False)
    con.print(
        f"{report.count('done')} done, {report.count('failed')} failed, "
        f"{report.count('pending')} pending; ran {report.ran} now on {where}"
    )
    notes = [
        (report.recovered, "finished variants taken back from their folders"),
        (report.repaired, "finished variants with damaged folders run again"),
        (report.cleaned, "temporary files of stopped runs deleted"),
    ]
    for count, what in notes:
        if count:
            con.print(f"{count} {what}", markup=False, highlight=False)
    con.print(f"database: {database}" + (f"; table: {table}" if table else ""), markup=False)
    con.print(f"[dim]Caution: {CAUTION}[/dim]")


def _shown_results(rows: Sequence[Row]) -> list[str]:
    names: list[str] = []
    for row in rows:
        names.extend(k for k in row.results if k not in names)
    junction = [n for n in JUNCTION_SHOWN if n in names]
    return junction or [n for n in names if n.startswith("heat_flow_")]


def _fmt(value: float | None) -> str:
    return "" if value is None else f"{value:.4g}"
