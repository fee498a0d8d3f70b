"""``fvheat plot DIR``: redraw the figures of a results folder (colour range, zoom window),
from its field files, on either mesh (grid VTU or triangle VTU)."""

from __future__ import annotations

from pathlib import Path

from fvheat.errors import CaseError


def plot_folder(
    folder: Path,
    vrange: tuple[float, float] | None,
    zoom: tuple[float, float, float, float] | None,
    *,
    quiet: bool = False,
) -> None:
    """Check the options, redraw every figure of ``folder`` and say where they went."""
    from fvheat.output.plots.figures import draw_figures
    from fvheat.output.results import ResultsFolder

    if vrange is not None and not vrange[0] < vrange[1]:
        raise CaseError(f"LO must be below HI (got {vrange[0]:g} {vrange[1]:g})", key="--range")
    if zoom is not None and not (zoom[0] < zoom[2] and zoom[1] < zoom[3]):
        got = " ".join(f"{v:g}" for v in zoom)
        raise CaseError(f"expected X0 Y0 X1 Y1 with X0 < X1 and Y0 < Y1 (got {got})", key="--zoom")
    results = ResultsFolder.open(folder)
    records = draw_figures(results, vrange=vrange, zoom=zoom)
    if not quiet:
        for r in records:
            print(f"{folder / r.png}" + (f"  {folder / r.svg}" if r.svg else ""))
        print("run `fvheat report DIR` to put the redrawn figures into the report")
