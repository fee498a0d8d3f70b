"""Field files for general-purpose viewers (VTU, written by :mod:`fvheat.output.vtu`,
read by VTK viewers and meshio) and ``cells.csv``.

Layout in the results folder::

    fields/field.vtu                      steady run
    fields/field_0000.vtu, ... field.pvd  transient run: one file per saved time + PVD index
    fields/surface_solve.vtu              junction: the steady surface-temperature solve
                                          (f_Rsi, θ_si,min), when it differs from the
                                          heat-loss solve
    fields/fields.json                    grid lines, material and boundary names, file list
    cells.csv                             cell centres, material, temperature, heat flux

(The same layout on the triangle mesh, whose VTU is described in
:mod:`fvheat.output.triangle_fields`; its ``fields.json`` has no grid lines.) On the grid
each VTU holds the body's cells as quads (in the solver's cell order) followed by the
exterior faces as line cells. Cell data (SI units, temperatures in °C):

- ``temperature``: cell temperature on quads, surface (face) temperature on lines;
- ``heat_flux``: heat-flux vector q (W/m², z = 0); on lines the normal flow −q_in·n_out;
- ``material``: material index on quads (−1 on lines);
- ``boundary``: boundary index on lines (−1 adiabatic, and on quads);
- ``surface_heat_flux``: heat flow into the body per face length (W/m²) on lines, NaN on quads.
"""

from __future__ import annotations

import csv
import io
import json
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any
from xml.sax.saxutils import quoteattr

import numpy as np

from fvheat.mesh.mesh import RectGrid
from fvheat.output.files import atomic_write, atomic_write_text
from fvheat.output.view import FieldView, GeometryView
from fvheat.simulate import Solution

if TYPE_CHECKING:
    import meshio

    from fvheat.output.memory import SolvedFields

FIELDS_DIR = "fields"
META_FILE = "fields.json"
FORMAT = "fvheat-fields-1"


def _node_ids(grid: RectGrid, pts: np.ndarray) -> np.ndarray:
    """Index of the grid node at each point (m), nodes numbered row by row."""
    x, y = grid.x, grid.y
    tol = 1e-9 * max(float(np.ptp(x)), float(np.ptp(y)), 1.0)
    i = np.clip(np.searchsorted(x, pts[..., 0] - tol), 0, x.size - 1)
    j = np.clip(np.searchsorted(y, pts[..., 1] - tol), 0, y.size - 1)
    return j * x.size + i


Topology = tuple[np.ndarray, np.ndarray, np.ndarray]


def vtu_topology(view: GeometryView) -> Topology:
    """Points (k, 3) m, quads (n, 4) and lines (m, 2) of the VTU of a view: the same for
    every saved time of a run, so computed once."""
    g = view.grid
    nx = g.x.size
    rows, cols = np.nonzero(g.cell_index >= 0)
    n0 = np.empty(rows.size, np.int64)  # lower-left node of each cell, in the solver's order
    n0[g.cell_index[rows, cols]] = rows * nx + cols
    quads = np.column_stack([n0, n0 + 1, n0 + nx + 1, n0 + nx])
    lines = _node_ids(g, view.face_ends)
    ids = np.concatenate([quads.ravel(), lines.ravel()])
    taken = np.zeros(nx * g.y.size, bool)
    taken[ids] = True
    used = np.flatnonzero(taken)  # the nodes in use, renumbered in order (no sort)
    inverse = (np.cumsum(taken) - 1)[ids]
    quads = inverse[: quads.size].reshape(-1, 4)
    lines = inverse[quads.size :].reshape(-1, 2)
    points = np.column_stack([g.x[used % nx], g.y[used // nx], np.zeros(used.size)])
    return points, quads, lines


def to_meshio(view: FieldView, topology: Topology | None = None) -> meshio.Mesh:
    """The view as a :class:`meshio.Mesh`: quads for cells, lines for exterior faces
    (``topology`` from :func:`vtu_topology`, computed when not given)."""
    import meshio

    points, blocks, cell_data = vtu_arrays(view, topology)
    return meshio.Mesh(points, blocks, cell_data=cell_data)


VtuArrays = tuple[np.ndarray, list[tuple[str, np.ndarray]], dict[str, list[np.ndarray]]]


def vtu_arrays(view: FieldView, topology: Topology | None = None) -> VtuArrays:
    """Points (k, 3) m, cell blocks [("quad", …), ("line", …)] and cell data per block of
    the VTU of ``view`` (see the module text)."""
    points, quads, lines = topology if topology is not None else vtu_topology(view)
    n_faces = view.face_boundary.size
    normal = outward_normals(view.face_ends)
    face_vec = -view.face_flux[:, None] * normal
    zeros_c, zeros_f = np.zeros((view.n_cells, 1)), np.zeros((n_faces, 1))
    cell_data = {
        "temperature": [view.temperature, view.face_temperature],
        "heat_flux": [np.hstack([view.flux, zeros_c]), np.hstack([face_vec, zeros_f])],
        "material": [view.material.astype(np.int32), np.full(n_faces, -1, np.int32)],
        "boundary": [
            np.full(view.n_cells, -1, np.int32),
            view.face_boundary.astype(np.int32),
        ],
        "surface_heat_flux": [np.full(view.n_cells, np.nan), view.face_flux],
    }
    return points, [("quad", quads), ("line", lines)], cell_data


def outward_normals(ends: np.ndarray) -> np.ndarray:
    """Unit outward normals (m, 2) of exterior faces whose ``ends`` are ordered as in
    :class:`FieldView` (the normal is the direction end 0 → end 1 turned clockwise)."""
    d = ends[:, 1] - ends[:, 0]
    return np.column_stack([d[:, 1], -d[:, 0]]) / np.hypot(d[:, 0], d[:, 1])[:, None]


def from_meshio(mesh: meshio.Mesh, meta: dict[str, Any], time: float = 0.0) -> FieldView:
    """Rebuild a :class:`FieldView` from a VTU of :func:`write_vtu` and its index."""
    x = np.asarray(meta["grid"]["x"], float)
    y = np.asarray(meta["grid"]["y"], float)
    blocks = {b.type: k for k, b in enumerate(mesh.cells)}
    q, ln = blocks["quad"], blocks["line"]
    pts = mesh.points[:, :2]
    centres = pts[mesh.cells[q].data].mean(axis=1)
    i = np.searchsorted(x, centres[:, 0]) - 1
    j = np.searchsorted(y, centres[:, 1]) - 1
    index = np.full((y.size - 1, x.size - 1), -1, dtype=np.int64)
    index[j, i] = np.arange(centres.shape[0])
    cd = mesh.cell_data
    return FieldView(
        grid=RectGrid(x=x, y=y, cell_index=index),
        centres=centres,
        material=np.asarray(cd["material"][q], dtype=np.int32),
        material_names=tuple(meta["materials"]),
        temperature=np.asarray(cd["temperature"][q], float),
        flux=np.asarray(cd["heat_flux"][q], float)[:, :2],
        face_ends=pts[mesh.cells[ln].data],
        face_boundary=np.asarray(cd["boundary"][ln], dtype=np.int32),
        boundary_names=tuple(meta["boundaries"]),
        face_temperature=np.asarray(cd["temperature"][ln], float),
        face_flux=np.asarray(cd["surface_heat_flux"][ln], float),
        time=time,
    )


#: VTU data are zlib-compressed while a file holds at most COMPRESS_CELLS cells and a run's
#: field files at most COMPRESS_BUDGET cell values in all; beyond, they are written
#: uncompressed (compressing costs several times the write)
COMPRESS_CELLS = 250_000
COMPRESS_BUDGET = 2_500_000


def compress_fields(cells_per_file: int, files: int) -> bool:
    """Whether a run's ``files`` VTU files of ``cells_per_file`` cells each (grid cells, or
    triangles) are zlib-compressed: see :data:`COMPRESS_CELLS` and :data:`COMPRESS_BUDGET`."""
    return cells_per_file <= COMPRESS_CELLS and cells_per_file * files <= COMPRESS_BUDGET


def write_vtu(
    path: str | Path, view: FieldView, *, compress: bool = True, topology: Topology | None = None
) -> Path:
    """Write one field as binary VTU with the arrays appended, zlib-compressed when
    ``compress``, atomically (:mod:`fvheat.output.vtu`)."""
    from fvheat.output.vtu import write_raw_vtu

    return write_raw_vtu(path, *vtu_arrays(view, topology), compress=compress)


def write_pvd(path: str | Path, entries: list[tuple[float, str]]) -> Path:
    """Write a ParaView collection index of (time s, file name relative to ``path``)."""
    body = "\n".join(
        f'    <DataSet timestep="{t!r}" group="" part="0" file={quoteattr(f)}/>' for t, f in entries
    )
    text = (
        '<?xml version="1.0"?>\n<VTKFile type="Collection" version="0.1">\n'
        f"  <Collection>\n{body}\n  </Collection>\n</VTKFile>\n"
    )
    return atomic_write_text(path, text)


SURFACE_FILE = "surface_solve.vtu"


#: what ``fvheat run --fields`` writes: every saved state, the last one only, or nothing
FIELD_CHOICES = ("all", "last", "none")


def write_fields(
    solution: Solution,
    out: str | Path,
    surface: Solution | None = None,
    *,
    which: str = "all",
    fields: SolvedFields | None = None,
) -> list[Path]:
    """Write the field files of a run into ``out/fields`` (see the module docstring);
    ``surface`` is a junction's separate surface-temperature solution. ``which``: "all"
    saved states, the "last" one only (and the surface solve), or "none" (nothing is
    written). ``fields`` shares views already built (see :mod:`fvheat.output.memory`)."""
    if which not in FIELD_CHOICES:
        raise ValueError(f"which must be one of {FIELD_CHOICES}, got {which!r}")
    if which == "none":
        return []
    from fvheat.output.memory import SolvedFields

    fields = fields if fields is not None else SolvedFields(solution, surface)
    folder = Path(out) / FIELDS_DIR
    times = fields.field_times()
    if solution.history is None or not solution.history.fields:
        names = ["field.vtu"]
    else:
        names = [f"field_{k:04d}.vtu" for k in range(len(times))]
    picked = list(range(len(times))) if which == "all" else [len(times) - 1]
    meta: dict[str, Any] = {}
    write: Callable[[Path, Any, bool], Path]
    last = fields.field(-1)
    if not isinstance(last, FieldView):  # the triangle mesh
        from fvheat.output import triangle_fields

        write, cells = triangle_fields.vtu_writer(last)
        meta["format"] = triangle_fields.FORMAT
    else:
        g = solution.mesh.grid
        assert g is not None
        topology = vtu_topology(last)

        def write(path: Path, view: Any, compress: bool) -> Path:
            return write_vtu(path, view, compress=compress, topology=topology)

        cells = solution.mesh.n_cells
        meta["format"] = FORMAT
        meta["grid"] = {"x": g.x.tolist(), "y": g.y.tolist()}
    compress = compress_fields(cells, len(picked))
    written: list[Path] = []
    for k in picked:
        written.append(write(folder / names[k], fields.field(k), compress))
        if k != len(times) - 1:
            fields.forget(k)  # a long run's views are not all kept
    entries = [(times[k], names[k]) for k in picked]
    if len(times) > 1 or solution.case.transient:
        written.append(write_pvd(folder / "field.pvd", entries))
    surface_view = fields.surface_field()
    if surface_view is not None:
        written.append(write(folder / SURFACE_FILE, surface_view, compress))
    meta |= {
        "materials": list(solution.mesh.material_names),
        "boundaries": list(solution.mesh.boundary_names),
        "files": [{"time_s": t, "file": f} for t, f in entries],
        "surface_solve": SURFACE_FILE if surface_view is not None else None,
    }
    written.append(atomic_write_text(folder / META_FILE, json.dumps(meta, indent=1) + "\n"))
    return written


def read_meta(out: str | Path) -> dict[str, Any]:
    """The field index ``fields/fields.json`` of a results folder."""
    return json.loads((Path(out) / FIELDS_DIR / META_FILE).read_text(encoding="utf-8"))


def read_field(out: str | Path, index: int = -1, meta: dict[str, Any] | None = None) -> FieldView:
    """Read saved field number ``index`` (default: the last, i.e. the end time) of a folder."""
    from fvheat.output.vtu import read_vtu

    meta = meta if meta is not None else read_meta(out)
    entry = meta["files"][index]
    mesh = read_vtu(Path(out) / FIELDS_DIR / entry["file"])
    return from_meshio(mesh, meta, float(entry["time_s"]))


def read_surface_field(out: str | Path, meta: dict[str, Any] | None = None) -> FieldView | None:
    """The junction's surface-temperature field of a folder, None when it has none."""
    from fvheat.output.vtu import read_vtu

    meta = meta if meta is not None else read_meta(out)
    name = meta.get("surface_solve")
    if not name:
        return None
    return from_meshio(read_vtu(Path(out) / FIELDS_DIR / name), meta)


def write_cells_csv(path: str | Path, view: FieldView) -> Path:
    """Write ``cells.csv`` of a view (:func:`write_cells_table`)."""
    return write_cells_table(
        path, view.centres, view.material_names, view.material, view.temperature, view.flux
    )


def write_cells_table(
    path: str | Path,
    centres: np.ndarray,
    material_names: Sequence[str],
    material: np.ndarray,
    temperature: np.ndarray,
    flux: np.ndarray,
) -> Path:
    """Write ``cells.csv``: cell centre (m), material, temperature (°C), heat flux (W/m²).

    Numbers are written as Python's shortest round-trip form (``repr``), material names as
    the ``csv`` module quotes them, rows ended by CRLF (the ``csv`` default): each column is
    converted once (``tolist``, one ``repr`` per value) and the rows joined, about twice as
    fast as a ``csv.writer`` row by row."""
    header = ["x_m", "y_m", "material", "temperature_C", "heat_flux_x_W_m2", "heat_flux_y_W_m2"]
    quoted = [_csv_field(name) for name in material_names]
    names = [quoted[m] for m in material.tolist()]
    columns = [
        map(repr, centres[:, 0].tolist()),
        map(repr, centres[:, 1].tolist()),
        names,
        map(repr, temperature.tolist()),
        map(repr, flux[:, 0].tolist()),
        map(repr, flux[:, 1].tolist()),
    ]

    def write(fh) -> None:
        fh.write(",".join(header) + CSV_END)
        if names:
            fh.write(CSV_END.join(map(",".join, zip(*columns, strict=True))) + CSV_END)

    return atomic_write(path, write)


#: the csv module's line ending
CSV_END = "\r\n"


def _csv_field(text: str) -> str:
    """``text`` as one field of a ``csv.writer`` row (quoted when the csv module would)."""
    buf = io.StringIO()
    csv.writer(buf, lineterminator="").writerow([text])
    return buf.getvalue()
