"""Material properties: the built-in material library and equivalent conductivities of air
cavities (ISO 10077-2 method). Units are SI; see each module."""

from fvheat.properties.cavity import (
    CavityDimensions,
    CavityResult,
    cavity_dimensions,
    equivalent_conductivity,
    ventilation_class,
)
from fvheat.properties.library import LibraryMaterial, UnknownMaterialError, library, lookup

__all__ = [
    "CavityDimensions",
    "CavityResult",
    "LibraryMaterial",
    "UnknownMaterialError",
    "cavity_dimensions",
    "equivalent_conductivity",
    "library",
    "lookup",
    "ventilation_class",
]
