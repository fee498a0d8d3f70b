"""What a run will hold in memory and write: warn before a transient run saves thousands of
fields (each kept in memory and written as a VTU file)."""

from __future__ import annotations

from fvheat.case.model import Case
from fvheat.mesh.mesh import Mesh

#: saved states above which a transient run is warned about
MANY_SAVES = 2000
#: bytes of saved fields above which the warning says how much memory they take
LARGE_FIELDS = 2 * 1024**3


def resource_warnings(case: Case, mesh: Mesh) -> list[str]:
    """A warning when ``[time] save_every`` makes thousands of saved fields."""
    t = case.time
    if t is None:
        return []
    saves = round(t.duration / t.save_every) + 1
    if saves <= MANY_SAVES:
        return []
    size = saves * mesh.n_cells * 8
    memory = f", {size / 1024**3:.1f} GiB of fields in memory" if size > LARGE_FIELDS else ""
    return [
        f"time.save_every = {t.save_every:g} s saves {saves} states ({saves} VTU files"
        f"{memory}): give a larger save_every unless you need them all"
    ]
