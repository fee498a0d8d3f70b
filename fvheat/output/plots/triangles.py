"""Drawing on the triangle mesh: the pieces :mod:`fvheat.output.plots.layers` hands over
for a triangle view (node values linear in each triangle, per-triangle values), and the
mesh figure. Every other figure (temperature, heat flux with heat paths, snapshots) is
the grid's own code drawing a :class:`fvheat.output.triangle_view.TriangleFieldView`.

As on the grid, up to :data:`fvheat.output.plots.raster.RASTER_CELLS` triangles are drawn
one by one; above, a map is one image at the figure's resolution (each pixel the value at
its centre), so drawing costs what the figure can show.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np

from fvheat.mesh.mesh import Mesh
from fvheat.output.plots import layers, raster, style
from fvheat.output.triangle_view import TriangleGeometryView, triangle_geometry_view

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.collections import PolyCollection, TriMesh
    from matplotlib.figure import Figure
    from matplotlib.image import AxesImage


def _pixels(
    ax: Axes, view: TriangleGeometryView, window: layers.Window | None
) -> tuple[layers.Window, np.ndarray, np.ndarray]:
    """The window (m) and the pixel-centre lattice (rows, cols) of an image over it."""
    window = window if window is not None else layers.window_of(view)
    w, h = raster.image_size(window, raster.axes_pixels(ax, style.PNG_DPI))
    xs, ys = raster.pixel_centres(window, w, h)
    gx, gy = np.meshgrid(xs, ys)
    return window, gx, gy


def draw_node_values(
    ax: Axes,
    view: TriangleGeometryView,
    values: np.ndarray,
    *,
    window: layers.Window | None = None,
    **kwargs: Any,
) -> TriMesh | AxesImage:
    """Node ``values`` (n,) linear in each triangle (Gouraud shading); above
    ``RASTER_CELLS`` triangles one image of the values interpolated at the pixel centres
    of ``window`` (m, default the whole model). ``kwargs``: ``cmap``, ``norm``."""
    if view.n_triangles <= raster.RASTER_CELLS:
        return ax.tripcolor(
            view.shape.triangulation, values, shading="gouraud", rasterized=True, **kwargs
        )
    window, gx, gy = _pixels(ax, view, window)
    vals = view.shape.interpolate(values, gx, gy)
    pixel = np.arange(vals.size).reshape(vals.shape)
    cells = np.where(np.ma.getmaskarray(vals), -1, pixel)
    return raster.draw_image(ax, cells, vals.filled(0.0).ravel(), window, **kwargs)


def draw_triangle_values(
    ax: Axes,
    view: TriangleGeometryView,
    values: np.ndarray,
    *,
    window: layers.Window | None = None,
    **kwargs: Any,
) -> PolyCollection | AxesImage:
    """Per-triangle ``values`` (t,), flat-shaded; above ``RASTER_CELLS`` triangles one
    image (each pixel the value of the triangle under its centre) over ``window``."""
    if view.n_triangles <= raster.RASTER_CELLS:
        return ax.tripcolor(view.shape.triangulation, facecolors=values, rasterized=True, **kwargs)
    window, gx, gy = _pixels(ax, view, window)
    return raster.draw_image(ax, view.shape.locate(gx, gy), values, window, **kwargs)


def triangle_mesh_figure(
    view: TriangleGeometryView, *, title: str = "", zoom: layers.Window | None = None
) -> Figure:
    """The triangles of ``view`` outlined and coloured by material, boundaries coloured
    and named (the mesh figure of a run and ``fvheat check --plot``)."""
    from fvheat.output.plots.meshplot import finish_mesh_figure, material_colours

    shape = view.shape
    with style.style():
        window = layers.window_of(view, zoom)
        x0, y0, x1, y1 = window
        fig = style.new_figure(*style.field_size(x1 - x0, y1 - y0, extra_width=0.4))
        ax = fig.add_subplot()
        used = np.unique(shape.triangle_material)
        colours, cmap, norm = material_colours(len(view.material_names), used)
        edges = shape.points[shape.triangles[:, [0, 1]]] - shape.points[shape.triangles[:, [1, 2]]]
        sizes = np.hypot(edges[..., 0], edges[..., 1]).ravel()
        material = shape.triangle_material.astype(float)
        fine = view.n_triangles > raster.RASTER_CELLS
        if fine:  # an image of the materials; edges too fine to show at this scale
            draw_triangle_values(ax, view, material, window=window, cmap=cmap, norm=norm)
        else:
            ax.tripcolor(
                shape.triangulation,
                facecolors=material,
                cmap=cmap,
                norm=norm,
                edgecolors="#3c3c3c",
                linewidth=_edge_width(fig, sizes, window),
            )
        finish_mesh_figure(
            fig,
            ax,
            view,
            window,
            colours,
            used,
            title,
            f"mesh: {view.n_cells} nodes (control volumes) on {view.n_triangles} triangles, "
            f"edges {1000 * sizes.min():.3g}–{1000 * sizes.max():.3g} mm"
            + ("; too fine to draw every edge" if fine else ""),
        )
    return fig


def _edge_width(fig: Figure, sizes: np.ndarray, window: layers.Window) -> float:
    """Triangle-edge line width (pt): a tenth of the median edge on the page."""
    x0, y0, x1, y1 = window
    pt_per_m = 72.0 * min(fig.get_figwidth() / (x1 - x0), fig.get_figheight() / (y1 - y0)) * 0.8
    return float(np.clip(0.1 * float(np.median(sizes)) * pt_per_m, 0.05, 0.45))


def mesh_map(mesh: Mesh, title: str) -> Figure:
    """The mesh figure of a triangle ``mesh`` before any solve (``fvheat check --plot``)."""
    return triangle_mesh_figure(triangle_geometry_view(mesh), title=title)
