"""Modelling checks of a meshed case, before any solve.

Each module looks for one kind of slip that would otherwise give a plausible-looking wrong
answer: a boundary segment that is only partly on the body (:mod:`.boundaries`), an
exterior edge left adiabatic between surfaces of the same side (:mod:`.boundaries`), a part
of the body with no temperature reference or several separate bodies (:mod:`.islands`), a
region the grid paints much smaller or larger than drawn (:mod:`.regions`), and junction
settings that would only fail after the solve (:mod:`.junction`), and transient runs that
would save thousands of fields (:mod:`.resources`).

:func:`check_model` raises :class:`~fvheat.errors.CaseError` where the model cannot be
right and returns one-line warnings otherwise; ``fvheat check`` and ``fvheat run`` both
call it, so whatever ``run`` would refuse, ``check`` finds first.
"""

from __future__ import annotations

from fvheat.case.model import Case
from fvheat.checks.boundaries import adiabatic_gap_warnings, coverage_warnings
from fvheat.checks.islands import island_warnings
from fvheat.checks.junction import check_junction
from fvheat.checks.regions import region_area_warnings
from fvheat.checks.resources import resource_warnings
from fvheat.mesh.mesh import Mesh


def check_model(case: Case, mesh: Mesh) -> list[str]:
    """Refuse (CaseError) what cannot be right; return the warnings (one line each)."""
    warnings = island_warnings(case, mesh)
    warnings += coverage_warnings(case, mesh)
    warnings += adiabatic_gap_warnings(case, mesh)
    warnings += region_area_warnings(case, mesh)
    warnings += resource_warnings(case, mesh)
    check_junction(case, mesh)
    return warnings


__all__ = ["check_model"]
