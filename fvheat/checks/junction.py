"""Junction settings that would otherwise fail only after the solve (a transient run can
take minutes): side temperatures, and the layer cuts of the flanking elements."""

from __future__ import annotations

from fvheat.case.model import Case
from fvheat.evaluate.coupling import check_coupling
from fvheat.evaluate.junction import flanking_results, junction_temperatures
from fvheat.mesh.mesh import Mesh


def check_junction(case: Case, mesh: Mesh) -> None:
    """Raise :class:`~fvheat.errors.CaseError` for a junction that cannot be evaluated."""
    if case.junction is None:
        return
    if case.junction.environments:
        check_coupling(case, mesh)
    if case.junction.pair:
        junction_temperatures(case)
    flanking_results(case, mesh)
