"""Figures of a run on the triangle mesh, drawn from the solution in memory.

``temperature`` (the field, linear in each triangle, with isotherms, material outlines and
the boundaries coloured), ``temperature_surface`` (a junction's separate
surface-temperature solve), ``heat_flux`` (|q| per triangle, log scale), ``mesh`` (the
triangles coloured by material) and, for a transient run, ``probes`` and ``heat_flows``;
listed in ``figures/figures.json`` with captions like the grid's figures
(:mod:`fvheat.output.plots.figures`), so the report embeds them the same way.
"""

from __future__ import annotations

import json
from dataclasses import asdict
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from fvheat.mesh.mesh import Mesh
from fvheat.output.files import atomic_write_text
from fvheat.output.plots import style
from fvheat.output.plots.figures import INDEX_FILE, SCREENING, FigureRecord
from fvheat.output.plots.temperature import Marked, coldest_point, time_label
from fvheat.output.results import FIGURES_DIR
from fvheat.simulate import Solution

if TYPE_CHECKING:
    from matplotlib.figure import Figure


def _triangulation(mesh: Mesh):
    from matplotlib.tri import Triangulation

    assert mesh.triangles is not None
    return Triangulation(mesh.centres[:, 0], mesh.centres[:, 1], mesh.triangles)


def _frame(mesh: Mesh):
    """A figure and axes sized to the body."""
    c = mesh.centres
    (x0, y0), (x1, y1) = c.min(axis=0), c.max(axis=0)
    fig = style.new_figure(*style.field_size(max(x1 - x0, 1e-9), max(y1 - y0, 1e-9)))
    ax = fig.add_subplot()
    ax.set_aspect("equal")
    ax.set_xlabel("x (m)")
    ax.set_ylabel("y (m)")
    return fig, ax


def _edges(mesh: Mesh, ax) -> list:
    """Material outlines (edges between triangles of different materials) and the exterior
    edges coloured by boundary; returns the legend handles."""
    from matplotlib.collections import LineCollection
    from matplotlib.lines import Line2D

    assert mesh.triangles is not None and mesh.triangle_material is not None
    t, v = mesh.triangles, mesh.centres
    e = np.sort(np.stack([t[:, [0, 1]], t[:, [1, 2]], t[:, [2, 0]]], axis=1), axis=2)
    owner = np.repeat(mesh.triangle_material, 3)
    key, inverse = np.unique(e.reshape(-1, 2), axis=0, return_inverse=True)
    lo = np.full(len(key), np.iinfo(np.int32).max)
    hi = np.full(len(key), -1)
    np.minimum.at(lo, inverse.ravel(), owner)
    np.maximum.at(hi, inverse.ravel(), owner)
    inner = key[(lo != hi) & (hi >= 0)]
    ax.add_collection(LineCollection(list(v[inner]), colors=style.OUTLINE_COLOUR, linewidths=0.6))
    half = mesh.n_boundary_faces // 2
    ends = np.stack([v[mesh.b_cell[:half]], v[mesh.b_cell[half:]]], axis=1)
    bid = mesh.b_boundary[:half]
    ax.add_collection(
        LineCollection(list(ends[bid < 0]), colors=style.ADIABATIC_COLOUR, linewidths=0.6)
    )
    handles = []
    for k, name in enumerate(mesh.boundary_names):
        colour = style.BOUNDARY_COLOURS[k % len(style.BOUNDARY_COLOURS)]
        ax.add_collection(LineCollection(ends[bid == k], colors=colour, linewidths=2.0))
        handles.append(Line2D([], [], color=colour, lw=2.0, label=name))
    ax.autoscale_view()
    return handles


def temperature_map(solution: Solution, title: str, subtitle: str, marked: Marked | None) -> Figure:
    """The temperature map (°C) of ``solution`` on its triangles."""
    with style.style():
        fig, ax = _frame(solution.mesh)
        tri = _triangulation(solution.mesh)
        temp = solution.temperature
        lo, hi = float(temp.min()), float(temp.max())
        if hi - lo < 1e-9:
            lo, hi = lo - 0.5, hi + 0.5
        shade = ax.tripcolor(tri, temp, shading="gouraud", cmap=style.TEMPERATURE_CMAP)
        levels = np.linspace(lo, hi, 12)[1:-1]
        ax.tricontour(tri, temp, levels=levels, colors="white", linewidths=0.5)
        handles = _edges(solution.mesh, ax)
        if marked is not None:
            ax.plot([marked.x], [marked.y], "D", ms=6.5, mfc=style.COLDEST_COLOUR, mec="black")
            ax.annotate(
                f"{marked.label} = {marked.value:.2f} °C",
                (marked.x, marked.y),
                xytext=(8, 8),
                textcoords="offset points",
                fontsize=7,
                bbox={"boxstyle": "round,pad=0.3", "fc": "white", "ec": "#333333", "lw": 0.6},
            )
        fig.colorbar(shade, ax=ax, shrink=0.85, pad=0.02, aspect=30).set_label("temperature (°C)")
        style.headings(fig, ax, title, subtitle, SCREENING)
        style.boundary_legend(fig, handles)
    return fig


def flux_map(solution: Solution, title: str, subtitle: str) -> Figure:
    """|q| (W/m², log scale) per triangle, q = −k∇T (constant in each triangle)."""
    from matplotlib.colors import LogNorm

    from fvheat.output.plots.heatflux import log_ticks
    from fvheat.output.triangle_fields import triangle_flux

    q = triangle_flux(solution, solution.temperature)
    size = np.hypot(q[:, 0], q[:, 1])
    positive = size[size > 0]
    lo = float(positive.min()) if positive.size else 1e-3
    hi = float(size.max()) if positive.size else 1.0
    lo = max(lo, hi * 1e-4)
    with style.style():
        fig, ax = _frame(solution.mesh)
        shade = ax.tripcolor(
            _triangulation(solution.mesh),
            facecolors=np.clip(size, lo, hi),
            cmap=style.FLUX_CMAP,
            norm=LogNorm(lo, max(hi, lo * 1.0001)),
        )
        handles = _edges(solution.mesh, ax)
        cbar = fig.colorbar(shade, ax=ax, shrink=0.85, pad=0.02, aspect=30)
        cbar.set_label("heat-flux density |q| (W/m²)")
        log_ticks(cbar, lo, max(hi, lo * 1.0001))
        style.headings(fig, ax, title, subtitle, "")
        style.boundary_legend(fig, handles)
    return fig


def mesh_map(mesh: Mesh, title: str) -> Figure:
    """The triangles coloured by material (also the preview of ``fvheat check --plot``)."""
    from matplotlib.colors import ListedColormap

    assert mesh.triangle_material is not None
    with style.style():
        fig, ax = _frame(mesh)
        colours = style.distinct_colours(len(mesh.material_names))  # none repeats
        ax.tripcolor(
            _triangulation(mesh),
            facecolors=mesh.triangle_material.astype(float),
            cmap=ListedColormap(colours),
            vmin=-0.5,
            vmax=len(colours) - 0.5,
            edgecolors="#555555",
            linewidth=0.15,
        )
        handles = _edges(mesh, ax)
        style.headings(fig, ax, title, f"{len(mesh.triangle_material)} triangles", "")
        style.boundary_legend(fig, handles)
    return fig


def draw_triangle_figures(
    solution: Solution, out: str | Path, summary: dict, surface: Solution | None = None
) -> list[FigureRecord]:
    """Draw the figures of a triangle-mesh run into ``out/figures`` and index them."""
    out = Path(out)
    title = solution.case.title
    when = time_label(solution.time) if solution.case.transient else "steady state"
    marked = coldest_point(summary)
    records = []

    def save(fig, name: str, caption: str, vector: bool = True) -> None:
        files = style.save(fig, out / FIGURES_DIR / name, vector=vector)
        rel = [p.relative_to(out).as_posix() for p in files]
        records.append(FigureRecord(name, rel[0], rel[1] if len(rel) > 1 else None, caption))

    main_marked = marked if surface is None else None
    tm = solution.mesh.triangle_material
    n_triangles = 0 if tm is None else len(tm)
    save(
        temperature_map(solution, title, when, main_marked),
        "temperature",
        f"Temperature field (°C), {when}, on the triangle mesh (linear in each triangle), "
        "with isotherms, material outlines and the boundaries coloured. " + SCREENING,
    )
    if surface is not None:
        save(
            temperature_map(surface, title, "surface-temperature solve", marked),
            "temperature_surface",
            "Temperature field (°C) of the steady surface-temperature solve that f_Rsi and "
            "θ_si,min come from. " + SCREENING,
        )
    save(
        flux_map(solution, title, when),
        "heat_flux",
        f"Heat-flux density |q| (W/m², log scale), {when}: q = −λ∇T, constant in each "
        "triangle (the flux the box method's faces carry).",
        vector=False,
    )
    save(
        mesh_map(solution.mesh, title),
        "mesh",
        f"Computational mesh: {solution.mesh.n_cells} nodes (control volumes) on "
        f"{n_triangles} triangles coloured by material; "
        "unmarked exterior edges are adiabatic.",
        vector=False,
    )
    h = solution.history
    if h is not None and len(h.times) > 1:
        from fvheat.output.plots.transient import flow_figure, probe_figure

        times = np.asarray(h.times)
        names = [b.name for b in solution.case.boundaries]
        if solution.case.probes:
            probes = {
                p.name: np.asarray(h.probes)[:, k] for k, p in enumerate(solution.case.probes)
            }
            save(probe_figure(times, probes, title=title), "probes", "Probe temperatures (°C).")
        flows = {n: np.asarray(h.flows)[:, k] for k, n in enumerate(names)}
        save(
            flow_figure(times, flows, title=title),
            "heat_flows",
            "Heat flow through each boundary (W/m, positive into the body) at every saved time.",
        )
    from fvheat.output.plots.sensitivities import sensitivity_figure

    if (drawn := sensitivity_figure(summary, title)) is not None:  # as on the grid
        save(drawn[0], "sensitivities", drawn[1])
    atomic_write_text(
        out / FIGURES_DIR / INDEX_FILE,
        json.dumps([asdict(r) for r in records], indent=2, ensure_ascii=False) + "\n",
    )
    return records
