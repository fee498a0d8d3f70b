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

import logging
import tomllib
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

import numpy as np

from fvheat.case.boundaries import parse_boundaries
from fvheat.case.condensation import parse_condensation
from fvheat.case.fields import (
    COORDINATE_LIMIT,
    SMALLEST_CELL,
    Context,
    Invalid,
    check_keys,
    describe,
    number,
    string,
    table,
    whole_number,
)
from fvheat.case.geometry import parse_geometry
from fvheat.case.ground import parse_ground
from fvheat.case.junction import check_junction_side_kinds, parse_junction
from fvheat.case.materials import parse_materials
from fvheat.case.model import (
    DEFAULT_MAX_CELLS,
    Case,
    MeshSettings,
)
from fvheat.case.overrides import apply_overrides, check_created_used, created_names
from fvheat.case.parameters import parse_parameters, referenced, substitute
from fvheat.case.probes import parse_probe_lines, parse_probes
from fvheat.case.project import parse_project
from fvheat.case.regions import parse_regions
from fvheat.case.resistances import check_fixed_surfaces_assessed
from fvheat.case.sensitivities import check_sensitivities, parse_sensitivities
from fvheat.case.signals import Series
from fvheat.case.solver import parse_solver
from fvheat.case.timing import parse_time
from fvheat.case.units import case_units, converted_note, in_metres
from fvheat.errors import CaseError

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
    created = created_names(data, overrides) if isinstance(data, dict) else []
    if overrides:
        data = apply_overrides(data, overrides, str(source))
    raw = data
    ctx = Context(source=source)
    units = "m"
    try:
        if not isinstance(data, dict):
            raise Invalid("", f"expected a table of case settings, got {describe(data)}")
        check_keys(data, "", list(SECTIONS))
        data = substitute(data)  # [parameters]: after --set, before the unit conversion
        units = case_units(data)
        data = in_metres(data, units)  # [geometry] units: every typed length now in m
        for section, parser in SECTIONS.items():
            ctx.parsed[section] = parser(data.get(section), ctx)
        case = Case(source=source, **ctx.parsed)
        for check in CHECKS:
            check(case)
    except Invalid as err:
        raise CaseError(
            _one_line(err.message) + converted_note(units, err.key),
            file=str(source),
            key=_one_line(err.key) or None,
        ) from None
    if created:
        used = {r.material for r in case.regions}
        check_created_used(created, used, referenced(raw), str(source))
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
    keys = ("max_cell", "min_cell", "growth", "corner_cell", "max_cells", "kind", "file")
    tbl = table(value, "mesh", allowed=keys)
    if "file" in tbl:
        return _mesh_file(tbl, ctx)
    lo, hi = SMALLEST_CELL, COORDINATE_LIMIT  # m, cell edges
    max_cell = number(tbl, "max_cell", "mesh", ge=lo, le=hi)
    min_cell = number(tbl, "min_cell", "mesh", required=False, ge=lo, le=hi)
    if min_cell is None:
        min_cell = max(max_cell / 5, SMALLEST_CELL)
    if min_cell > max_cell:
        raise Invalid(
            "mesh.min_cell", f"min_cell = {min_cell:g} m must not exceed max_cell = {max_cell:g} m"
        )
    growth = number(tbl, "growth", "mesh", required=False, default=1.3, gt=1, le=3)
    corner = number(tbl, "corner_cell", "mesh", required=False, ge=lo, le=hi)
    if corner is not None and corner > min_cell:
        raise Invalid(
            "mesh.corner_cell",
            f"corner_cell = {corner:g} m must not exceed min_cell = {min_cell:g} m "
            "(give corner_cell = min_cell for no extra refinement at corners)",
        )
    kind = tbl.get("kind", "auto")
    if kind not in MESH_KINDS:
        raise Invalid(
            "mesh.kind", f"expected one of {', '.join(map(repr, MESH_KINDS))}, got {describe(kind)}"
        )
    # a billion cells is about a terabyte of memory: beyond any machine fvheat runs on
    max_cells = whole_number(
        tbl, "max_cells", "mesh", default=DEFAULT_MAX_CELLS, least=1, most=1_000_000_000
    )
    return MeshSettings(
        max_cell=max_cell,
        min_cell=min_cell,
        growth=growth,
        corner_cell=corner,
        kind=kind,
        max_cells=max_cells,
    )


def _mesh_file(tbl: dict, ctx: Context) -> MeshSettings:
    """``[mesh] file``: read the mesh (kept for the regions and boundaries that use its
    groups); the sizes do not apply."""
    from fvheat.mesh.meshfile import MESH_FILE, MeshFileError, read_mesh_file

    name = string(tbl, "file", "mesh")
    extra = [k for k in ("max_cell", "min_cell", "growth", "corner_cell") if k in tbl]
    if extra:
        raise Invalid(f"mesh.{extra[0]}", "not used with mesh.file (the file gives the mesh)")
    if tbl.get("kind", "triangles") != "triangles":
        raise Invalid(
            "mesh.kind", 'a mesh file is solved as triangles: remove kind or give "triangles"'
        )
    path = ctx.folder / name
    try:
        data = read_mesh_file(path)
    except MeshFileError as err:
        where = f" (looked for {path})" if not path.exists() else ""
        raise Invalid("mesh.file", f"{name}: {err}{where}") from None
    ctx.cache[MESH_FILE] = data
    edges = data.points[data.triangles] - data.points[data.triangles[:, [1, 2, 0]]]
    length = np.hypot(edges[..., 0], edges[..., 1])
    return MeshSettings(
        max_cell=float(length.max()),
        min_cell=float(length.min()),
        kind="triangles",
        file=path,
        file_sha256=data.sha256,
    )


#: the values of ``[mesh] kind``
MESH_KINDS = ("auto", "triangles", "rectilinear")


register_section("parameters", parse_parameters)
register_section("title", _title)
register_section("project", parse_project)
register_section("mesh", _mesh)
register_section("materials", parse_materials)
register_section("geometry", parse_geometry)  # before the regions and boundaries using it
register_section("regions", parse_regions)
register_section("boundaries", parse_boundaries)
register_section("probes", parse_probes)
register_section("time", parse_time)
register_section("probe_lines", parse_probe_lines)
register_section("condensation", parse_condensation)
register_section("junction", parse_junction)
register_section("solver", parse_solver)
register_section("sensitivities", parse_sensitivities)
register_section("ground", parse_ground)  # last: adds its soil to the regions, boundaries
register_check(check_junction_side_kinds)
register_check(check_fixed_surfaces_assessed)
register_check(check_sensitivities)


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
    if not any(b.ties_temperature for b in case.boundaries):
        raise Invalid(
            "boundaries",
            "a steady field needs at least one boundary with a fixed temperature or with "
            "exchange to air (air_temperature with resistance, convection > 0 or emissivity)",
        )
