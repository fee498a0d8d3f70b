"""Everything ``fvheat run`` writes after ``summary.json``: inputs, field files, cells.csv,
figures and the report."""

from __future__ import annotations

import logging
import shutil
from pathlib import Path

from fvheat.output.fields import FIELDS_DIR, write_cells_csv, write_fields
from fvheat.output.inputs import INPUTS_FILE, write_inputs
from fvheat.output.report import write_report
from fvheat.output.results import FIGURES_DIR, ResultsFolder
from fvheat.output.view import field_view
from fvheat.study import Study

log = logging.getLogger(__name__)

CELLS_FILE = "cells.csv"


def owned_outputs() -> tuple[str, ...]:
    """Names of every file and folder ``fvheat run`` writes into a results folder."""
    from fvheat.output.report import HTML_FILE, MARKDOWN_FILE
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


def write_outputs(study: Study, out: str | Path, *, plots: bool = True) -> list[Path]:
    """Write inputs.json, fields/, cells.csv (up to ``CELLS_CSV_LIMIT`` cells), figures/
    (unless ``plots`` is False) and report.html / report.md into ``out``, which must
    already hold summary.json."""
    out = Path(out)
    sol = study.solution
    written = [write_inputs(out, sol.case, sol.mesh)]
    if sol.mesh.triangles is not None:  # the triangles' own field files and figures
        from fvheat.output.triangle_fields import write_triangle_fields

        written += write_triangle_fields(sol, out, study.surface_solution)
        if sol.mesh.n_cells <= CELLS_CSV_LIMIT:
            from fvheat.output.triangle_fields import write_node_csv

            written.append(write_node_csv(out / CELLS_FILE, sol))
        folder = ResultsFolder.open(out)
        if plots:
            from fvheat.output.plots.triangles import draw_triangle_figures

            for r in draw_triangle_figures(sol, out, folder.summary, study.surface_solution):
                written += [out / r.png] + ([out / r.svg] if r.svg else [])
        return [*written, *write_report(folder)]
    if sol.mesh.grid is None:  # field files and figures need the rectilinear grid
        log.warning("no rectilinear grid: field files and figures are not written")
        return [*written, *write_report(ResultsFolder.open(out))]
    written += write_fields(sol, out, study.surface_solution)
    if sol.mesh.n_cells <= CELLS_CSV_LIMIT:
        written.append(write_cells_csv(out / CELLS_FILE, field_view(sol)))
    else:
        log.info(
            "%d cells: cells.csv not written (see fields/ for the same data)", sol.mesh.n_cells
        )
    folder = ResultsFolder.open(out)
    if plots:
        from fvheat.output.plots.figures import draw_figures

        for r in draw_figures(folder):
            written += [out / r.png] + ([out / r.svg] if r.svg else [])
    else:
        # figures left by an earlier run in this folder must not appear in the new report
        from fvheat.output.plots.figures import INDEX_FILE

        stale = out / FIGURES_DIR / INDEX_FILE
        if stale.is_file():
            log.info("removing %s: figures of an earlier run", stale)
            stale.unlink()
    written += write_report(folder)
    return written
