"""Everything ``fvheat run`` writes after ``summary.json``: inputs, field files, cells.csv,
figures and the report."""

from __future__ import annotations

import logging
import shutil
import threading
from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

from fvheat.output.fields import FIELDS_DIR, write_cells_csv, write_fields
from fvheat.output.inputs import INPUTS_FILE, write_inputs
from fvheat.output.report import write_report
from fvheat.output.results import FIGURES_DIR, ResultsFolder
from fvheat.study import Study

if TYPE_CHECKING:
    from fvheat.output.memory import SolvedFields
    from fvheat.output.workers import FigureWorkers

log = logging.getLogger(__name__)

CELLS_FILE = "cells.csv"


def owned_outputs() -> tuple[str, ...]:
    """Names of every file and folder ``fvheat run`` writes into a results folder."""
    from fvheat.output.report import HTML_FILE, MARKDOWN_FILE, PDF_FILE
    from fvheat.output.results import SUMMARY_FILE, TIMESERIES_FILE

    return (
        SUMMARY_FILE,
        TIMESERIES_FILE,
        INPUTS_FILE,
        CELLS_FILE,
        FIELDS_DIR,
        FIGURES_DIR,
        HTML_FILE,
        MARKDOWN_FILE,
        PDF_FILE,
    )


def clear_outputs(out: Path) -> None:
    """Remove the outputs of an earlier run from ``out`` (only what fvheat writes), so that
    nothing of it can pass for a result of the new run."""
    for name in owned_outputs():
        p = out / name
        if p.is_dir() and not p.is_symlink():
            shutil.rmtree(p)
        elif p.exists() or p.is_symlink():
            p.unlink()


#: above this many cells cells.csv is not written (the VTU holds the same data, in binary):
#: text output of millions of values costs more than the solve
CELLS_CSV_LIMIT = 250_000


def write_outputs(
    study: Study,
    out: str | Path,
    *,
    plots: bool = True,
    fields: str = "all",
    workers: FigureWorkers | None = None,
) -> list[Path]:
    """Write inputs.json, fields/ (``fields``: "all" saved states, the "last" one, or
    "none"), cells.csv (up to ``CELLS_CSV_LIMIT`` cells; not with "none"), figures/ (unless
    ``plots`` is False) and report.html / report.md into ``out``, which must already hold
    summary.json. The figures are drawn from the fields in memory by ``workers`` (started
    before the solve, see :mod:`fvheat.output.workers`) while this process writes the field
    files and cells.csv; without workers the field files are written in a background thread
    while this process draws (each file atomically)."""
    from fvheat.output.memory import SolvedFields

    out = Path(out)
    sol = study.solution
    written = [write_inputs(out, sol.case, sol.mesh)]
    memory = SolvedFields(sol, study.surface_solution)
    if plots and workers is not None and len(workers):
        folder = ResultsFolder.open(out)
        written += _draw_in_workers(study, folder, memory, fields, workers)
        return [*written, *write_report(folder)]
    writer = _Background(lambda: _write_field_files(study, out, memory, fields))
    writer.start()
    try:
        folder = ResultsFolder.open(out)
        if plots:
            from fvheat.output.plots.figures import draw_figures

            for r in draw_figures(folder, fields=memory):
                written += [out / r.png] + ([out / r.svg] if r.svg else [])
        else:
            _drop_stale_index(out)
    except BaseException:
        writer.wait()  # the field files finish (or fail) before the error goes up
        raise
    written += writer.join()
    written += write_report(folder)
    return written


def _draw_in_workers(
    study: Study,
    folder: ResultsFolder,
    memory: SolvedFields,
    fields: str,
    workers: FigureWorkers,
) -> list[Path]:
    """The figures drawn by ``workers`` while this process writes the field files; the
    files written, figures last."""
    from fvheat.output.plots.figures import (
        FIGURE_COST,
        FigureRecord,
        RenderedFigure,
        draw_figures,
        draw_group,
        planned_figures,
        split_figures,
        states_needed,
        write_index,
    )
    from fvheat.output.workers import WorkerLost

    out = folder.path
    frozen = memory.freeze(states_needed(len(memory.field_times())))
    records: list[FigureRecord] | None = None
    # the jobs sent during the solve: the mesh figure (see fvheat.run), perhaps still
    # being drawn; the other figures go first to the worker that is free
    early = workers.busy
    names = [n for n in planned_figures(folder, frozen) if not (early and n == "mesh")]
    start = [FIGURE_COST["mesh"] if w else 0.0 for w in workers.working()]
    groups = split_figures(names, len(workers), start)
    to = [i for i, group in enumerate(groups) if group]
    try:
        workers.submit(draw_group, [(out, frozen, groups[i]) for i in to], to)
    except WorkerLost as err:
        lost: WorkerLost | None = err
    else:
        lost = None
    try:
        written = _write_field_files(study, out, memory, fields)
    finally:  # the figures finish (or fail) before an error of the field files goes up
        if lost is None:
            try:
                replies = workers.results()
                rendered: list[RenderedFigure] = replies[:early]
                records = [r for group in replies[early:] for r in group]
                records += [r.save(out) for r in rendered]
            except WorkerLost as err:
                lost = err
    if records is None:  # a worker was killed (out of memory?): draw them here instead
        log.warning("%s; the figures are drawn in the run's own process instead", lost)
        records = draw_figures(folder, fields=memory)
    else:
        write_index(out, records)
    for r in records:
        written += [out / r.png] + ([out / r.svg] if r.svg else [])
    return written


def _drop_stale_index(out: Path) -> None:
    """Remove a figure index left by an earlier run (``--no-plots``): its figures must not
    appear in the new report."""
    from fvheat.output.plots.figures import INDEX_FILE

    stale = out / FIGURES_DIR / INDEX_FILE
    if stale.is_file():
        log.info("removing %s: figures of an earlier run", stale)
        stale.unlink()


def _write_field_files(study: Study, out: Path, memory, which: str) -> list[Path]:
    sol = study.solution
    written = write_fields(sol, out, study.surface_solution, which=which, fields=memory)
    if which == "none":
        return written
    if sol.mesh.n_cells <= CELLS_CSV_LIMIT:
        if sol.mesh.triangles is not None:  # one row per node
            from fvheat.output.triangle_fields import write_node_csv

            written.append(write_node_csv(out / CELLS_FILE, sol))
        else:
            written.append(write_cells_csv(out / CELLS_FILE, memory.field(-1)))
    else:
        log.info(
            "%d cells: cells.csv not written (see fields/ for the same data)", sol.mesh.n_cells
        )
    return written


class _Background:
    """A function run in a thread; :meth:`join` returns its result or raises its error."""

    def __init__(self, fn: Callable[[], list[Path]]) -> None:
        self._fn = fn
        self._result: list[Path] = []
        self._error: BaseException | None = None
        self._thread = threading.Thread(target=self._run, name="fvheat-fields", daemon=True)

    def _run(self) -> None:
        try:
            self._result = self._fn()
        except BaseException as err:  # handed to the caller in join()
            self._error = err

    def start(self) -> None:
        self._thread.start()

    def wait(self) -> None:
        self._thread.join()

    def join(self) -> list[Path]:
        self._thread.join()
        if self._error is not None:
            raise self._error
        return self._result
