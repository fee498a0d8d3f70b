"""The mesh plot: every cell outlined, filled by material, with the boundaries marked."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np

from fvheat.output.plots import layers, style
from fvheat.output.view import GeometryView

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from fvheat.output.triangle_view import AnyGeometryView


def mesh_figure(
    view: GeometryView, *, title: str = "", zoom: layers.Window | None = None
) -> Figure:
    """Cells of ``view`` outlined and coloured by material, boundaries coloured and named."""
    from matplotlib.collections import LineCollection

    with style.style():
        window = layers.window_of(view, zoom)
        x0, y0, x1, y1 = window
        fig = style.new_figure(*style.field_size(x1 - x0, y1 - y0, extra_width=0.4))
        ax = fig.add_subplot()
        used = np.unique(view.material)
        colours, cmap, norm = material_colours(len(view.material_names), used)
        x, y = view.grid.x, view.grid.y
        layers.draw_cells(ax, view, view.material, window=window, cmap=cmap, norm=norm)
        # (shared with the preview, which imports this module)
        from fvheat.output.plots.preview import mesh_step
        from fvheat.output.plots.preview_text import ordinal

        step = mesh_step(view, style.axes_size(x1 - x0, y1 - y0, extra_width=0.4))
        width = min(0.45, edge_width(fig, view, window) * step)
        ax.add_collection(
            LineCollection(list(layers.cell_edges(view, step)), colors="#3c3c3c", linewidths=width)
        )
        sizes = np.concatenate([np.diff(x), np.diff(y)])
        note = f"{1000 * sizes.min():.3g}–{1000 * sizes.max():.3g} mm" + (
            "" if step == 1 else f"; every {ordinal(step)} grid line drawn (too fine to show all)"
        )
        finish_mesh_figure(
            fig,
            ax,
            view,
            window,
            colours,
            used,
            title,
            f"mesh: {view.n_cells} cells on {x.size} × {y.size} grid lines, cell edges {note}",
        )
    return fig


def material_colours(n_materials: int, used: np.ndarray) -> tuple[list[str], Any, Any]:
    """One colour per material drawn, none repeated (a cavity never looks like a metal),
    white for the others; with the colour map and norm that draw material indices."""
    from matplotlib.colors import BoundaryNorm, ListedColormap

    colours = ["#ffffff"] * max(n_materials, 1)
    for k, c in zip(used, style.distinct_colours(used.size), strict=True):
        colours[k] = c
    return (
        colours,
        ListedColormap(colours),
        BoundaryNorm(np.arange(len(colours) + 1) - 0.5, len(colours)),
    )


def finish_mesh_figure(
    fig: Figure,
    ax: Axes,
    view: AnyGeometryView,
    window: layers.Window,
    colours: list[str],
    used: np.ndarray,
    title: str,
    subtitle: str,
) -> None:
    """What the mesh figures of both meshes share: material outlines, boundaries, window,
    scale bar, headings and the legend of the materials ``used`` (indices, drawn in their
    ``colours``) and the boundaries."""
    from matplotlib.patches import Patch

    layers.draw_outlines(ax, view)
    handles = layers.draw_boundaries(ax, view)
    layers.set_window(ax, window)
    layers.add_scale_bar(ax, view, window)
    mats = [
        Patch(facecolor=colours[k], edgecolor="#3c3c3c", lw=0.5, label=view.material_names[k])
        for k in used
    ]
    style.headings(fig, ax, title, subtitle)
    fig.legend(
        handles=mats + handles,
        loc="outside lower center",
        ncols=style.legend_columns(fig, [h.get_label() for h in mats + handles]),
        frameon=False,
        title="materials and boundaries",
        title_fontsize=7.5,
    )


def edge_width(fig: Figure, view: GeometryView, window: layers.Window) -> float:
    """Cell-edge line width (pt): a tenth of the median visible cell size on the page."""
    x0, y0, x1, y1 = window
    pt_per_m = 72.0 * min(fig.get_figwidth() / (x1 - x0), fig.get_figheight() / (y1 - y0)) * 0.8
    c = view.centres
    sel = (c[:, 0] > x0) & (c[:, 0] < x1) & (c[:, 1] > y0) & (c[:, 1] < y1)
    dx = np.diff(view.grid.x)
    size = float(np.median(dx)) if not sel.any() else float(np.median(np.sqrt(_areas(view)[sel])))
    return float(np.clip(0.1 * size * pt_per_m, 0.05, 0.45))


def _areas(view: GeometryView) -> np.ndarray:
    g = view.grid
    rows, cols = np.nonzero(g.cell_index >= 0)
    out = np.empty(view.n_cells)
    out[g.cell_index[rows, cols]] = np.diff(g.x)[cols] * np.diff(g.y)[rows]
    return out
