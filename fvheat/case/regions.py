"""Regions: painted boxes, polygons and drawing layers of a material or an air cavity
(``[[regions]]``)."""

from __future__ import annotations

from dataclasses import replace
from typing import Any, Literal, cast

import numpy as np

from fvheat.case.fields import (
    SMALLEST_CELL,
    Context,
    Invalid,
    coordinate,
    describe,
    join,
    name,
    number,
    point,
    string,
    table,
    tables,
)
from fvheat.case.geometry import LayerShape, check_drawing_scale, layer_shapes
from fvheat.case.materials import library_material
from fvheat.case.model import (
    Material,
    Region,
)
from fvheat.drawing.polygons import crossing_edges
from fvheat.properties.cavity import Ventilation, cavity_dimensions, equivalent_conductivity
from fvheat.properties.library import UnknownMaterialError, lookup


def parse_regions(value: Any, ctx: Context) -> tuple[Region, ...]:
    """Validate the ``[[regions]]`` entries; at least one is required."""
    from fvheat.mesh.meshfile import MESH_FILE

    if MESH_FILE in ctx.cache:
        if value is not None:
            raise Invalid(
                "regions",
                "not used with mesh.file: the file's 2-D groups, named after materials, are "
                "the regions (remove the [[regions]] entries)",
            )
        return _file_regions(ctx)
    if value is None:
        raise Invalid("regions", "required: at least one [[regions]] entry")
    entries = tables(value, "regions")
    if not entries:
        raise Invalid("regions", "define at least one [[regions]] entry")
    check_drawing_scale(
        ctx, [(join(join("regions", i), "layer"), t.get("layer")) for i, t in enumerate(entries)]
    )
    # library materials and cavities used by regions join the case's materials
    materials: dict[str, Material] = ctx.parsed["materials"]
    seen: dict[str, str] = {}
    return tuple(
        replace(region, entry=i)
        for i, tbl in enumerate(entries)
        for region in _regions(tbl, join("regions", i), materials, ctx, seen)
    )


def _file_regions(ctx: Context) -> tuple[Region, ...]:
    """The regions of a mesh file: one per separate part of each 2-D group, the group
    named after a material of the case or of the library."""
    from fvheat.mesh.meshfile import MESH_FILE, group_outlines

    materials: dict[str, Material] = ctx.parsed["materials"]
    out = []
    for k, (group, ring, holes) in enumerate(group_outlines(ctx.cache[MESH_FILE])):
        if group not in materials:
            try:
                materials[group] = library_material(lookup(group))
            except UnknownMaterialError:
                raise Invalid(
                    "mesh.file",
                    f"2-D group {group!r} names no material: define [materials.{group}] or "
                    "name the group after a library material (fvheat materials lists them)",
                ) from None
        out.append(Region(material=group, vertices=ring, name=group, entry=k, holes=holes))
    return tuple(out)


def _regions(
    tbl: dict, path: str, materials: dict[str, Material], ctx: Context, seen: dict[str, str]
) -> list[Region]:
    """The regions of one ``[[regions]]`` entry: one, or one per closed shape of its layer."""
    table(tbl, path, allowed=("name", "material", "cavity", "box", "polygon", "layer", "holes"))
    rname = name(tbl["name"], join(path, "name"), seen) if "name" in tbl else None
    if ("material" in tbl) == ("cavity" in tbl):
        raise Invalid(
            path, 'give exactly one of material = "name" or cavity = { heat_flow = "+x", ... }'
        )
    shapes = _shapes(tbl, path, ctx)
    if "cavity" in tbl:
        regions = []
        for k, shape in enumerate(shapes):
            cavity = _cavity_material(tbl["cavity"], join(path, "cavity"), shape.vertices)
            if len(shapes) > 1:  # each cavity of a layer has its own size and conductivity
                cavity = replace(cavity, name=join(cavity.name, k))
            materials[cavity.name] = cavity
            regions.append(_region(cavity.name, shape, rname))
        return regions
    material = string(tbl, "material", path)
    if material not in materials:
        try:
            materials[material] = library_material(lookup(material))
        except UnknownMaterialError:
            known = ", ".join(materials)
            raise Invalid(
                join(path, "material"),
                f"unknown material {material!r}: define [materials.{material}] or use a library "
                f"name (fvheat materials lists them); defined: {known}",
            ) from None
    return [_region(material, shape, rname) for shape in shapes]


def _region(material: str, shape: LayerShape, rname: str | None) -> Region:
    return Region(
        material=material,
        vertices=shape.vertices,
        is_box=shape.is_box,
        name=rname,
        holes=shape.holes,
    )


_CAVITY_KEYS = ("heat_flow", "emissivity", "ventilation", "section", "delta_t", "mean_temperature")
#: air properties for transient runs through a cavity (ISO 10456 Table 3 air at 10 °C, from memory)
_AIR_DENSITY, _AIR_SPECIFIC_HEAT = 1.23, 1008.0


def _cavity_material(value: Any, path: str, vertices: np.ndarray) -> Material:
    """An unventilated or slightly ventilated air cavity as a solid of equivalent conductivity
    (ISO 10077-2 method, :func:`fvheat.properties.cavity.equivalent_conductivity`) sized by
    the region's bounding box."""
    tbl = table(value, path, allowed=_CAVITY_KEYS, required=("heat_flow",))
    flow = string(tbl, "heat_flow", path, choices=("+x", "-x", "+y", "-y"))
    section = string(
        tbl, "section", path, required=False, default="vertical", choices=("vertical", "plan")
    )
    # polished metal and low-e coatings reach about 0.02 (common practice)
    eps = number(tbl, "emissivity", path, required=False, default=0.9, ge=0.01, le=1)
    vent = string(
        tbl, "ventilation", path, required=False, default="none", choices=("none", "slight")
    )
    delta_t = number(tbl, "delta_t", path, required=False, default=10.0, gt=0)
    t_mean = number(tbl, "mean_temperature", path, required=False, default=10.0, gt=-100, lt=100)
    width, height = np.ptp(vertices, axis=0)
    dims = cavity_dimensions(
        float(width),
        float(height),
        cast(Literal["x", "y"], flow[1]),
        1 if flow[0] == "+" else -1,
        vertical_axis="y" if section == "vertical" else None,
    )
    result = equivalent_conductivity(
        dims.d,
        dims.b,
        emissivity1=eps,
        emissivity2=eps,
        direction=dims.direction,
        delta_t=delta_t,
        mean_temperature=t_mean + 273.15,
        ventilation=cast("Ventilation", vent),
    )
    return Material(
        name=path,
        conductivity=float(result.lambda_eq),
        density=_AIR_DENSITY,
        specific_heat=_AIR_SPECIFIC_HEAT,
        emissivity=eps,
        cavity=True,
        source=(
            "equivalent conductivity of the air cavity by the ISO 10077-2 method "
            "(fvheat.properties.cavity; constants from memory); air density and heat capacity"
        ),
    )


def _shapes(tbl: dict, path: str, ctx: Context) -> list[LayerShape]:
    """The shapes (vertices read-only, m) of a region's ``box``, ``polygon`` or ``layer``."""
    given = [k for k in ("box", "polygon", "layer") if k in tbl]
    if len(given) != 1:
        raise Invalid(
            path,
            "give exactly one of box = [x0, y0, x1, y1], polygon = [[x, y], ...] or "
            'layer = "NAME" (a layer of the [geometry] drawing)'
            + (f"; got {' and '.join(given)}" if given else ""),
        )
    if "layer" in tbl:
        if "holes" in tbl:
            raise Invalid(
                join(path, "holes"),
                "a drawing layer's shapes take their holes from the drawing (closed shapes "
                "inside a hatch); holes apply to box and polygon regions",
            )
        return layer_shapes(ctx, tbl["layer"], join(path, "layer"))
    if "box" in tbl:
        vertices = _box(tbl["box"], join(path, "box"))
        is_box = True
    else:
        vertices, is_box = _polygon(tbl["polygon"], join(path, "polygon"))
    vertices.flags.writeable = False
    holes = _holes(tbl["holes"], join(path, "holes"), vertices) if "holes" in tbl else ()
    return [LayerShape(vertices, holes, is_box)]


def _holes(value: Any, path: str, outline: np.ndarray) -> tuple[np.ndarray, ...]:
    """Holes of a typed region: polygons [[x, y], ...] (m) strictly inside its ``outline``
    and apart from each other; where one lies, the region paints nothing (what was painted
    before shows, or the body has a void there, whose edges are exterior faces)."""
    import shapely

    if not isinstance(value, list) or not value:
        raise Invalid(
            path, f"expected a list of polygons [[[x, y], ...], ...], got {describe(value)}"
        )
    rings = [_polygon(v, join(path, i))[0] for i, v in enumerate(value)]
    body = shapely.Polygon(outline)
    shapes = [shapely.Polygon(r) for r in rings]
    for i, hole in enumerate(shapes):
        if not body.contains(hole) or hole.boundary.intersects(body.boundary):
            raise Invalid(
                join(path, i), "a hole must lie inside the region's outline, apart from it"
            )
        for j in range(i):
            if hole.intersects(shapes[j]):
                raise Invalid(join(path, i), f"the hole meets hole {j}: join them into one")
    for r in rings:
        r.flags.writeable = False
    return tuple(rings)


def _box_vertices(x0: float, y0: float, x1: float, y1: float) -> np.ndarray:
    return np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]], dtype=float)


def _box(value: Any, path: str) -> np.ndarray:
    if not isinstance(value, list) or len(value) != 4:
        raise Invalid(path, f"expected [x0, y0, x1, y1] (m), got {describe(value)}")
    x0, y0, x1, y1 = (coordinate(v, join(path, i)) for i, v in enumerate(value))
    if not (x1 > x0 and y1 > y0):
        raise Invalid(
            path, f"needs x1 > x0 and y1 > y0 (box = [x0, y0, x1, y1]), got {[x0, y0, x1, y1]}"
        )
    if min(x1 - x0, y1 - y0) < SMALLEST_CELL:
        raise Invalid(
            path,
            f"the box is {x1 - x0:g} m × {y1 - y0:g} m: thinner than {SMALLEST_CELL:g} m "
            "(round-off in a coordinate?)",
        )
    return _box_vertices(x0, y0, x1, y1)


def _polygon(value: Any, path: str) -> tuple[np.ndarray, bool]:
    """Counter-clockwise vertices (n, 2) of a simple polygon, and whether it is an upright box.

    A last vertex repeating the first one (an explicitly closed ring) is dropped.
    """
    if not isinstance(value, list):
        raise Invalid(path, f"expected an array of points [[x, y], ...] (m), got {describe(value)}")
    pts = [point(p, join(path, i)) for i, p in enumerate(value)]
    if len(pts) > 3 and pts[0] == pts[-1]:
        pts.pop()
    if len(pts) < 3:
        raise Invalid(path, f"a polygon needs at least 3 vertices, got {len(pts)}")
    p = np.array(pts, dtype=float)
    n = len(p)
    extent = np.ptp(p, axis=0)
    if float(extent.min()) < SMALLEST_CELL:
        raise Invalid(
            path,
            f"the polygon spans {extent[0]:g} m × {extent[1]:g} m: thinner than "
            f"{SMALLEST_CELL:g} m (round-off in a coordinate?)",
        )
    edge = np.roll(p, -1, axis=0) - p
    scale = float(np.ptp(p, axis=0).max())
    short = np.flatnonzero(np.hypot(edge[:, 0], edge[:, 1]) <= 1e-12 * scale)
    if short.size:
        k = int(short[0])
        raise Invalid(path, f"vertices {k} and {(k + 1) % n} coincide")
    if np.linalg.svd(p - p.mean(axis=0), compute_uv=False)[1] <= 1e-12 * scale:
        raise Invalid(path, "the polygon has zero area: all its vertices lie on one line")
    crossing = crossing_edges(p, scale)
    if crossing is not None:
        i, j = crossing
        raise Invalid(
            path,
            f"the polygon intersects itself: edge {i} (vertex {i} to {(i + 1) % n}) meets "
            f"edge {j} (vertex {j} to {(j + 1) % n}); list the vertices in order around "
            "the outline",
        )
    area = 0.5 * float(np.sum(p[:, 0] * np.roll(p[:, 1], -1) - np.roll(p[:, 0], -1) * p[:, 1]))
    if area < 0:
        p = p[::-1].copy()
    if n == 4 and np.all((edge[:, 0] == 0) | (edge[:, 1] == 0)):
        lo, hi = p.min(axis=0), p.max(axis=0)
        return _box_vertices(lo[0], lo[1], hi[0], hi[1]), True
    return p, False
