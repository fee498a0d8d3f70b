"""Built-in material library: design values for common building and window-frame materials.

The values live in ``materials.toml`` beside this module, one table per material, each with a
``source`` naming where the value is expected to come from. The values were recalled, not
copied from the standards, and every source says "from memory": check them against the
current edition of the cited standard (and any national annex) or the product's declared
value. Insulation rows hold a typical design value only.

Units: conductivity W/(m·K), density kg/m³, specific heat J/(kg·K), emissivity (-).
"""

from __future__ import annotations

import difflib
import functools
import math
import re
import tomllib
from dataclasses import dataclass
from importlib import resources

__all__ = ["LibraryMaterial", "UnknownMaterialError", "library", "lookup"]

_DATA_FILE = "materials.toml"

# Other spellings that resolve to a library id (after normalisation).
_ALIASES: dict[str, str] = {
    "aluminum": "aluminium",
    "aluminum_bare": "aluminium_bare",
    "steel_galvanized": "steel_galvanised",
    "pvc": "pvc_rigid",
    "pa66_gf25": "polyamide_66_gf25",
    "polyamide_6_6_gf25": "polyamide_66_gf25",
    "reinforced_concrete_1pct": "concrete_reinforced_1pct",
    "reinforced_concrete_2pct": "concrete_reinforced_2pct",
    "plasterboard": "gypsum_board",
    "pir": "pir_pur_board",
    "pur": "pir_pur_board",
    "stone_wool": "mineral_wool",
    "air": "still_air",
}


@dataclass(frozen=True)
class LibraryMaterial:
    """One library entry.

    ``conductivity`` W/(m·K), ``density`` kg/m³, ``specific_heat`` J/(kg·K); ``emissivity``
    (-) of a surface facing an air cavity, None where it has no meaning (fibrous insulation,
    soil, water, air). ``source`` says where the values come from; ``note`` carries cautions.
    """

    name: str
    conductivity: float
    density: float
    specific_heat: float
    emissivity: float | None
    source: str
    note: str = ""


class UnknownMaterialError(KeyError):
    """No library material of that name. The message lists close matches."""

    def __str__(self) -> str:  # KeyError would show the message in quotes
        return str(self.args[0]) if self.args else ""


def _normalise(name: str) -> str:
    """'Stainless steel' / 'stainless-steel' -> 'stainless_steel'."""
    return re.sub(r"[\s\-./]+", "_", name.strip().lower()).strip("_")


def _positive(table: dict[str, object], key: str, name: str) -> float:
    value = table.get(key)
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise ValueError(f"{_DATA_FILE}: {name}.{key}: expected a number, got {value!r}")
    value = float(value)
    if not (math.isfinite(value) and value > 0.0):
        raise ValueError(f"{_DATA_FILE}: {name}.{key}: must be a positive number, got {value}")
    return value


def _parse(name: str, table: dict[str, object]) -> LibraryMaterial:
    known = {"conductivity", "density", "specific_heat", "emissivity", "source", "note"}
    unknown = set(table) - known
    if unknown:
        raise ValueError(f"{_DATA_FILE}: {name}: unknown keys {sorted(unknown)}")
    emissivity = table.get("emissivity")
    if emissivity is not None:
        emissivity = _positive(table, "emissivity", name)
        if emissivity > 1.0:
            raise ValueError(f"{_DATA_FILE}: {name}.emissivity: must be <= 1, got {emissivity}")
    source = table.get("source")
    if not isinstance(source, str) or not source.strip():
        raise ValueError(f"{_DATA_FILE}: {name}.source: a non-empty source string is required")
    note = table.get("note", "")
    if not isinstance(note, str):
        raise ValueError(f"{_DATA_FILE}: {name}.note: expected a string")
    return LibraryMaterial(
        name=name,
        conductivity=_positive(table, "conductivity", name),
        density=_positive(table, "density", name),
        specific_heat=_positive(table, "specific_heat", name),
        emissivity=emissivity,
        source=source.strip(),
        note=note.strip(),
    )


@functools.cache
def _load() -> dict[str, LibraryMaterial]:
    text = resources.files("fvheat.properties").joinpath(_DATA_FILE).read_text(encoding="utf-8")
    data = tomllib.loads(text)
    materials: dict[str, LibraryMaterial] = {}
    for name, table in data.items():
        if name != _normalise(name):
            raise ValueError(f"{_DATA_FILE}: material id {name!r} must be lowercase snake_case")
        if not isinstance(table, dict):
            raise ValueError(f"{_DATA_FILE}: {name}: expected a table")
        materials[name] = _parse(name, table)
    return materials


def library() -> dict[str, LibraryMaterial]:
    """All built-in materials by id (lowercase snake_case), e.g. ``library()["aluminium"]``.

    The file is read once; each call returns a new dict, so callers may modify it freely.
    """
    return dict(_load())


def lookup(name: str) -> LibraryMaterial:
    """The built-in material ``name``.

    Case, spaces and hyphens are ignored ('Stainless steel' finds ``stainless_steel``) and a
    few other spellings are accepted ('aluminum', 'pvc', 'pa66_gf25', 'plasterboard', ...).
    Raises :class:`UnknownMaterialError` (a ``KeyError``) naming close matches.
    """
    materials = _load()
    key = _normalise(name)
    key = _ALIASES.get(key, key)
    try:
        return materials[key]
    except KeyError:
        candidates = [*materials, *_ALIASES]
        close = difflib.get_close_matches(key, candidates, n=4, cutoff=0.5)
        close = list(dict.fromkeys(_ALIASES.get(c, c) for c in close))
        hint = (
            f"did you mean {', '.join(repr(c) for c in close)}?"
            if close
            else "see fvheat.properties.library() for the list"
        )
        raise UnknownMaterialError(
            f"no built-in material {name!r}: {hint} (or define the material in the case file)"
        ) from None
