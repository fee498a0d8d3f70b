"""``fvheat check``: validate and mesh a case without solving; optionally draw the preview."""

from __future__ import annotations

import sys
from pathlib import Path

from fvheat.case.load import load_case
from fvheat.errors import CaseError
from fvheat.mesh.rectilinear import build_mesh


def check_case(
    case_file: Path,
    overrides: tuple[str, ...],
    *,
    plot: Path | None = None,
    show_mesh: bool = False,
) -> None:
    """Validate and mesh a case; print what was found. With ``plot`` (.png or .svg) also
    draw the geometry preview there (``show_mesh``: with the grid lines)."""
    if plot is not None:
        from fvheat.output.plots.preview import preview_format

        preview_format(plot)  # a bad file name fails before any work, and writes nothing
    elif show_mesh:
        raise CaseError("draws the grid into the preview: give --plot FILE.png too", key="--mesh")
    case = load_case(case_file, overrides)
    mesh = build_mesh(case)
    stats = mesh.stats()
    print(f"{case_file}: valid ({'transient' if case.transient else 'steady'}) — {case.title}")
    print("mesh: " + ", ".join(f"{k} {_fmt(v)}" for k, v in stats.items()))
    for b in case.boundaries:
        n = int((mesh.b_boundary == mesh.boundary_names.index(b.name)).sum())
        print(f"boundary {b.name}: {b.kind}, {n} faces")
    # modelling checks (one-line strings naming the region or boundary) go into this list;
    # none are made yet
    warnings: list[str] = []
    for w in warnings:
        print(f"fvheat: warning: {w}", file=sys.stderr)
    if plot is not None:
        from fvheat.output.plots.preview import write_preview

        print(f"preview: {write_preview(case, mesh, plot, show_mesh=show_mesh)}")


def _fmt(v: float | int) -> str:
    return f"{v:.4g}" if isinstance(v, float) else str(v)
