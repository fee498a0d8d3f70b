"""The ``[junction]`` table: thermal-bridge evaluation settings (see :class:`Junction`).

```toml
[junction]
inside = ["inside"]            # warm-side boundaries
outside = ["outside"]          # cold-side boundaries
dimensions = "internal"        # or "overall_internal", "external": how lengths were taken
condensation_resistance = 0.25 # m²·K/W: inside R_si of the surface-temperature solve f_Rsi
                               # comes from, or per inside boundary: { wall = 0.25, glass = 0.13 }
                               # (default 0.25 on all, ISO 13788), or "heat_loss" for the
                               # heat-loss values (see fvheat.case.resistances)
f_rsi_limit = 0.75             # pass/fail criterion for f_Rsi
f_rsi_boundaries = ["inside"]  # inside surfaces f_Rsi is taken over (default: all inside)
indoor_humidity = 50           # % relative humidity of the room air: dew-point check
frame_width = 0.11             # m, b_f: report U_f = ψ / b_f (frame with an insulating panel)
centre = [0.2, 0.0]            # m: check cut-off plane distances from here
grid_check = true              # solve again with twice the cells (ISO 10211 grid check)

[[junction.flanking]]
name = "wall"
length = 1.5                   # m, in the system of `dimensions`; or per dimension system:
                               # { internal = 1.5, overall_internal = 1.5, external = 1.86 }
u_value = 0.25                 # W/(m²·K); or cut = [[x0, y0], [x1, y1]] across the element
thickness = 0.36               # m, optional (taken from the cut when there is one)

[[junction.environments]]      # two or more: ISO 10211 coupling coefficients between them
name = "room_a"                # (then inside / outside are optional)
boundaries = ["room_a_wall", "room_a_floor"]
```
"""

from __future__ import annotations

from typing import Any, cast

from fvheat.case.fields import (
    Context,
    Invalid,
    boundary_list,
    check_length,
    describe,
    join,
    name,
    number,
    point,
    string,
    table,
    tables,
    to_number,
)
from fvheat.case.model import Case, Dimensions, Environment, Flanking, Junction
from fvheat.case.resistances import read_resistances

_KEYS = (
    "inside",
    "outside",
    "flanking",
    "dimensions",
    "condensation_resistance",
    "f_rsi_limit",
    "f_rsi_boundaries",
    "indoor_humidity",
    "frame_width",
    "centre",
    "grid_check",
    "environments",
)
DIMENSIONS = ("internal", "overall_internal", "external")


def parse_junction(value: Any, ctx: Context) -> Junction | None:
    """Validate the ``[junction]`` table (None when absent)."""
    if value is None:
        return None
    path = "junction"
    tbl = table(value, path, allowed=_KEYS)
    known = {b.name for b in ctx.parsed.get("boundaries", ())}
    environments = _environments(tbl.get("environments"), join(path, "environments"), known)
    for side in ("inside", "outside"):
        if side not in tbl and not environments:
            raise Invalid(
                join(path, side),
                "required key is missing (or give two or more [[junction.environments]])",
            )
    inside = boundary_list(tbl["inside"], join(path, "inside"), known) if "inside" in tbl else ()
    outside = (
        boundary_list(tbl["outside"], join(path, "outside"), known) if "outside" in tbl else ()
    )
    if bool(inside) != bool(outside):
        missing = "outside" if inside else "inside"
        raise Invalid(join(path, missing), "give both inside and outside, or neither")
    both = set(inside) & set(outside)
    if both:
        raise Invalid(join(path, "outside"), f"{sorted(both)} cannot be both inside and outside")
    dimensions = string(
        tbl, "dimensions", path, required=False, default="internal", choices=DIMENSIONS
    )
    seen: dict[str, str] = {}
    flanking = tuple(
        _flanking(t, join(join(path, "flanking"), i), seen, dimensions)
        for i, t in enumerate(tables(tbl.get("flanking", []), join(path, "flanking")))
    )
    # below 1 % the dew point leaves the range of the saturation-pressure formulas
    humidity = number(tbl, "indoor_humidity", path, required=False, ge=1, le=100)
    grid = tbl.get("grid_check", False)
    if not isinstance(grid, bool):
        raise Invalid(join(path, "grid_check"), f"expected true or false, got {describe(grid)}")
    return Junction(
        inside=inside,
        outside=outside,
        flanking=flanking,
        dimensions=cast("Dimensions", dimensions),
        surface_resistances=read_resistances(tbl, "condensation_resistance", path, inside),
        f_rsi_boundaries=(
            boundary_list(tbl["f_rsi_boundaries"], join(path, "f_rsi_boundaries"), set(inside))
            if "f_rsi_boundaries" in tbl
            else None
        ),
        f_rsi_limit=number(tbl, "f_rsi_limit", path, required=False, gt=0, lt=1),
        indoor_humidity=None if humidity is None else humidity / 100.0,
        frame_width=number(tbl, "frame_width", path, required=False, gt=0),
        centre=point(tbl["centre"], join(path, "centre")) if "centre" in tbl else None,
        grid_check=grid,
        environments=environments,
    )


def _environments(value: Any, path: str, known: set[str]) -> tuple[Environment, ...]:
    """``[[junction.environments]]``: two or more, unique names, no boundary in two."""
    if value is None:
        return ()
    entries = tables(value, path)
    if len(entries) < 2:
        raise Invalid(
            path, f"coupling coefficients need two or more environments, got {len(entries)}"
        )
    seen: dict[str, str] = {}
    owner: dict[str, str] = {}
    out = []
    for i, t in enumerate(entries):
        p = join(path, i)
        table(t, p, allowed=("name", "boundaries"), required=("name", "boundaries"))
        ename = name(t["name"], join(p, "name"), seen)
        names = boundary_list(t["boundaries"], join(p, "boundaries"), known)
        for n in names:
            if n in owner:
                raise Invalid(
                    join(p, "boundaries"),
                    f"boundary {n!r} already belongs to environment {owner[n]!r}",
                )
            owner[n] = ename
        out.append(Environment(ename, names))
    return tuple(out)


def _lengths(value: Any, path: str, primary: str) -> dict[str, float]:
    """``length``: one number (m, in the ``primary`` system) or a table of lengths by
    dimension system, which must hold the primary one."""
    if not isinstance(value, dict):
        return {primary: to_number(value, path, gt=0)}
    if not value:
        raise Invalid(path, f"expected a length or a table of lengths by {', '.join(DIMENSIONS)}")
    table(value, path, allowed=DIMENSIONS)
    lengths = {k: to_number(value[k], join(path, k), gt=0) for k in DIMENSIONS if k in value}
    if primary not in lengths:
        raise Invalid(
            path,
            f"no {primary} length, the system of junction.dimensions; give {primary} = ... "
            f"or set junction.dimensions to one of {', '.join(repr(k) for k in lengths)}",
        )
    return lengths


def _flanking(tbl: dict, path: str, seen: dict[str, str], primary: str) -> Flanking:
    table(
        tbl,
        path,
        allowed=("name", "length", "u_value", "cut", "thickness"),
        required=("name", "length"),
    )
    fname = name(tbl["name"], join(path, "name"), seen)
    lengths = _lengths(tbl["length"], join(path, "length"), primary)
    length = lengths[primary]
    u = number(tbl, "u_value", path, required=False, gt=0)
    cut = None
    if "cut" in tbl:
        c = tbl["cut"]
        if not isinstance(c, list) or len(c) != 2:
            raise Invalid(
                join(path, "cut"), f"expected a segment [[x0, y0], [x1, y1]], got {describe(c)}"
            )
        cut = (point(c[0], join(join(path, "cut"), 0)), point(c[1], join(join(path, "cut"), 1)))
        check_length(*cut, join(path, "cut"), "cut")
    if (u is None) == (cut is None):
        raise Invalid(
            path, "give exactly one of u_value (W/(m²·K)) or cut (a segment across the element)"
        )
    return Flanking(
        name=fname,
        length=length,
        u_value=u,
        cut=cut,
        thickness=number(tbl, "thickness", path, required=False, gt=0),
        lengths=lengths,
    )


def check_junction_side_kinds(case: Case) -> None:
    """Junction boundaries must carry a temperature (surface exchange or fixed); with
    environments, every boundary carrying one belongs to an environment."""
    j = case.junction
    if j is None:
        return
    for i, env in enumerate(j.environments):
        for n in env.boundaries:
            if case.boundary(n).kind == "flux":
                raise Invalid(
                    f"junction.environments.{i}.boundaries",
                    f"boundary {n!r} has only a heat flux; it needs a temperature",
                )
    if j.environments:
        listed = {n for env in j.environments for n in env.boundaries}
        left = [b.name for b in case.boundaries if b.ties_temperature and b.name not in listed]
        if left:
            raise Invalid(
                "junction.environments",
                f"boundaries {', '.join(repr(n) for n in left)} tie the body to a temperature "
                "but belong to no environment; list each in one environment",
            )
    for side in ("inside", "outside"):
        for n in getattr(j, side):
            if case.boundary(n).kind == "flux":
                raise Invalid(
                    f"junction.{side}",
                    f"boundary {n!r} has only a heat flux; it needs a temperature",
                )
