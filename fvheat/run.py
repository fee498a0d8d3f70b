"""A complete run from a case file to a results folder — what ``fvheat run`` does, without
printing, so that scripts and sweep workers use the very same pipeline."""

from __future__ import annotations

import time
from pathlib import Path
from typing import TYPE_CHECKING, Any

from fvheat.case.load import load_case
from fvheat.checks import check_model
from fvheat.errors import CaseError, ConvergenceError
from fvheat.mesh.select import build_mesh
from fvheat.output.fields import FIELD_CHOICES
from fvheat.output.lock import folder_lock
from fvheat.output.paths import check_output_folder
from fvheat.sensitivity.quantities import case_for_sensitivities, check_sensitivities_possible
from fvheat.simulate import Progress
from fvheat.study import Study, run_study

if TYPE_CHECKING:
    from fvheat.case.model import Case
    from fvheat.mesh.mesh import Mesh
    from fvheat.output.workers import FigureWorkers


def run_to_folder(
    case_file: Path,
    out: Path,
    overrides: tuple[str, ...] = (),
    *,
    grid_check: bool | None = None,
    plots: bool = True,
    fields: str = "all",
    progress: Progress | None = None,
    sensitivities: bool | None = None,
    workers: FigureWorkers | None = None,
) -> tuple[Study, dict[str, Any]]:
    """Validate, mesh and check the model and the output folder (before anything is
    written), take the folder's lock, solve, clear the outputs of an earlier run, then
    write ``summary.json``, ``timeseries.csv`` (transient) and the other outputs into
    ``out`` (``fields``: "all" saved fields, the "last" one or "none", as
    :func:`fvheat.output.folder.write_outputs`). Returns the study and the summary
    dictionary (with ``solve_seconds``, the wall time of the solves). ``sensitivities``
    overrides the case's ``[sensitivities] enabled`` (adjoint sensitivities, plus finite
    differences for ``[parameters]``); ``workers`` (started before this call) draw the
    figures. A folder this run created is removed again if the
    run fails before writing anything into it."""
    from fvheat.output.folder import clear_outputs
    from fvheat.output.summary import build_summary, non_finite_keys, write_summary
    from fvheat.output.timeseries import write_timeseries

    check_fields_choice(fields)
    case = load_case(case_file, overrides)
    want = case.sensitivities if sensitivities is None else sensitivities
    if want:
        check_sensitivities_possible(case)
        case = case_for_sensitivities(case)
    out = Path(out)
    check_output_folder(out, "--out")
    mesh = build_mesh(case)
    warnings = check_model(case, mesh)
    created = not out.exists()
    try:
        with folder_lock(out):
            if plots and workers is not None and len(workers):
                _start_mesh_figure(workers, case, mesh)
            t0 = time.perf_counter()
            study = run_study(
                case, mesh=mesh, progress=progress, check_grid=grid_check, warnings=warnings
            )
            t1 = time.perf_counter()
            if want:
                study.sensitivities = _sensitivities(case_file, overrides, study)
            for sol in (study.solution, study.surface_solution):
                if sol is not None:  # the factorisation served the adjoint: free it now
                    sol.factor = None
            t2 = time.perf_counter()
            summary = build_summary(study, overrides)
            summary["solve_seconds"] = time.perf_counter() - t0
            bad = non_finite_keys(summary)
            if bad:  # nothing is written: the earlier run's outputs stay as they were
                raise ConvergenceError(
                    f"the results hold NaN or infinite values ({', '.join(bad[:3])}"
                    f"{', …' if len(bad) > 3 else ''}): check the inputs' magnitudes"
                )
            if want:
                summary["sensitivity_seconds"] = t2 - t1
            clear_outputs(out)
            write_summary(out / "summary.json", summary)
            if case.transient:
                write_timeseries(out / "timeseries.csv", study.solution)
            from fvheat.output.folder import write_outputs  # imported once the summary is out

            write_outputs(study, out, plots=plots, fields=fields, workers=workers)
    except BaseException:
        if created and out.is_dir() and not any(out.iterdir()):
            out.rmdir()
        raise
    return study, summary


def _start_mesh_figure(workers: FigureWorkers, case: Case, mesh: Mesh) -> None:
    """Have the first figure worker draw the mesh figure (in memory) while the run solves;
    :func:`fvheat.output.folder.write_outputs` collects and writes it."""
    from fvheat.output.plots.figures import render_mesh_figure
    from fvheat.output.triangle_view import any_geometry_view
    from fvheat.output.workers import WorkerLost

    try:
        workers.submit(render_mesh_figure, [(any_geometry_view(mesh), case.title)])
    except WorkerLost:  # the figures will be drawn in this process (write_outputs says so)
        pass


def _sensitivities(case_file: Path, overrides: tuple[str, ...], study: Study):
    """Adjoint sensitivities of ``study``, with finite differences for ``[parameters]``."""
    from fvheat.sensitivity.finite import parameter_derivatives
    from fvheat.sensitivity.named import quantity_names
    from fvheat.sensitivity.quantities import study_sensitivities

    params = study.solution.case.parameters
    extra = None
    if params:
        names = quantity_names(study)
        more, d = parameter_derivatives(case_file, overrides, params, names)
        extra = (more, d, names)
    return study_sensitivities(study, extra)


def check_fields_choice(fields: str) -> None:
    """:class:`CaseError` naming ``--fields`` unless ``fields`` is one of FIELD_CHOICES."""
    if fields not in FIELD_CHOICES:
        raise CaseError(
            f"expected one of {', '.join(FIELD_CHOICES)}, got {fields!r}", key="--fields"
        )
