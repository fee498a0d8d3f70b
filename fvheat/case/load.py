"""Read a TOML case file, apply ``--set`` overrides and validate it into a :class:`Case`.

Each top-level table has a section parser, registered in :data:`SECTIONS` under the table's
name, which is also the name of the :class:`Case` field it fills. Parsers run in registration
order and see the sections parsed before them in ``ctx.parsed``. Checks that need the whole
case run afterwards (:data:`CHECKS`). To add a top-level table (say ``[junction]``): add a
field to :class:`Case`, write ``parse(value, ctx)`` with the readers in
:mod:`fvheat.case.fields` (``value`` is None when the table is absent) and call
``register_section("junction", parse)``.
"""

from __future__ import annotations

import csv
import io
import logging
import tomllib
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

import numpy as np

from fvheat.case.fields import (
    Context,
    Invalid,
    check_keys,
    describe,
    join,
    name,
    number,
    point,
    string,
    table,
    tables,
    temperature,
    to_number,
)
from fvheat.case.junction import check_junction_side_kinds, parse_junction
from fvheat.case.model import (
    Boundary,
    Case,
    Condensation,
    Material,
    MeshSettings,
    Phase,
    Probe,
    ProbeLine,
    Region,
    TimeSettings,
)
from fvheat.case.overrides import apply_overrides
from fvheat.case.signals import Constant, Cosine, Series, Signal
from fvheat.case.solver import parse_solver
from fvheat.errors import CaseError
from fvheat.properties.cavity import cavity_dimensions, equivalent_conductivity
from fvheat.properties.library import LibraryMaterial, UnknownMaterialError, lookup

log = logging.getLogger(__name__)

SectionParser = Callable[[Any, Context], Any]
CaseCheck = Callable[[Case], None]

SECTIONS: dict[str, SectionParser] = {}
"""Top-level table name -> parser returning the value of the :class:`Case` field of that name."""

CHECKS: list[CaseCheck] = []
"""Whole-case checks, run in order after all sections parsed; they raise :class:`Invalid`."""


def register_section(name: str, parser: SectionParser) -> None:
    """Allow the top-level key ``name``, parsed by ``parser(value_or_None, ctx)``."""
    if name in SECTIONS:
        raise ValueError(f"section {name!r} is already registered")
    SECTIONS[name] = parser


def register_check(check: CaseCheck) -> CaseCheck:
    """Run ``check(case)`` on every validated case; usable as a decorator."""
    CHECKS.append(check)
    return check


def load_case(path: str | Path, overrides: Sequence[str] = ()) -> Case:
    """Read the TOML case file at ``path``, apply ``--set`` ``overrides`` and validate it.

    Raises :class:`~fvheat.errors.CaseError` (one line: ``FILE: key.path: what is wrong``)
    for a missing or unreadable file, a TOML syntax error, or any invalid value.
    """
    path = Path(path)
    try:
        with path.open("rb") as f:
            data = tomllib.load(f)
    except FileNotFoundError:
        raise CaseError("case file not found", file=str(path)) from None
    except IsADirectoryError:
        raise CaseError("is a folder, not a case file", file=str(path)) from None
    except OSError as err:
        raise CaseError(f"cannot read the case file: {err.strerror}", file=str(path)) from err
    except UnicodeDecodeError as err:
        raise CaseError(f"not UTF-8 text: {err.reason}", file=str(path)) from err
    except tomllib.TOMLDecodeError as err:
        raise CaseError(f"TOML syntax error: {_one_line(str(err))}", file=str(path)) from err
    return parse_case(data, path, overrides)


def parse_case(data: dict, source: Path, overrides: Sequence[str] = ()) -> Case:
    """Validate already-parsed case ``data`` (after applying ``overrides``) into a :class:`Case`.

    ``source`` is the case file: it names the file in errors, gives the default title and
    the folder relative CSV paths are resolved against.
    """
    source = Path(source)
    if overrides:
        data = apply_overrides(data, overrides, str(source))
    ctx = Context(source=source)
    try:
        if not isinstance(data, dict):
            raise Invalid("", f"expected a table of case settings, got {describe(data)}")
        check_keys(data, "", list(SECTIONS))
        for section, parser in SECTIONS.items():
            ctx.parsed[section] = parser(data.get(section), ctx)
        case = Case(source=source, **ctx.parsed)
        for check in CHECKS:
            check(case)
    except Invalid as err:
        raise CaseError(
            _one_line(err.message), file=str(source), key=_one_line(err.key) or None
        ) from None
    log.debug(
        "loaded case %s: %d regions, %d boundaries", source, len(case.regions), len(case.boundaries)
    )
    return case


def _one_line(text: str) -> str:
    return " ".join(text.splitlines())


# --- sections ------------------------------------------------------------------------------


def _title(value: Any, ctx: Context) -> str:
    if value is None:
        return ctx.source.stem
    if not isinstance(value, str):
        raise Invalid("title", f"expected a string, got {describe(value)}")
    return value


def _mesh(value: Any, ctx: Context) -> MeshSettings:
    if value is None:
        raise Invalid("mesh", "required table [mesh] is missing (at least max_cell = ... in m)")
    tbl = table(value, "mesh", allowed=("max_cell", "min_cell", "growth"))
    max_cell = number(tbl, "max_cell", "mesh", gt=0)
    min_cell = number(tbl, "min_cell", "mesh", required=False, default=max_cell / 5, gt=0)
    if min_cell > max_cell:
        raise Invalid(
            "mesh.min_cell", f"min_cell = {min_cell:g} m must not exceed max_cell = {max_cell:g} m"
        )
    growth = number(tbl, "growth", "mesh", required=False, default=1.3, gt=1, le=3)
    return MeshSettings(max_cell=max_cell, min_cell=min_cell, growth=growth)


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


def _materials(value: Any, ctx: Context) -> dict[str, Material]:
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
    latent = number(tbl, "latent_heat", path, required=False, ge=0)
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
        frozen = Phase(**{k: number(ftbl, k, fpath, required=False, gt=0) for k in ftbl})
    base = _library_entry(tbl["library"], join(path, "library")) if "library" in tbl else None
    return Material(
        name=key,
        conductivity=number(
            tbl,
            "conductivity",
            path,
            required=base is None,
            default=base.conductivity if base else None,
            gt=0,
        ),
        density=number(tbl, "density", path, required=False, default=base and base.density, gt=0),
        specific_heat=number(
            tbl, "specific_heat", path, required=False, default=base and base.specific_heat, gt=0
        ),
        emissivity=number(
            tbl, "emissivity", path, required=False, default=base and base.emissivity, gt=0, le=1
        ),
        latent_heat=latent,
        phase_change=phase_change,
        frozen=frozen,
    )


def _library_entry(value: Any, path: str) -> LibraryMaterial:
    """The built-in material called ``value`` (``fvheat materials`` lists them)."""
    if not isinstance(value, str):
        raise Invalid(path, f"expected a library material name, got {describe(value)}")
    try:
        return lookup(value)
    except UnknownMaterialError as err:
        raise Invalid(path, str(err).strip("'\"")) from None


def _library_material(entry: LibraryMaterial) -> Material:
    return Material(
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


def _regions(value: Any, ctx: Context) -> tuple[Region, ...]:
    if value is None:
        raise Invalid("regions", "required: at least one [[regions]] entry")
    entries = tables(value, "regions")
    if not entries:
        raise Invalid("regions", "define at least one [[regions]] entry")
    # library materials and cavities used by regions join the case's materials
    materials: dict[str, Material] = ctx.parsed["materials"]
    return tuple(_region(tbl, join("regions", i), materials) for i, tbl in enumerate(entries))


def _region(tbl: dict, path: str, materials: dict[str, Material]) -> Region:
    table(tbl, path, allowed=("material", "cavity", "box", "polygon"))
    if ("material" in tbl) == ("cavity" in tbl):
        raise Invalid(
            path, 'give exactly one of material = "name" or cavity = { heat_flow = "+x", ... }'
        )
    vertices, is_box = _shape(tbl, path)
    if "cavity" in tbl:
        material = _cavity_material(tbl["cavity"], join(path, "cavity"), vertices)
        materials[material.name] = material
        return Region(material=material.name, vertices=vertices, is_box=is_box)
    material = string(tbl, "material", path)
    if material not in materials:
        try:
            materials[material] = _library_material(lookup(material))
        except UnknownMaterialError:
            known = ", ".join(materials)
            raise Invalid(
                join(path, "material"),
                f"unknown material {material!r}: define [materials.{material}] or use a library "
                f"name (fvheat materials lists them); defined: {known}",
            ) from None
    return Region(material=material, vertices=vertices, is_box=is_box)


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
    eps = number(tbl, "emissivity", path, required=False, default=0.9, gt=0, le=1)
    vent = string(
        tbl, "ventilation", path, required=False, default="none", choices=("none", "slight")
    )
    delta_t = number(tbl, "delta_t", path, required=False, default=10.0, gt=0)
    t_mean = number(tbl, "mean_temperature", path, required=False, default=10.0, gt=-100, lt=100)
    width, height = np.ptp(vertices, axis=0)
    dims = cavity_dimensions(
        float(width),
        float(height),
        flow[1],
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
        ventilation=vent,
    )
    return Material(
        name=path,
        conductivity=float(result.lambda_eq),
        density=_AIR_DENSITY,
        specific_heat=_AIR_SPECIFIC_HEAT,
        emissivity=eps,
    )


def _shape(tbl: dict, path: str) -> tuple[np.ndarray, bool]:
    """Vertices (read-only) and box flag of a region's ``box`` or ``polygon``."""
    if ("box" in tbl) == ("polygon" in tbl):
        raise Invalid(
            path, "give exactly one of box = [x0, y0, x1, y1] or polygon = [[x, y], ...] (m)"
        )
    if "box" in tbl:
        vertices = _box(tbl["box"], join(path, "box"))
        is_box = True
    else:
        vertices, is_box = _polygon(tbl["polygon"], join(path, "polygon"))
    vertices.flags.writeable = False
    return vertices, is_box


def _box_vertices(x0: float, y0: float, x1: float, y1: float) -> np.ndarray:
    return np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]], dtype=float)


def _box(value: Any, path: str) -> np.ndarray:
    if not isinstance(value, list) or len(value) != 4:
        raise Invalid(path, f"expected [x0, y0, x1, y1] (m), got {describe(value)}")
    x0, y0, x1, y1 = (to_number(v, join(path, i)) for i, v in enumerate(value))
    if not (x1 > x0 and y1 > y0):
        raise Invalid(
            path, f"needs x1 > x0 and y1 > y0 (box = [x0, y0, x1, y1]), got {[x0, y0, x1, y1]}"
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
    edge = np.roll(p, -1, axis=0) - p
    scale = float(np.ptp(p, axis=0).max())
    short = np.flatnonzero(np.hypot(edge[:, 0], edge[:, 1]) <= 1e-12 * scale)
    if short.size:
        k = int(short[0])
        raise Invalid(path, f"vertices {k} and {(k + 1) % n} coincide")
    if np.linalg.svd(p - p.mean(axis=0), compute_uv=False)[1] <= 1e-12 * scale:
        raise Invalid(path, "the polygon has zero area: all its vertices lie on one line")
    crossing = _crossing_edges(p, scale)
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


def _crossing_edges(p: np.ndarray, scale: float) -> tuple[int, int] | None:
    """The first pair of edges (i, j), i < j, of the closed ring ``p`` that cross, touch or
    overlap other than at the vertex two neighbouring edges share; None for a simple ring.

    All pairs are tested at once, in blocks of rows to bound memory for long outlines.
    """
    n = len(p)
    rows = max(1, 2_000_000 // n)
    for first_row in range(0, n, rows):
        i, j = _pairs(n, first_row, rows)
        hit = _edges_meet(p, i, j, scale)
        found = np.flatnonzero(hit)
        if found.size:
            return int(i[found[0]]), int(j[found[0]])
    return None


def _pairs(n: int, first_row: int, rows: int) -> tuple[np.ndarray, np.ndarray]:
    """Index pairs (i, j), i < j < n, for i in first_row ... first_row + rows - 1."""
    i, j = np.meshgrid(np.arange(first_row, min(n, first_row + rows)), np.arange(n), indexing="ij")
    keep = j > i
    return i[keep], j[keep]


def _edges_meet(p: np.ndarray, i: np.ndarray, j: np.ndarray, scale: float) -> np.ndarray:
    """Whether edge i and edge j (i < j) of the ring ``p`` have a point in common beyond the
    vertex shared by neighbouring edges."""
    n = len(p)
    b = np.roll(p, -1, axis=0)
    ai, bi, aj, bj = p[i], b[i], p[j], b[j]

    def side(q: np.ndarray, r: np.ndarray, s: np.ndarray) -> np.ndarray:
        """Sign of the turn q -> r -> s, 0 when collinear to within round-off."""
        rq, sq = r - q, s - q
        cross = rq[:, 0] * sq[:, 1] - rq[:, 1] * sq[:, 0]
        return np.where(np.abs(cross) <= 1e-12 * scale**2, 0.0, np.sign(cross))

    def on(q: np.ndarray, r: np.ndarray, s: np.ndarray, turn: np.ndarray) -> np.ndarray:
        """Whether s lies on segment q-r (given its turn sign)."""
        tol = 1e-12 * scale
        inside = (s >= np.minimum(q, r) - tol) & (s <= np.maximum(q, r) + tol)
        return (turn == 0) & inside.all(axis=1)

    s1, s2, s3, s4 = side(ai, bi, aj), side(ai, bi, bj), side(aj, bj, ai), side(aj, bj, bi)
    proper = (s1 * s2 < 0) & (s3 * s4 < 0)
    follows = j == i + 1  # edge j starts where edge i ends: aj is bi
    wraps = (i == 0) & (j == n - 1)  # edge i starts where edge j ends: ai is bj
    return (
        proper
        | (on(ai, bi, aj, s1) & ~follows)
        | (on(aj, bj, bi, s4) & ~follows)
        | (on(ai, bi, bj, s2) & ~wraps)
        | (on(aj, bj, ai, s3) & ~wraps)
    )


_SURFACE_KEYS = ("resistance", "convection", "emissivity", "radiant_temperature")
_BOUNDARY_KEYS = ("name", "edges", "air_temperature", *_SURFACE_KEYS, "temperature", "heat_flux")


def _boundaries(value: Any, ctx: Context) -> tuple[Boundary, ...]:
    if value is None:
        return ()
    seen: dict[str, str] = {}
    return tuple(
        _boundary(tbl, join("boundaries", i), seen, ctx)
        for i, tbl in enumerate(tables(value, "boundaries"))
    )


def _boundary(tbl: dict, path: str, seen: dict[str, str], ctx: Context) -> Boundary:
    table(tbl, path, allowed=_BOUNDARY_KEYS, required=("name", "edges"))
    bname = name(tbl["name"], join(path, "name"), seen)
    edges = _edges(tbl["edges"], join(path, "edges"))
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
        return _signal(tbl[key], join(path, key), ctx, is_temperature=is_temperature)

    heat_flux = signal("heat_flux", is_temperature=False)
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
    resistance = number(tbl, "resistance", path, required=False, gt=0)
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
        convection = number(tbl, "convection", path, required=False, default=0.0, ge=0)
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
        if start == end:
            raise Invalid(spath, "the segment has zero length (its two points coincide)")
        segments.append((start, end))
    return tuple(segments)


def _signal(value: Any, path: str, ctx: Context, *, is_temperature: bool) -> Signal:
    """A constant, cosine or CSV series value at ``path`` (°C when ``is_temperature``)."""
    if isinstance(value, int | float) and not isinstance(value, bool):
        x = to_number(value, path)
        return Constant(temperature(x, path) if is_temperature else x)
    if not isinstance(value, dict):
        raise Invalid(
            path,
            f"expected a number, a table {{mean, amplitude, period, phase}} or a table "
            f"{{file, column}}, got {describe(value)}",
        )
    if "file" in value:
        return _series(value, path, ctx, is_temperature=is_temperature)
    tbl = table(value, path, allowed=("mean", "amplitude", "period", "phase"), required=("mean",))
    cosine = Cosine(
        mean=number(tbl, "mean", path),
        amplitude=number(tbl, "amplitude", path, required=False, default=0.0),
        period=number(tbl, "period", path, gt=0),
        phase=number(tbl, "phase", path, required=False, default=0.0),
    )
    lowest = cosine.mean - abs(cosine.amplitude)
    if is_temperature and lowest <= -273.15:
        raise Invalid(
            path,
            f"falls to {lowest:g} °C (mean - |amplitude|), not above absolute zero (-273.15 °C)",
        )
    return cosine


def _series(value: dict, path: str, ctx: Context, *, is_temperature: bool) -> Series:
    tbl = table(
        value, path, allowed=("file", "column", "scale", "period"), required=("file", "column")
    )
    fname = string(tbl, "file", path)
    column = string(tbl, "column", path)
    scale = number(tbl, "scale", path, required=False, default=1.0)
    period = number(tbl, "period", path, required=False, gt=0)
    csv_path = ctx.folder / fname
    header, rows = _read_csv(csv_path, fname, join(path, "file"), ctx)
    if column not in header:
        raise Invalid(
            join(path, "column"),
            f"no column {column!r} in {fname}; its columns: {', '.join(header)}",
        )
    if not rows:
        raise Invalid(join(path, "file"), f"{fname} has a header row but no data rows")
    col = header.index(column)
    times = np.empty(len(rows))
    values = np.empty(len(rows))
    for k, (line, cells) in enumerate(rows):
        times[k] = _cell(cells, 0, header, fname, line, path)
        values[k] = _cell(cells, col, header, fname, line, path)
        if k and times[k] <= times[k - 1]:
            raise Invalid(
                path,
                f"{fname} line {line}: time {times[k]:g} s is not after the previous row's "
                f"{times[k - 1]:g} s; times must increase strictly",
            )
        if is_temperature and values[k] <= -273.15:
            raise Invalid(
                path,
                f"{fname} line {line}: {values[k]:g} °C in column {column!r} is not above "
                "absolute zero (-273.15 °C)",
            )
    if period is not None and period <= times[-1] - times[0]:
        raise Invalid(
            join(path, "period"),
            f"period = {period:g} s must exceed the table's span ({times[-1] - times[0]:g} s): "
            "the last row is followed by the first row of the next period",
        )
    values = values * scale
    times.flags.writeable = False
    values.flags.writeable = False
    return Series(times=times, values=values, source=str(csv_path), column=column, period=period)


def _cell(cells: list[str], col: int, header: list[str], fname: str, line: int, path: str) -> float:
    where = f"{fname} line {line}"
    if col >= len(cells):
        raise Invalid(path, f"{where}: no value in column {header[col]!r} (row too short)")
    text = cells[col]
    try:
        x = float(text)
    except ValueError:
        raise Invalid(
            path, f"{where}: {text!r} in column {header[col]!r} is not a number"
        ) from None
    if not np.isfinite(x):
        raise Invalid(path, f"{where}: {text!r} in column {header[col]!r} is not a finite number")
    return x


def _read_csv(
    csv_path: Path, fname: str, key: str, ctx: Context
) -> tuple[list[str], list[tuple[int, list[str]]]]:
    """Header and (line number, cells) rows of a comma-separated file, cached per run.

    Blank lines and lines starting with ``#`` are skipped; cells are stripped.
    """
    cache_key = ("csv", csv_path.resolve())
    if cache_key in ctx.cache:
        return ctx.cache[cache_key]
    try:
        text = csv_path.read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise Invalid(
            key, f"CSV file {fname!r} not found (looked for {csv_path.absolute()})"
        ) from None
    except UnicodeDecodeError:
        raise Invalid(key, f"{fname} is not UTF-8 text") from None
    except OSError as err:
        raise Invalid(key, f"cannot read {fname}: {err.strerror}") from err
    header: list[str] | None = None
    rows: list[tuple[int, list[str]]] = []
    reader = csv.reader(io.StringIO(text))
    try:
        for row in reader:
            cells = [c.strip() for c in row]
            if not any(cells) or cells[0].startswith("#"):
                continue
            if header is None:
                header = cells
            else:
                rows.append((reader.line_num, cells))
    except csv.Error as err:
        raise Invalid(key, f"{fname} line {reader.line_num}: {err}") from err
    if header is None:
        raise Invalid(key, f"{fname} is empty (expected a header row: time, then column names)")
    if len(header) < 2:
        hint = " (columns must be separated by commas)" if ";" in header[0] else ""
        raise Invalid(key, f"{fname} has only one column{hint}; expected time, then values")
    ctx.cache[cache_key] = header, rows
    return header, rows


def _probes(value: Any, ctx: Context) -> tuple[Probe, ...]:
    if value is None:
        return ()
    seen: dict[str, str] = {}
    probes = []
    for i, tbl in enumerate(tables(value, "probes")):
        path = join("probes", i)
        table(tbl, path, allowed=("name", "at"), required=("name", "at"))
        probes.append(
            Probe(
                name=name(tbl["name"], join(path, "name"), seen),
                at=point(tbl["at"], join(path, "at")),
            )
        )
    return tuple(probes)


def _probe_lines(value: Any, ctx: Context) -> tuple[ProbeLine, ...]:
    if value is None:
        return ()
    seen: dict[str, str] = {}
    lines = []
    for i, tbl in enumerate(tables(value, "probe_lines")):
        path = join("probe_lines", i)
        table(tbl, path, allowed=("name", "start", "end"), required=("name", "start", "end"))
        start = point(tbl["start"], join(path, "start"))
        end = point(tbl["end"], join(path, "end"))
        if start == end:
            raise Invalid(join(path, "end"), "must differ from start (a line needs a length)")
        lines.append(ProbeLine(name(tbl["name"], join(path, "name"), seen), start, end))
    return tuple(lines)


SCHEMES = ("backward_euler", "crank_nicolson")


def _time(value: Any, ctx: Context) -> TimeSettings | None:
    if value is None:
        return None
    path = "time"
    tbl = table(
        value,
        path,
        allowed=(
            "duration",
            "step",
            "initial_temperature",
            "save_every",
            "scheme",
            "periodic",
            "periodic_tolerance",
            "max_cycles",
            "adaptive_tolerance",
        ),
        required=("duration", "step", "initial_temperature"),
    )
    duration = number(tbl, "duration", path, gt=0)
    step = number(tbl, "step", path, gt=0)
    if step > duration:
        raise Invalid(
            "time.step", f"step = {step:g} s is longer than the duration = {duration:g} s"
        )
    n_steps = duration / step
    if abs(n_steps - round(n_steps)) > 1e-9 * n_steps:
        raise Invalid(
            "time.duration",
            f"duration = {duration:g} s must be a whole number of steps of {step:g} s "
            f"(e.g. {round(n_steps) * step:g} or {(round(n_steps) + 1) * step:g})",
        )
    initial = tbl["initial_temperature"]
    if initial != "steady":
        if isinstance(initial, str):
            raise Invalid(
                "time.initial_temperature",
                f'expected a temperature (°C) or "steady", got {describe(initial)}',
            )
        initial = temperature(
            to_number(initial, "time.initial_temperature"), "time.initial_temperature"
        )
    save_every = number(tbl, "save_every", path, required=False, default=step, gt=0)
    ratio = save_every / step
    if ratio < 1 - 1e-9 or abs(ratio - round(ratio)) > 1e-9 * ratio:
        lower = max(1, int(ratio)) * step
        raise Invalid(
            "time.save_every",
            f"save_every = {save_every:g} s must be a whole multiple of step = {step:g} s "
            f"(results are saved at time steps), e.g. {lower:g} or {lower + step:g}",
        )
    scheme = string(tbl, "scheme", path, required=False, default="backward_euler", choices=SCHEMES)
    periodic = tbl.get("periodic", False)
    if not isinstance(periodic, bool):
        raise Invalid("time.periodic", f"expected true or false, got {describe(periodic)}")
    max_cycles = number(tbl, "max_cycles", path, required=False, default=200, ge=1)
    if max_cycles != int(max_cycles):
        raise Invalid("time.max_cycles", f"expected a whole number, got {max_cycles:g}")
    return TimeSettings(
        duration=duration,
        step=step,
        initial_temperature=initial,
        save_every=save_every,
        scheme=scheme,
        periodic=periodic,
        periodic_tolerance=number(
            tbl, "periodic_tolerance", path, required=False, default=1e-4, gt=0
        ),
        max_cycles=int(max_cycles),
        adaptive_tolerance=number(tbl, "adaptive_tolerance", path, required=False, gt=0),
    )


def _condensation(value: Any, ctx: Context) -> Condensation | None:
    """``[condensation]``: surfaces to check, room air temperature and humidity (%)."""
    if value is None:
        return None
    path = "condensation"
    tbl = table(
        value,
        path,
        allowed=("boundaries", "air_temperature", "relative_humidity", "mould_threshold"),
        required=("boundaries", "relative_humidity"),
    )
    known = {b.name: b for b in ctx.parsed["boundaries"]}
    names = tbl["boundaries"]
    if isinstance(names, str):
        names = [names]
    if not isinstance(names, list) or not names or not all(isinstance(n, str) for n in names):
        raise Invalid(
            join(path, "boundaries"), f"expected a list of boundary names, got {describe(names)}"
        )
    for n in names:
        if n not in known:
            raise Invalid(
                join(path, "boundaries"),
                f"no boundary is called {n!r}; boundaries: {', '.join(known)}",
            )
    if "air_temperature" in tbl:
        air = _signal(
            tbl["air_temperature"], join(path, "air_temperature"), ctx, is_temperature=True
        )
    else:
        air = known[names[0]].air_temperature or known[names[0]].temperature
        if air is None:
            raise Invalid(
                join(path, "air_temperature"),
                f"required: boundary {names[0]!r} has no air temperature to take the room's from",
            )
    rh = _signal(
        tbl["relative_humidity"], join(path, "relative_humidity"), ctx, is_temperature=False
    )
    values = rh.values if isinstance(rh, Series) else np.array([rh.at(0.0)])
    if isinstance(rh, Cosine):
        values = np.array([rh.mean - abs(rh.amplitude), rh.mean + abs(rh.amplitude)])
    if np.any(values <= 0) or np.any(values > 100):
        raise Invalid(join(path, "relative_humidity"), "must stay within (0, 100] %")
    return Condensation(
        boundaries=tuple(names),
        air_temperature=air,
        relative_humidity=rh,
        mould_threshold=number(
            tbl, "mould_threshold", path, required=False, default=80.0, gt=0, le=100
        ),
    )


register_section("title", _title)
register_section("mesh", _mesh)
register_section("materials", _materials)
register_section("regions", _regions)
register_section("boundaries", _boundaries)
register_section("probes", _probes)
register_section("time", _time)
register_section("probe_lines", _probe_lines)
register_section("condensation", _condensation)
register_section("junction", parse_junction)
register_section("solver", parse_solver)
register_check(check_junction_side_kinds)


# --- whole-case checks ---------------------------------------------------------------------


@register_check
def _heat_capacities_for_transient(case: Case) -> None:
    """A transient run needs density and specific heat of every material a region uses."""
    if case.time is None:
        return
    for i, region in enumerate(case.regions):
        material = case.materials[region.material]
        for key in ("density", "specific_heat"):
            if getattr(material, key) is None:
                raise Invalid(
                    f"materials.{material.name}.{key}",
                    f"required for a transient run ([time] is present): the material is used "
                    f"by regions.{i}",
                )


@register_check
def _series_cover_run(case: Case) -> None:
    """Tabulated boundary values must cover the whole run, 0 to ``duration``."""
    if case.time is None:
        return
    duration = case.time.duration
    for i, boundary in enumerate(case.boundaries):
        for key in ("air_temperature", "radiant_temperature", "temperature", "heat_flux"):
            sig = getattr(boundary, key)
            if not isinstance(sig, Series) or sig.period is not None:
                continue
            start, end = float(sig.times[0]), float(sig.times[-1])
            what = f"the series ({Path(sig.source).name}, column {sig.column!r})"
            if start > 0:
                raise Invalid(
                    f"boundaries.{i}.{key}",
                    f"{what} starts at t = {start:g} s but the run starts at t = 0 s; "
                    "add a row for t = 0",
                )
            if end < duration:
                raise Invalid(
                    f"boundaries.{i}.{key}",
                    f"{what} ends at t = {end:g} s but the run lasts to t = {duration:g} s "
                    "([time].duration); extend the table or shorten the run",
                )


@register_check
def _steady_field_is_fixed(case: Case) -> None:
    """A steady field needs a boundary that ties the temperature to a value."""
    if case.time is not None and case.time.initial_temperature != "steady":
        return
    if not any(
        b.kind == "temperature" or (b.kind == "surface" and (b.convection > 0 or b.emissivity > 0))
        for b in case.boundaries
    ):
        raise Invalid(
            "boundaries",
            "a steady field needs at least one boundary with a fixed temperature or with "
            "exchange to air (air_temperature with resistance, convection > 0 or emissivity)",
        )
