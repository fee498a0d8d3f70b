"""A complete run from a case file to a results folder — what ``fvheat run`` does, without
printing, so that scripts and sweep workers use the very same pipeline."""

from __future__ import annotations

import time
from pathlib import Path
from typing import Any

from fvheat.case.load import load_case
from fvheat.mesh.rectilinear import build_mesh
from fvheat.simulate import Progress
from fvheat.study import Study, run_study


def run_to_folder(
    case_file: Path,
    out: Path,
    overrides: tuple[str, ...] = (),
    *,
    grid_check: bool | None = None,
    plots: bool = True,
    progress: Progress | None = None,
) -> tuple[Study, dict[str, Any]]:
    """Validate and mesh (before anything is written), solve, then write ``summary.json``,
    ``timeseries.csv`` (transient) and the other outputs into ``out``. Returns the study and
    the summary dictionary (with ``solve_seconds``, the wall time of the solves)."""
    from fvheat.output.summary import build_summary, write_summary
    from fvheat.output.timeseries import write_timeseries

    case = load_case(case_file, overrides)
    mesh = build_mesh(case)
    t0 = time.perf_counter()
    study = run_study(case, mesh=mesh, progress=progress, check_grid=grid_check)
    summary = build_summary(study, overrides)
    summary["solve_seconds"] = time.perf_counter() - t0
    write_summary(out / "summary.json", summary)
    if case.transient:
        write_timeseries(out / "timeseries.csv", study.solution)
    from fvheat.output.folder import write_outputs  # imported once the summary is out

    write_outputs(study, out, plots=plots)
    return study, summary
