"""The ``[ground]`` table: the soil block of a slab-on-ground edge, built from ISO 10211's
modelling rules for ground (see :class:`~fvheat.case.model.Ground`).

```toml
[ground]
width = 8.0              # m, B' = A/(0.5·P), the floor's characteristic dimension (ISO 13370);
                         #   for a long strip floor its width
floor_edge = 0.0         # m, x of the inside face of the external wall (where the floor ends)
ground_level = 0.0       # m, y of the outside ground surface
wall_outside = 0.36      # m, x where the ground surface meets the wall's outside face
boundary = "outside"     # the ground surface joins this boundary (its air and R_se)
floor_boundary = "floor" # the floor's inside surface (its R_si enters the floor U)
soil = "ground_soil"     # optional: a material; default λ = 2.0 W/(m·K), ρc = 2.0 MJ/(m³·K)
floor_resistance = 0.2   # optional R_f, m²·K/W (default: read from the model's floor layers)
wall_thickness = 0.36    # optional w, m (default: |wall_outside − floor_edge|)
```

What is built (ISO 10211, 2-D models of ground floors; dimensions from memory): a soil
block reaching 0.5·B' inside from the floor edge (the floor's symmetry plane, adiabatic),
2.5·B' outside from the floor edge and 2.5·B' below ground level, all three cut-off planes
adiabatic. With B' = 8 m (the value ISO 10211 says to use when the floor size is not
known, from memory) that is 4 m, 20 m and 20 m. The soil is painted first, so every region
of the case (slab, wall, foundation, insulation) paints over it; the ground surface from
``wall_outside`` to the far end of the block is added to ``boundary``. The floor
construction and the floor boundary must reach the symmetry plane.

Default soil: λ = 2.0 W/(m·K) and ρ·c = 2.0·10⁶ J/(m³·K) (ISO 13370's values for
unknown soil, from memory), as ρ = 2000 kg/m³ and c = 1000 J/(kg·K); define
``[materials.ground_soil]`` or name another material with ``soil`` to change them.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

import numpy as np

from fvheat.case.fields import (
    Context,
    Invalid,
    check_coordinates,
    coordinate,
    join,
    number,
    string,
    table,
)
from fvheat.case.model import Ground, Material, Region

#: ISO 13370 (from memory): soil conductivity when the soil is not known, W/(m·K)
SOIL_CONDUCTIVITY = 2.0
#: ISO 13370 (from memory): its volumetric heat capacity, J/(m³·K), as ρ·c below
SOIL_DENSITY, SOIL_SPECIFIC_HEAT = 2000.0, 1000.0
DEFAULT_SOIL = "ground_soil"
#: ISO 10211 (from memory): the soil block's extent in units of B'
INSIDE_EXTENT, OUTSIDE_EXTENT, DEPTH_EXTENT = 0.5, 2.5, 2.5
#: name of the flanking element the ground floor adds to the junction
FLOOR_FLANKING = "ground_floor"

_KEYS = (
    "width",
    "floor_edge",
    "ground_level",
    "wall_outside",
    "boundary",
    "floor_boundary",
    "soil",
    "floor_resistance",
    "wall_thickness",
)


def parse_ground(value: Any, ctx: Context) -> Ground | None:
    """Validate ``[ground]`` and add its soil region, soil material and ground surface to
    the sections parsed before it (regions, materials, boundaries)."""
    if value is None:
        return None
    path = "ground"
    tbl = table(
        value,
        path,
        allowed=_KEYS,
        required=(
            "width",
            "floor_edge",
            "ground_level",
            "wall_outside",
            "boundary",
            "floor_boundary",
        ),
    )
    bounds = {b.name: b for b in ctx.parsed.get("boundaries", ())}
    names = {}
    for key in ("boundary", "floor_boundary"):
        n = string(tbl, key, path)
        if n not in bounds:
            raise Invalid(
                join(path, key), f"no boundary is called {n!r}; boundaries: {', '.join(bounds)}"
            )
        if bounds[n].kind != "surface" or bounds[n].radiative or bounds[n].convection <= 0:
            raise Invalid(
                join(path, key),
                f"boundary {n!r} needs a surface resistance (`resistance`, no radiation)",
            )
        names[key] = n
    if names["boundary"] == names["floor_boundary"]:
        raise Invalid(join(path, "floor_boundary"), "must differ from ground.boundary")
    materials: dict[str, Material] = ctx.parsed["materials"]
    soil = string(tbl, "soil", path, required=False, default=DEFAULT_SOIL)
    if soil not in materials:
        if soil != DEFAULT_SOIL:
            raise Invalid(
                join(path, "soil"), f"no material {soil!r}: define [materials.{soil}] first"
            )
        materials[soil] = Material(
            name=soil,
            conductivity=SOIL_CONDUCTIVITY,
            density=SOIL_DENSITY,
            specific_heat=SOIL_SPECIFIC_HEAT,
            source="ISO 13370 soil of unknown kind (from memory)",
        )
    ground = Ground(
        width=number(tbl, "width", path, gt=0),
        floor_edge=_coordinate(tbl, "floor_edge", path),
        ground_level=_coordinate(tbl, "ground_level", path),
        wall_outside=_coordinate(tbl, "wall_outside", path),
        soil=soil,
        boundary=names["boundary"],
        floor_boundary=names["floor_boundary"],
        floor_resistance=number(tbl, "floor_resistance", path, required=False, ge=0),
        wall_thickness=number(tbl, "wall_thickness", path, required=False, gt=0),
    )
    if ground.wall_outside == ground.floor_edge:
        raise Invalid(
            join(path, "wall_outside"), "must differ from floor_edge (the wall has a thickness)"
        )
    junction = ctx.parsed.get("junction")
    if junction is not None and any(f.name == FLOOR_FLANKING for f in junction.flanking):
        raise Invalid(
            "junction.flanking",
            f"the name {FLOOR_FLANKING!r} is the ground floor's, added by [ground]",
        )
    x0, x1, y0, y1 = soil_box(ground)
    box = np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]], dtype=float)
    check_coordinates(box, join(path, "width"), "the soil block (2.5 × width around the floor)")
    region = Region(material=soil, vertices=box, is_box=True, name="ground_soil", entry=-1)
    ctx.parsed["regions"] = (region, *ctx.parsed["regions"])
    far = ground.floor_edge - ground.interior * OUTSIDE_EXTENT * ground.width
    segment = ((ground.wall_outside, ground.ground_level), (far, ground.ground_level))
    ctx.parsed["boundaries"] = tuple(
        replace(b, edges=(*b.edges, segment)) if b.name == ground.boundary else b
        for b in ctx.parsed["boundaries"]
    )
    return ground


def _coordinate(tbl: dict[str, Any], key: str, path: str) -> float:
    """The required coordinate ``tbl[key]`` (m)."""
    if key not in tbl:
        raise Invalid(join(path, key), "required key is missing")
    return coordinate(tbl[key], join(path, key))


def soil_box(g: Ground) -> tuple[float, float, float, float]:
    """x0, x1, y0, y1 (m) of the soil block: 0.5·B' inside and 2.5·B' outside the floor
    edge, 2.5·B' deep below ground level (ISO 10211, from memory)."""
    xs = (g.symmetry_x, g.floor_edge - g.interior * OUTSIDE_EXTENT * g.width)
    y0 = g.ground_level - DEPTH_EXTENT * g.width
    return min(xs), max(xs), y0, g.ground_level
