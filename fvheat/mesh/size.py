"""How large a grid will be, known before it is allocated, and the ``[mesh] max_cells``
limit.

The count comes from the planned 1-D grid lines (:class:`~fvheat.mesh.grading.LinePlan`):
columns × rows of the rectilinear grid, which is also the size of the 2-D arrays the mesher
paints, so a mesh beyond the limit is refused before any of them exists.
"""

from __future__ import annotations

from fvheat.case.model import Case
from fvheat.errors import CaseError

#: bytes per grid cell of a steady run (AMG-CG): peak resident memory of ``fvheat run
#: --no-plots`` on cases/balcony_slab.toml at 317 000 and 599 000 cells grew by 0.94 kB per
#: cell (measured with /usr/bin/time on this project's machine, not a general figure)
STEADY_BYTES_PER_CELL = 1000
#: bytes per grid cell of a transient run (sparse LU kept for the time steps): 2.2 kB per
#: cell on cases/wall_daily_cycle.toml at 195 000 cells (measured as above); the LU's fill
#: grows a little faster than the cell count
TRANSIENT_BYTES_PER_CELL = 2500


def memory_text(cells: int, transient: bool) -> str:
    """'about 2.1 GB' of memory a run on ``cells`` cells needs (rough, see the constants)."""
    per = TRANSIENT_BYTES_PER_CELL if transient else STEADY_BYTES_PER_CELL
    size = cells * per
    if size >= 1e9:
        return f"about {size / 1e9:.2g} GB"
    return f"about {max(size / 1e6, 1):.0f} MB"


def _round_up(n: int) -> int:
    """``n`` rounded up to two significant digits (a limit to suggest)."""
    digits = max(len(str(n)) - 2, 0)
    step = 10**digits
    return -(-n // step) * step


def check_grid_size(
    case: Case, columns: int, rows: int, *, refined: bool = False, at_most: int | None = None
) -> None:
    """Raise :class:`CaseError` (key ``mesh.max_cells``) when a grid of ``columns`` ×
    ``rows`` cells exceeds the case's ``[mesh] max_cells``; ``refined``: the grid check's
    refined grid (the message then offers to leave the grid check out); ``at_most``: the
    most cells the refinement at re-entrant corners could make of it (the limit the
    message suggests)."""
    cells = columns * rows
    limit = case.mesh.max_cells
    if cells <= limit:
        return
    s = case.mesh
    what = "the grid check's refined grid (every cell size halved)" if refined else "the grid"
    suggest = _round_up(max(cells, at_most or 0))
    upto = ""
    if at_most is not None and at_most > cells:
        upto = f", up to {at_most:,} with the finer cells at re-entrant corners"
    raise CaseError(
        f"{what} would have {cells:,} cells ({columns:,} columns × {rows:,} rows{upto}; "
        f"{memory_text(cells, case.transient)} of memory{' or more' if upto else ''}), "
        f"more than max_cells = {limit:,}: "
        f"give larger cells (max_cell = {s.max_cell:g} m, min_cell = {s.min_cell:g} m, "
        f"corner cells {s.corner_size:g} m)"
        + (", run without the grid check (--no-grid-check)" if refined else "")
        + f", or raise the limit (--set mesh.max_cells={suggest}) if the machine has the memory",
        file=str(case.source),
        key="mesh.max_cells",
    )


def check_node_count(case: Case, nodes: int, *, refined: bool = False) -> None:
    """Raise :class:`CaseError` (key ``mesh.max_cells``) when a triangle mesh of ``nodes``
    control volumes (one per node) exceeds the case's ``[mesh] max_cells``; ``refined``:
    the grid check's refined mesh (about four nodes for each one)."""
    limit = case.mesh.max_cells
    if nodes <= limit:
        return
    what = (
        "the grid check's refined mesh (every triangle split in four)"
        if refined
        else ("the triangle mesh")
    )
    s = case.mesh
    raise CaseError(
        f"{what} would have about {nodes:,} nodes ({memory_text(nodes, case.transient)} of "
        f"memory), more than max_cells = {limit:,}: give larger cells (max_cell = "
        f"{s.max_cell:g} m, min_cell = {s.min_cell:g} m)"
        + (", run without the grid check (--no-grid-check)" if refined else "")
        + f", or raise the limit (--set mesh.max_cells={_round_up(nodes)}) if the machine "
        "has the memory",
        file=str(case.source),
        key="mesh.max_cells",
    )
