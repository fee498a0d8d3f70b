"""``fvheat check``: validate and mesh a case without solving; optionally draw the preview."""

from __future__ import annotations

from pathlib import Path

from fvheat.case.load import load_case
from fvheat.checks import check_model
from fvheat.cli.console import print_warnings
from fvheat.errors import CaseError
from fvheat.mesh.rectilinear import check_refined_size
from fvheat.mesh.select import build_mesh
from fvheat.study import GRID_CHECK_REFINE


def check_case(
    case_file: Path,
    overrides: tuple[str, ...],
    *,
    plot: Path | None = None,
    show_mesh: bool = False,
) -> None:
    """Validate and mesh a case and run the modelling checks; print what was found (the
    warnings on standard error). With ``plot`` (.png or .svg) also
    draw the geometry preview there (``show_mesh``: with the grid lines)."""
    if plot is not None:
        from fvheat.output.plots.preview import preview_format

        preview_format(plot)  # a bad file name fails before any work, and writes nothing
    elif show_mesh:
        raise CaseError("draws the grid into the preview: give --plot FILE.png too", key="--mesh")
    case = load_case(case_file, overrides)
    mesh = build_mesh(case)
    if case.junction is not None and case.junction.grid_check:
        check_refined_size(case, mesh, GRID_CHECK_REFINE)
    warnings = check_model(case, mesh)
    stats = mesh.stats()
    print(f"{case_file}: valid ({'transient' if case.transient else 'steady'}) — {case.title}")
    print("mesh: " + ", ".join(f"{k} {_fmt(v)}" for k, v in stats.items()))
    for b in case.boundaries:
        n = int((mesh.b_boundary == mesh.boundary_names.index(b.name)).sum())
        print(f"boundary {b.name}: {b.kind}, {n} faces")
    print_warnings(warnings)
    if plot is not None:
        from fvheat.output.plots.preview import write_preview

        print(f"preview: {write_preview(case, mesh, plot, show_mesh=show_mesh)}")


def _fmt(v: float | int | str) -> str:
    return f"{v:.4g}" if isinstance(v, float) else str(v)
