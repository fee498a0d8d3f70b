"""Draw every figure of a results folder into ``DIR/figures`` with an index of captions.

Files: ``temperature``, ``temperature_surface`` (a junction's surface-temperature solve,
when separate), ``heat_flux``, ``mesh`` (.png and .svg), and for a transient run
``probes``, ``heat_flows``, ``fronts`` (with latent heat) and ``snapshots``;
``figures.json`` lists them with captions (the report reads it). The same set, names and
captions on both meshes: the fields are grid or triangle views
(:mod:`fvheat.output.triangle_view`), drawn by the same figure code.
"""

from __future__ import annotations

import json
import logging
from collections.abc import Callable, Collection, Sequence
from dataclasses import asdict, dataclass
from pathlib import Path
from typing import Any

from fvheat.output.files import atomic_write_text
from fvheat.output.memory import FieldSource
from fvheat.output.plots import layers, style
from fvheat.output.plots.heatflux import heat_flux_figure
from fvheat.output.plots.meshplot import mesh_figure
from fvheat.output.plots.temperature import coldest_point, temperature_figure, time_label
from fvheat.output.plots.transient import (
    flow_figure,
    front_figure,
    probe_figure,
    snapshot_figure,
    snapshot_indices,
)
from fvheat.output.results import FIGURES_DIR, ResultsFolder
from fvheat.output.triangle_view import (
    AnyFieldView,
    AnyGeometryView,
    TriangleFieldView,
    TriangleGeometryView,
)

log = logging.getLogger(__name__)

INDEX_FILE = "figures.json"
#: every figure :func:`draw_figures` may draw, in the order of the index
FIGURE_NAMES = (
    "temperature",
    "temperature_surface",
    "heat_flux",
    "mesh",
    "probes",
    "heat_flows",
    "fronts",
    "snapshots",
    "sensitivities",
)
SCREENING = "Screening result: to be checked by a competent person."


@dataclass(frozen=True)
class FigureRecord:
    """One drawn figure: short name, file names relative to the results folder, caption."""

    name: str
    png: str
    svg: str | None
    caption: str


def _when(folder: ResultsFolder, t: float) -> str:
    return time_label(t) if folder.transient else "steady state"


def _save(
    fig, folder: ResultsFolder, name: str, caption: str, *, vector: bool = True
) -> FigureRecord:
    return _record(
        folder.path, name, style.save(fig, folder.path / FIGURES_DIR / name, vector=vector), caption
    )


def _record(out: Path, name: str, files: list[Path], caption: str) -> FigureRecord:
    rel = [str(p.relative_to(out).as_posix()) for p in files]
    return FigureRecord(name, rel[0], rel[1] if len(rel) > 1 else None, caption)


@dataclass(frozen=True)
class RenderedFigure:
    """A figure drawn before its results folder may be written (the mesh figure, drawn by
    a figure worker during the solve): file bytes by suffix and the caption."""

    name: str
    files: dict[str, bytes]
    caption: str

    def save(self, out: Path) -> FigureRecord:
        """Write the files into ``out/figures`` (atomically); the index record."""
        paths = style.write_rendered(self.files, out / FIGURES_DIR / self.name)
        return _record(out, self.name, paths, self.caption)


def render_mesh_figure(view: AnyGeometryView, title: str) -> RenderedFigure:
    """The mesh figure of ``view`` (titled ``title``), rendered in memory (a figure
    worker's job while the run solves)."""
    fig, caption = _mesh_figure(view, title, None)
    return RenderedFigure("mesh", style.render(fig, vector=False), caption)


def _mesh_figure(view: AnyGeometryView, title: str, zoom: layers.Window | None) -> tuple[Any, str]:
    """The mesh figure of either mesh and its caption (without the window note)."""
    if isinstance(view, TriangleGeometryView):
        from fvheat.output.plots.triangles import triangle_mesh_figure

        fig = triangle_mesh_figure(view, title=title, zoom=zoom)
        cells = f"{view.n_cells} nodes (control volumes) on {view.n_triangles} triangles"
    else:
        fig = mesh_figure(view, title=title, zoom=zoom)
        cells = f"{view.n_cells} cells"
    caption = (
        f"Computational mesh: {cells} coloured by material, boundaries "
        "coloured and named; unmarked exterior edges are adiabatic."
    )
    return fig, caption


def draw_figures(
    folder: ResultsFolder | str | Path,
    *,
    vrange: tuple[float, float] | None = None,
    zoom: layers.Window | None = None,
    fields: FieldSource | None = None,
    only: Collection[str] | None = None,
) -> list[FigureRecord]:
    """Draw all figures of ``folder`` (colour range ``vrange`` °C and window ``zoom``
    (x0, y0, x1, y1) m apply to the temperature maps; ``zoom`` also to flux and mesh).
    The fields come from ``fields`` (e.g. a run's :class:`fvheat.output.memory.SolvedFields`)
    or, by default, from the folder's field files: both give the same figures.

    ``only`` (names of :data:`FIGURE_NAMES`) draws those of them that apply and writes no
    index: the caller draws the rest elsewhere and writes the index
    (:func:`write_index`)."""
    folder = folder if isinstance(folder, ResultsFolder) else ResultsFolder.open(folder)
    source: FieldSource = fields if fields is not None else folder
    s = folder.summary
    title = folder.title
    view = source.field()
    when = _when(folder, view.time)
    notes = _view_notes(vrange, zoom)
    window_note = _view_notes(None, zoom)  # the colour range is of temperature maps only
    records: list[FigureRecord] = []

    def want(name: str) -> bool:
        return only is None or name in only

    marked = coldest_point(s)
    surface = source.surface_field()
    # θ_si,min is marked on the map of the solve it comes from
    on_main = marked if surface is None else None
    if want("temperature"):
        fig = temperature_figure(
            view,
            title=title,
            subtitle=when if surface is None else f"heat-loss solve, {when}",
            marked=on_main,
            vrange=vrange,
            zoom=zoom,
            caption=SCREENING,
        )
        caption = _temperature_caption(s, when, on_main, view, separate=surface is not None)
        records.append(_save(fig, folder, "temperature", caption + notes))
    if surface is not None and want("temperature_surface"):
        fig = temperature_figure(
            surface,
            title=title,
            subtitle="surface-temperature solve (f_Rsi, θ_si,min), steady state",
            marked=marked,
            vrange=vrange,
            zoom=zoom,
            caption=SCREENING,
        )
        caption = _surface_caption(s, marked)
        records.append(_save(fig, folder, "temperature_surface", caption + notes))

    if want("heat_flux"):
        fig = heat_flux_figure(view, title=title, subtitle=when, zoom=zoom)
        caption = (
            f"Heat-flux density |q| (W/m², log scale), {when}, {_flux_words(view)}. "
            "Lines are heat paths starting where heat enters the body, at "
            "equal steps of the entering heat flow; in a steady field each band between two "
            "lines carries the same heat flow."
        )
        records.append(_save(fig, folder, "heat_flux", caption + window_note))

    if want("mesh"):
        fig, caption = _mesh_figure(view, title, zoom)
        records.append(_save(fig, folder, "mesh", caption + window_note, vector=False))

    if folder.transient:
        records += _transient(folder, source, title, vrange, zoom, notes, want)
    if want("sensitivities"):
        from fvheat.output.plots.sensitivities import sensitivity_figure

        if (drawn := sensitivity_figure(s, title)) is not None:
            records.append(_save(drawn[0], folder, "sensitivities", drawn[1]))
    if only is None:
        write_index(folder.path, records)
    return records


def draw_group(out: Path, source: FieldSource, names: list[str]) -> list[FigureRecord]:
    """The figures ``names`` of the results folder ``out`` (a figure worker's job: see
    :mod:`fvheat.output.workers`); no index."""
    return draw_figures(out, fields=source, only=names)


def write_index(out: Path, records: list[FigureRecord]) -> None:
    """Write ``out/figures/figures.json``: ``records`` in the order of
    :data:`FIGURE_NAMES` (the report shows them in this order)."""
    order = {name: i for i, name in enumerate(FIGURE_NAMES)}
    ranked = sorted(records, key=lambda r: order.get(r.name, len(order)))
    atomic_write_text(
        out / FIGURES_DIR / INDEX_FILE,
        json.dumps([asdict(r) for r in ranked], indent=2, ensure_ascii=False) + "\n",
    )
    log.info("drew %d figures in %s", len(records), out / FIGURES_DIR)


#: relative cost of drawing each figure (CPU time, measured at 1 M cells steady and at
#: 90 000 cells transient), to share the figures out between figure workers
FIGURE_COST = {
    "temperature": 3.5,
    "temperature_surface": 3.5,
    "heat_flux": 3.0,
    "mesh": 2.0,
    "snapshots": 2.0,
    "probes": 0.6,
    "heat_flows": 0.6,
    "fronts": 0.6,
    "sensitivities": 0.6,
}


def planned_figures(folder: ResultsFolder, source: FieldSource) -> list[str]:
    """Names of the figures :func:`draw_figures` may draw for ``folder`` (a superset:
    e.g. "probes" of a transient run without probes)."""
    names = ["temperature", "heat_flux", "mesh"]
    if source.surface_field() is not None:
        names.append("temperature_surface")
    if folder.transient:
        names += ["probes", "heat_flows", "fronts", "snapshots"]
    if folder.summary.get("sensitivities"):
        names.append("sensitivities")
    return names


def split_figures(names: list[str], n: int, start: Sequence[float] = ()) -> list[list[str]]:
    """``names`` in ``n`` groups (some perhaps empty) of about equal drawing cost: largest
    first, each to the group that would finish first, group ``i`` starting with the cost
    ``start[i]`` (the figures its worker is still drawing, in :data:`FIGURE_COST` units;
    default none)."""
    groups: list[list[str]] = [[] for _ in range(max(n, 1))]
    cost = [float(c) for c in start][: len(groups)]
    cost += [0.0] * (len(groups) - len(cost))
    for name in sorted(names, key=lambda k: -FIGURE_COST.get(k, 1.0)):
        i = cost.index(min(cost))
        groups[i].append(name)
        cost[i] += FIGURE_COST.get(name, 1.0)
    return groups


def states_needed(n_states: int) -> list[int]:
    """Indices of the saved states :func:`draw_figures` reads of ``n_states``: the last
    one and, when there are several, those of the snapshot figure."""
    wanted = {n_states - 1}
    if n_states > 1:
        wanted.update(int(i) for i in snapshot_indices(n_states))
    return sorted(wanted)


def _view_notes(vrange: tuple[float, float] | None, zoom: layers.Window | None) -> str:
    """Caption sentences for a fixed colour range (°C) and a window (m), when given."""
    out = ""
    if vrange is not None:
        out += f" Colour range fixed at {vrange[0]:g} to {vrange[1]:g} °C."
    if zoom is not None:
        out += f" Window x {zoom[0]:g} to {zoom[2]:g} m, y {zoom[1]:g} to {zoom[3]:g} m."
    return out


def _mesh_words(view: AnyFieldView) -> str:
    """How the field is drawn on the view's mesh (empty on the grid: cell values)."""
    if isinstance(view, TriangleFieldView):
        return " on the triangle mesh (linear in each triangle)"
    return ""


def _flux_words(view: AnyFieldView) -> str:
    """Where the view's heat-flux vectors come from."""
    if isinstance(view, TriangleFieldView):
        return "q = −λ∇T, constant in each triangle (the flux the box method's faces carry)"
    return "reconstructed from the solver's face heat flows"


def _temperature_caption(
    s: dict[str, Any], when: str, marked, view: AnyFieldView, *, separate: bool
) -> str:
    text = (
        f"Temperature field (°C){_mesh_words(view)}, {when}, with isotherms, material "
        "outlines and the boundaries coloured and named."
    )
    if separate:
        text += (
            " This is the heat-loss solve (ψ, L2D: the boundaries' own surface resistances); "
            "f_Rsi and θ_si,min come from the surface-temperature solve, whose map follows "
            "with θ_si,min marked."
        )
    elif marked is not None:
        text += f" {_marked_text(marked)}"
        j = s.get("junction")
        if j is not None and j.get("f_Rsi_from"):
            text += f", taken from the {j['f_Rsi_from']}"
        text += "."
    return text + " " + SCREENING


def _surface_caption(s: dict[str, Any], marked) -> str:
    j = s.get("junction") or {}
    text = (
        "Temperature field (°C) of the steady surface-temperature solve that f_Rsi and "
        f"θ_si,min come from: {j.get('f_Rsi_from', '')}."
    )
    if marked is not None:
        text += f" {_marked_text(marked)}."
    return text + " " + SCREENING


def _marked_text(marked) -> str:
    return (
        f"The diamond marks {marked.label} = {marked.value:.2f} °C at "
        f"({marked.x:.3f}, {marked.y:.3f}) m"
    )


def _transient(
    folder: ResultsFolder,
    source: FieldSource,
    title: str,
    vrange,
    zoom,
    notes: str,
    want: Callable[[str], bool],
) -> list[FigureRecord]:
    out = []
    ts = folder.timeseries() if any(map(want, ("probes", "heat_flows", "fronts"))) else None
    if ts is not None:
        if ts.probes and want("probes"):
            fig = probe_figure(ts.times, ts.probes, title=title)
            out.append(_save(fig, folder, "probes", "Probe temperatures (°C) at every saved time."))
        if want("heat_flows"):
            fig = flow_figure(ts.times, ts.flows, title=title)
            caption = (
                "Heat flow through each boundary (W/m per metre of junction, positive into "
                "the body) at every saved time."
            )
            out.append(_save(fig, folder, "heat_flows", caption))
        if (ts.fronts or ts.frozen_area is not None) and want("fronts"):
            fig = front_figure(ts.times, ts.fronts, ts.frozen_area, title=title)
            out.append(
                _save(
                    fig,
                    folder,
                    "fronts",
                    "Phase-change fronts along the probe lines (distance from each line's start "
                    "to where the ground is half frozen: first and far crossing) and the frozen "
                    "area (dashed, right axis).",
                )
            )
    times = source.field_times()
    if len(times) > 1 and want("snapshots"):
        idx = snapshot_indices(len(times))
        views = [source.field(int(i)) for i in idx]
        fig = snapshot_figure(views, title=title, vrange=vrange, zoom=zoom)
        when = ", ".join(time_label(v.time).removeprefix("t = ") for v in views)
        out.append(
            _save(
                fig,
                folder,
                "snapshots",
                f"Temperature field (°C){_mesh_words(views[0])} at {when}, on one colour scale."
                + notes,
                vector=False,
            )
        )
    return out


def read_index(folder: ResultsFolder) -> list[FigureRecord]:
    """The figures listed in ``figures/figures.json`` whose PNG is a file inside the
    folder's ``figures/`` (relative paths only, no ``..``, no link leading out), empty if
    none. A damaged or foreign index is ignored with a log message: the report embeds only
    the run's own figures."""
    f = folder.path / FIGURES_DIR / INDEX_FILE
    if not f.is_file():
        return []
    try:
        entries = json.loads(f.read_text(encoding="utf-8"))
        records = [FigureRecord(**r) for r in entries]
    except (OSError, ValueError, TypeError) as err:
        log.warning("ignoring %s: %s", f, err)
        return []
    return [
        r
        for r in records
        if _own_file(folder.path, r.png) and (r.svg is None or _own_file(folder.path, r.svg))
    ]


def _own_file(root: Path, rel: object) -> bool:
    """Whether ``rel`` names a regular file inside ``root/figures`` (after resolving links)."""
    if not isinstance(rel, str) or not rel or Path(rel).is_absolute() or ".." in Path(rel).parts:
        log.warning("ignoring figure %r: not a path inside the results folder", rel)
        return False
    base = (root / FIGURES_DIR).resolve()
    target = (root / rel).resolve()
    if not target.is_relative_to(base) or not target.is_file():
        log.warning("ignoring figure %r: not a file of the results folder's figures", rel)
        return False
    return True
