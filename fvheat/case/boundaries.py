"""Boundaries: surface conditions on segments of the exterior (``[[boundaries]]``), typed
(``edges``) and/or the lines of a drawing layer (``layer``)."""

from __future__ import annotations

from typing import Any

import numpy as np

from fvheat.case.fields import (
    Context,
    Invalid,
    check_length,
    describe,
    join,
    name,
    number,
    point,
    table,
    tables,
)
from fvheat.case.geometry import layer_segments
from fvheat.case.model import (
    Boundary,
)
from fvheat.case.signals import Constant, Cosine, Series, Signal
from fvheat.case.values import read_signal

#: W/(m²·K): the largest surface coefficient (resistance ≥ 1e-6 m²·K/W); condensing or
#: boiling water reaches about 1e4 (common practice): a fixed surface temperature is
#: `temperature = ...`, not a huge coefficient
LARGEST_COEFFICIENT = 1e6

#: W/m²: the largest imposed heat flux (sunshine about 1e3, a fire about 1e5; common
#: practice): beyond it the temperatures overflow
LARGEST_FLUX = 1e6


def _largest(sig: Signal) -> float:
    """The largest magnitude a boundary value takes (W/m² for a heat flux)."""
    if isinstance(sig, Constant):
        return abs(sig.value)
    if isinstance(sig, Cosine):
        return abs(sig.mean) + abs(sig.amplitude)
    if isinstance(sig, Series):
        return float(np.max(np.abs(sig.values)))
    return 0.0


_SURFACE_KEYS = ("resistance", "convection", "emissivity", "radiant_temperature")
_BOUNDARY_KEYS = (
    "name",
    "edges",
    "layer",
    "air_temperature",
    *_SURFACE_KEYS,
    "temperature",
    "heat_flux",
)


def parse_boundaries(value: Any, ctx: Context) -> tuple[Boundary, ...]:
    """Validate the ``[boundaries.*]`` tables (none when absent)."""
    if value is None:
        return ()
    seen: dict[str, str] = {}
    return tuple(
        _boundary(tbl, join("boundaries", i), seen, ctx)
        for i, tbl in enumerate(tables(value, "boundaries"))
    )


def _boundary(tbl: dict, path: str, seen: dict[str, str], ctx: Context) -> Boundary:
    table(tbl, path, allowed=_BOUNDARY_KEYS, required=("name",))
    bname = name(tbl["name"], join(path, "name"), seen)
    from fvheat.mesh.meshfile import MESH_FILE

    mesh_file = ctx.cache.get(MESH_FILE)
    if "edges" not in tbl and "layer" not in tbl and mesh_file is not None:
        if bname not in mesh_file.lines:
            known = ", ".join(sorted(mesh_file.lines)) or "none"
            raise Invalid(
                join(path, "name"),
                f"the mesh file has no 1-D group {bname!r} (its 1-D groups: {known}); "
                "or give edges",
            )
        tbl = {**tbl, "edges": [list(map(list, e)) for e in mesh_file.group_edges(bname)]}
    if "edges" not in tbl and "layer" not in tbl:
        raise Invalid(
            join(path, "edges"),
            "required: the segments [[[x0, y0], [x1, y1]], ...] the boundary covers, and/or "
            'layer = "NAME" (a layer of the [geometry] drawing)',
        )
    # edges and a layer add up: typed segments extend the layer's
    edges = _edges(tbl["edges"], join(path, "edges")) if "edges" in tbl else ()
    if "layer" in tbl:
        edges += layer_segments(ctx, tbl["layer"], join(path, "layer"))
    has_air, has_temp, has_flux = (
        k in tbl for k in ("air_temperature", "temperature", "heat_flux")
    )
    surface_keys = [k for k in _SURFACE_KEYS if k in tbl]
    if has_air and has_temp:
        raise Invalid(
            join(path, "temperature"),
            "a boundary either exchanges heat with air (air_temperature) or has a fixed "
            "temperature, not both",
        )
    if surface_keys and not has_air:
        if has_temp:
            raise Invalid(
                join(path, surface_keys[0]),
                "not allowed with a fixed temperature (it belongs to surface exchange with "
                "air_temperature)",
            )
        raise Invalid(
            join(path, "air_temperature"),
            f"required with {surface_keys[0]}: the air temperature (°C) of the surface exchange",
        )
    if has_temp and has_flux:
        raise Invalid(
            join(path, "heat_flux"),
            "not allowed with a fixed temperature (the temperature fixes the heat flow)",
        )

    def signal(key: str, *, is_temperature: bool) -> Signal | None:
        if key not in tbl:
            return None
        return read_signal(tbl[key], join(path, key), ctx, is_temperature=is_temperature)

    heat_flux = signal("heat_flux", is_temperature=False)
    if heat_flux is not None and _largest(heat_flux) > LARGEST_FLUX:
        raise Invalid(
            join(path, "heat_flux"),
            f"reaches {_largest(heat_flux):.4g} W/m², beyond ±{LARGEST_FLUX:g} W/m²: check the "
            "number and its unit",
        )
    if has_temp:
        return Boundary(
            name=bname,
            edges=edges,
            kind="temperature",
            temperature=signal("temperature", is_temperature=True),
        )
    if not has_air:
        if heat_flux is None:
            raise Invalid(
                path,
                "no condition given: add air_temperature with resistance (or convection and/or "
                "emissivity), or temperature, or heat_flux",
            )
        return Boundary(name=bname, edges=edges, kind="flux", heat_flux=heat_flux)

    air = signal("air_temperature", is_temperature=True)
    resistance = number(tbl, "resistance", path, required=False, ge=1.0 / LARGEST_COEFFICIENT)
    if resistance is not None:
        for key in ("convection", "emissivity"):
            if key in tbl:
                raise Invalid(
                    join(path, key),
                    "not allowed with resistance (a combined surface resistance already "
                    "includes convection and radiation); give resistance, or convection "
                    "and/or emissivity",
                )
        convection = 1.0 / resistance
    elif "convection" in tbl or "emissivity" in tbl:
        convection = number(
            tbl, "convection", path, required=False, default=0.0, ge=0, le=LARGEST_COEFFICIENT
        )
    else:
        raise Invalid(
            join(path, "resistance"),
            "a surface boundary (air_temperature) needs resistance (m²·K/W), or convection "
            "(W/(m²·K)) and/or emissivity",
        )
    emissivity = number(tbl, "emissivity", path, required=False, default=0.0, gt=0, le=1)
    if "radiant_temperature" in tbl and "emissivity" not in tbl:
        raise Invalid(
            join(path, "radiant_temperature"),
            "needs emissivity (radiation is exchanged only when emissivity is given)",
        )
    radiant = signal("radiant_temperature", is_temperature=True) or air
    return Boundary(
        name=bname,
        edges=edges,
        kind="surface",
        convection=convection,
        emissivity=emissivity,
        air_temperature=air,
        radiant_temperature=radiant,
        heat_flux=heat_flux,
        resistance=resistance,
    )


Segment = tuple[tuple[float, float], tuple[float, float]]


def _edges(value: Any, path: str) -> tuple[Segment, ...]:
    if not isinstance(value, list) or not value:
        raise Invalid(
            path,
            f"expected a non-empty array of segments [[[x0, y0], [x1, y1]], ...] (m), "
            f"got {describe(value)}",
        )
    segments = []
    for k, seg in enumerate(value):
        spath = join(path, k)
        if not (isinstance(seg, list) and len(seg) == 2 and all(isinstance(q, list) for q in seg)):
            hint = ""
            if isinstance(seg, list) and all(isinstance(v, int | float) for v in seg):
                hint = "; for a single segment write edges = [[[x0, y0], [x1, y1]]]"
            raise Invalid(
                spath, f"expected a segment [[x0, y0], [x1, y1]], got {describe(seg)}{hint}"
            )
        start, end = point(seg[0], join(spath, 0)), point(seg[1], join(spath, 1))
        check_length(start, end, spath)
        segments.append((start, end))
    return tuple(segments)
