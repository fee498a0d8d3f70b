"""Case files: reading, overriding and validating them into :class:`~fvheat.case.model.Case`."""

from fvheat.case.load import load_case, parse_case
from fvheat.case.model import Boundary, Case, Material, MeshSettings, Probe, Region, TimeSettings

__all__ = [
    "Boundary",
    "Case",
    "Material",
    "MeshSettings",
    "Probe",
    "Region",
    "TimeSettings",
    "load_case",
    "parse_case",
]
