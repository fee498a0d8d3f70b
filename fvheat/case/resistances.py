"""Inside surface resistances for surface-temperature (condensation and mould) checks.

The heat-loss solve uses each boundary's own surface resistance (ISO 6946 values, e.g.
0.13 m²·K/W for horizontal heat flow). ISO 13788 (from memory) assesses surface
temperatures with larger inside resistances that stand for corners, furniture and
curtains: 0.25 m²·K/W on opaque surfaces, 0.13 m²·K/W on glazing and frames. fvheat
therefore evaluates f_Rsi, θ_si,min and condensation hours in a second solve with those
resistances on the checked inside surfaces; without a setting, 0.25 on every one of them
(the safe side for glazing too), and only when asked explicitly (``"heat_loss"``) with the
heat-loss values.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from fvheat.case.fields import Invalid, describe, join, to_number
from fvheat.case.model import CONDENSATION_RSI, HEAT_LOSS, Case, SurfaceResistances


def read_resistances(
    tbl: dict[str, Any], key: str, path: str, names: tuple[str, ...]
) -> SurfaceResistances:
    """``tbl[key]``: absent (:data:`CONDENSATION_RSI` on every boundary of ``names``),
    ``"heat_loss"``, one value for all of ``names``, or a table of values for some of them
    (the others get :data:`CONDENSATION_RSI`)."""
    kpath = join(path, key)
    value = tbl.get(key, {})
    if isinstance(value, str):
        if value != HEAT_LOSS:
            raise Invalid(
                kpath,
                f"expected a resistance (m²·K/W), a table of them by boundary, or "
                f"{HEAT_LOSS!r}; got {describe(value)}",
            )
        return SurfaceResistances(None)
    if not isinstance(value, dict):
        return SurfaceResistances(dict.fromkeys(names, to_number(value, kpath, gt=0)))
    for n in value:
        if n not in names:
            raise Invalid(join(kpath, n), f"not a checked boundary; these are: {', '.join(names)}")
    given = {n: to_number(v, join(kpath, n), gt=0) for n, v in value.items()}
    defaulted = tuple(n for n in names if n not in given)
    values = {n: given.get(n, CONDENSATION_RSI) for n in names}
    return SurfaceResistances(values, defaulted)


def with_surface_resistances(case: Case, resistances: SurfaceResistances) -> Case | None:
    """The case with the named boundaries exchanging through the given surface resistances
    only (no radiation), or None when that changes nothing (``"heat_loss"`` asked, or every
    named boundary already has exactly that resistance) and no second solve is needed.

    A named boundary with a fixed surface temperature exchanges with air at that
    temperature through the resistance: a fixed surface would otherwise stay at θ_i and
    give f_Rsi = 1 whatever the construction."""
    r = resistances.values
    if r is None:
        return None
    changed = False
    bounds = []
    for b in case.boundaries:
        if b.name in r and b.kind == "temperature":
            changed = True
            b = replace(
                b,
                kind="surface",
                air_temperature=b.temperature,
                temperature=None,
                convection=1.0 / r[b.name],
                resistance=r[b.name],
                emissivity=0.0,
            )
        elif b.name in r and b.kind == "surface":
            changed |= not (b.resistance == r[b.name] and b.emissivity == 0.0)
            b = replace(b, convection=1.0 / r[b.name], resistance=r[b.name], emissivity=0.0)
        bounds.append(b)
    return replace(case, boundaries=tuple(bounds)) if changed else None


def check_fixed_surfaces_assessed(case: Case) -> None:
    """f_Rsi asked from the heat-loss solve (``"heat_loss"``) on an inside surface whose
    temperature is fixed would be 1 by construction: refused."""
    j = case.junction
    if j is None or not j.inside or j.surface_resistances.values is not None:
        return
    fixed = [n for n in j.f_rsi_boundaries or j.inside if case.boundary(n).kind == "temperature"]
    if fixed:
        raise Invalid(
            "junction.condensation_resistance",
            f"{HEAT_LOSS!r} takes f_Rsi from the heat-loss solve, where "
            f"{', '.join(map(repr, fixed))} has a fixed surface temperature (f_Rsi would be 1 "
            "whatever the construction): give a surface resistance, e.g. 0.25 (ISO 13788)",
        )
