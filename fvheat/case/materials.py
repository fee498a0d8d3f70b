"""Materials: ``[materials.NAME]`` tables and built-in library entries."""

from __future__ import annotations

from typing import Any

from fvheat.case.fields import (
    Context,
    Invalid,
    describe,
    join,
    name,
    number,
    table,
    temperature,
    to_number,
)
from fvheat.case.model import (
    Material,
    Phase,
)
from fvheat.properties.library import LibraryMaterial, UnknownMaterialError, lookup

#: accepted ranges of material properties (W/(m·K), kg/m³, J/(kg·K), J/kg): wide around
#: every building material (common practice: vacuum panels about 0.004 W/(m·K), copper
#: about 400; air 1.2 kg/m³, lead 11 300; specific heats 100 to 5 000 J/(kg·K); water's
#: latent heat 334 kJ/kg); values outside are typing or unit slips
RANGES = {
    "conductivity": (1e-5, 1e4),
    "density": (1e-2, 3e4),
    "specific_heat": (1.0, 1e5),
    "latent_heat": (0.0, 1e7),
}

_MATERIAL_KEYS = (
    "library",
    "conductivity",
    "density",
    "specific_heat",
    "emissivity",
    "latent_heat",
    "phase_change",
    "frozen",
)


def parse_materials(value: Any, ctx: Context) -> dict[str, Material]:
    """``[materials.NAME]`` tables; optional when regions use library names only."""
    if value is None:
        return {}
    if not isinstance(value, dict):
        raise Invalid(
            "materials", f"expected a table of [materials.NAME] tables, got {describe(value)}"
        )
    seen: dict[str, str] = {}
    return {key: _material(key, spec, seen) for key, spec in value.items()}


def _material(key: str, spec: Any, seen: dict[str, str]) -> Material:
    path = join("materials", key)
    name(key, path, seen)
    tbl = table(spec, path, allowed=_MATERIAL_KEYS)
    latent = _property(tbl, "latent_heat", path)
    phase_change = None
    if "phase_change" in tbl:
        solidus, liquidus = _phase_change(tbl["phase_change"], join(path, "phase_change"))
        phase_change = (solidus, liquidus)
    if latent is not None and phase_change is None:
        raise Invalid(
            join(path, "phase_change"),
            "required with latent_heat: [solidus, liquidus] in °C, the range it is released over",
        )
    if phase_change is not None and latent is None:
        raise Invalid(
            join(path, "latent_heat"),
            "required with phase_change: the latent heat in J/kg (0 for none)",
        )
    frozen = None
    if "frozen" in tbl:
        if phase_change is None:
            raise Invalid(
                join(path, "frozen"), "needs phase_change and latent_heat (when does it freeze?)"
            )
        fpath = join(path, "frozen")
        ftbl = table(tbl["frozen"], fpath, allowed=("conductivity", "density", "specific_heat"))
        frozen = Phase(**{k: _property(ftbl, k, fpath) for k in ftbl})
    base = _library_entry(tbl["library"], join(path, "library")) if "library" in tbl else None
    conductivity = _property(
        tbl,
        "conductivity",
        path,
        required=base is None,
        default=base.conductivity if base else None,
    )
    assert conductivity is not None  # required without a library entry
    return Material(
        name=key,
        conductivity=conductivity,
        density=_property(tbl, "density", path, default=base.density if base else None),
        specific_heat=_property(
            tbl, "specific_heat", path, default=base.specific_heat if base else None
        ),
        emissivity=number(
            tbl,
            "emissivity",
            path,
            required=False,
            default=base.emissivity if base else None,
            gt=0,
            le=1,
        ),
        latent_heat=latent,
        phase_change=phase_change,
        frozen=frozen,
        source=_source(tbl, base),
    )


#: the source of values typed into the case file
GIVEN = "given in the case file"
_LIBRARY_KEYS = ("conductivity", "density", "specific_heat", "emissivity")


def _source(tbl: dict[str, Any], base: LibraryMaterial | None) -> str:
    """Where a material's values come from: the case file, a library entry, or both."""
    if base is None:
        return GIVEN
    text = f"library entry {base.name}: {base.source}"
    own = [k for k in _LIBRARY_KEYS if k in tbl]
    if own:
        text += f"; {', '.join(own)} {GIVEN}"
    return text


def _property(
    tbl: dict[str, Any],
    key: str,
    path: str,
    *,
    required: bool = False,
    default: float | None = None,
) -> float | None:
    """A material property within its :data:`RANGES` (latent heat may be 0)."""
    lo, hi = RANGES[key]
    return number(tbl, key, path, required=required, default=default, ge=lo, le=hi)


def _library_entry(value: Any, path: str) -> LibraryMaterial:
    """The built-in material called ``value`` (``fvheat materials`` lists them)."""
    if not isinstance(value, str):
        raise Invalid(path, f"expected a library material name, got {describe(value)}")
    try:
        return lookup(value)
    except UnknownMaterialError as err:
        raise Invalid(path, str(err).strip("'\"")) from None


def library_material(entry: LibraryMaterial) -> Material:
    """The case material of a library entry used by name, its source recorded
    (λ W/(m·K), ρ kg/m³, c J/(kg·K), ε)."""
    return Material(
        source=f"library entry {entry.name}: {entry.source}",
        name=entry.name,
        conductivity=entry.conductivity,
        density=entry.density,
        specific_heat=entry.specific_heat,
        emissivity=entry.emissivity,
    )


def _phase_change(value: Any, path: str) -> tuple[float, float]:
    if not isinstance(value, list) or len(value) != 2:
        raise Invalid(path, f"expected [solidus, liquidus] in °C, got {describe(value)}")
    solidus = temperature(to_number(value[0], join(path, 0)), join(path, 0))
    liquidus = temperature(to_number(value[1], join(path, 1)), join(path, 1))
    if not solidus < liquidus:
        raise Invalid(
            path,
            f"solidus {solidus:g} °C must be below liquidus {liquidus:g} °C "
            "(phase_change = [solidus, liquidus])",
        )
    return solidus, liquidus
