"""The heat-flux map: |q| on a log colour scale with streamlines showing where heat flows.

On either mesh: q per grid cell, or per triangle (q = −k∇T, constant in each); the heat
paths are traced on q sampled onto one uniform lattice (:func:`sample_flux`), whatever
the mesh.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from fvheat.output.plots import layers, raster, style
from fvheat.output.triangle_view import AnyFieldView, TriangleFieldView

if TYPE_CHECKING:
    from matplotlib.artist import Artist
    from matplotlib.axes import Axes
    from matplotlib.colorbar import Colorbar
    from matplotlib.figure import Figure

#: |q| below this fraction of the largest value is drawn at the bottom of the colour scale
FLUX_FLOOR = 1e-3
#: streamline sampling grid: points across the longer side of the window
STREAM_SAMPLES = 120
#: number of heat paths drawn from the surfaces where heat enters
HEAT_PATHS = 24
#: longest heat path drawn, in widths of the sampled window
HEAT_PATH_LENGTH = 2.5


def heat_flux_figure(
    view: AnyFieldView,
    *,
    title: str = "",
    subtitle: str = "",
    zoom: layers.Window | None = None,
    frange: tuple[float, float] | None = None,
) -> Figure:
    """Heat-flux density |q| (W/m², log scale) of ``view`` with streamlines along q.

    ``frange`` fixes the colour range (W/m², both > 0), ``zoom`` the window (x0, y0, x1, y1) m.
    """
    from matplotlib.colors import LogNorm

    with style.style():
        window = layers.window_of(view, zoom)
        x0, y0, x1, y1 = window
        fig = style.new_figure(*style.field_size(x1 - x0, y1 - y0))
        ax = fig.add_subplot()
        mag = np.hypot(view.flux[:, 0], view.flux[:, 1])
        lo, hi = frange if frange is not None else _range(mag)
        norm = LogNorm(lo, hi, clip=True)
        quad: Artist
        if isinstance(view, TriangleFieldView):  # q is constant in each triangle
            from fvheat.output.plots.triangles import draw_triangle_values

            quad = draw_triangle_values(
                ax, view, np.clip(mag, lo, hi), window=window, cmap=style.FLUX_CMAP, norm=norm
            )
        else:
            quad = layers.draw_cells(
                ax, view, np.clip(mag, lo, hi), window=window, cmap=style.FLUX_CMAP, norm=norm
            )
        draw_streamlines(ax, view, window)
        layers.draw_outlines(ax, view, colour="#d9d9d9")
        handles = layers.draw_boundaries(ax, view)
        layers.set_window(ax, window)
        cbar = fig.colorbar(
            raster.colour_scale(quad), ax=ax, shrink=0.85, pad=0.02, aspect=30, extend="min"
        )
        cbar.set_label("heat-flux density |q| (W/m²)")
        log_ticks(cbar, lo, hi)
        cbar.outline.set_linewidth(0.5)
        layers.add_scale_bar(ax, view, window)
        sub = "lines: heat paths from where heat enters, at equal steps of heat flow"
        style.headings(fig, ax, title, f"{subtitle + '; ' if subtitle else ''}{sub}")
        style.boundary_legend(fig, handles)
    return fig


def log_ticks(cbar: Colorbar, lo: float, hi: float) -> None:
    """Plain-number ticks on a log colour bar: 1-2-5 steps over narrow ranges, decades over
    wide ones."""
    from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter

    subs = (1.0, 2.0, 5.0) if hi / lo < 1e3 else (1.0,)
    cbar.ax.yaxis.set_major_locator(LogLocator(base=10, subs=subs))
    cbar.ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
    cbar.ax.yaxis.set_minor_formatter(NullFormatter())


def _range(mag: np.ndarray) -> tuple[float, float]:
    """Colour range (W/m²): the largest |q| down to the 1st percentile of the non-zero values,
    but at most ``1/FLUX_FLOOR`` decades below."""
    pos = mag[mag > 0]
    if pos.size == 0:
        return 0.1, 1.0
    top = float(pos.max())
    lo = max(float(np.percentile(pos, 1.0)), top * FLUX_FLOOR)
    return (lo, top) if top > lo else (top / 10, top)


def heat_path_seeds(view: AnyFieldView, n: int = HEAT_PATHS) -> np.ndarray:
    """Start points (k, 2), m, of ``n`` heat paths: on the faces where heat enters the body,
    at equal steps of the inflowing heat (W/m) taken face by face in boundary order, nudged
    just inside the body. In a steady source-free field each band between neighbouring
    paths then carries the same heat flow."""
    ends = view.face_ends
    length = np.hypot(*(ends[:, 1] - ends[:, 0]).T)
    flow = np.where(view.face_boundary >= 0, view.face_flux, 0.0) * length
    inflow = np.flatnonzero(flow > 0)
    if inflow.size == 0:
        return np.empty((0, 2))
    mid = ends[inflow].mean(axis=1)
    order = np.lexsort((mid[:, 1], mid[:, 0], view.face_boundary[inflow]))
    inflow = inflow[order]
    cum = np.cumsum(flow[inflow])
    targets = (np.arange(n) + 0.5) * cum[-1] / n
    picked = inflow[np.searchsorted(cum, targets)]
    centre = ends[picked].mean(axis=1)
    d = ends[picked, 1] - ends[picked, 0]
    outward = np.column_stack([d[:, 1], -d[:, 0]]) / np.hypot(d[:, 0], d[:, 1])[:, None]
    return centre - 0.25 * length[picked, None] * outward


def dilate(q: np.ma.MaskedArray) -> np.ma.MaskedArray:
    """Grow the unmasked part of a sampled vector field (rows, cols, 2) by one sample, new
    samples taking the mean of their unmasked neighbours, so lines reach the body's edges."""
    valid = ~np.ma.getmaskarray(q)[..., 0]
    data = np.where(valid[..., None], np.ma.getdata(q), 0.0)
    vp = np.pad(valid, 1).astype(float)
    dp = np.pad(data, ((1, 1), (1, 1), (0, 0)))
    rows, cols = valid.shape
    total = np.zeros(valid.shape)
    acc = np.zeros(data.shape)
    for dj in (0, 1, 2):
        for di in (0, 1, 2):
            total += vp[dj : dj + rows, di : di + cols]
            acc += dp[dj : dj + rows, di : di + cols]
    grow = ~valid & (total > 0)
    data[grow] = acc[grow] / total[grow, None]
    keep = valid | grow
    return np.ma.masked_array(data, mask=np.repeat(~keep[..., None], 2, axis=-1))


def sample_flux(view: AnyFieldView, x: np.ndarray, y: np.ndarray) -> np.ma.MaskedArray:
    """Heat-flux vectors (..., 2), W/m², at points (``x``, ``y``) m: bilinear between
    the grid's cell centres, or the value of the triangle holding the point (q is constant
    in each); masked outside the body."""
    if isinstance(view, TriangleFieldView):
        return view.shape.sample_triangles(view.flux, x, y)
    return layers.sample_cells(view, view.flux, x, y)


def draw_streamlines(
    ax: Axes, view: AnyFieldView, window: layers.Window, *, seeded: bool = True
) -> None:
    """Lines along q: heat paths from the warm surfaces (``seeded``, see
    :func:`heat_path_seeds`) or an even cover of the window; they stop at the body's edges.
    q is sampled (:func:`sample_flux`) on a uniform grid over the part of the window the
    body spans (:data:`STREAM_SAMPLES` across), whatever the number of cells."""
    from matplotlib import patheffects

    x0, y0, x1, y1 = window
    bx0, by0, bx1, by1 = view.extent
    span = (max(x0, bx0), max(y0, by0), min(x1, bx1), min(y1, by1))
    if not (span[0] < span[2] and span[1] < span[3]):
        return
    xs, ys = layers.sample_window(view, span, STREAM_SAMPLES)
    gx, gy = np.meshgrid(xs, ys)
    q = dilate(sample_flux(view, gx, gy))
    if q.mask.all() or not np.ma.max(np.hypot(q[..., 0], q[..., 1])) > 0:
        return
    # matplotlib follows a masked field point by point through numpy.ma, much slower than a
    # plain array: masks only where some sample lies outside the body
    qx, qy = (q[..., 0], q[..., 1]) if q.mask.any() else (q.data[..., 0], q.data[..., 1])
    opts: dict = {"density": 1.3, "broken_streamlines": True}
    if seeded:
        seeds = heat_path_seeds(view)
        keep = (
            (seeds[:, 0] > xs[0])
            & (seeds[:, 0] < xs[-1])
            & (seeds[:, 1] > ys[0])
            & (seeds[:, 1] < ys[-1])
        )
        if keep.sum() >= 3:
            # density sets the integration step (1/(30·density) of the window); a path
            # ends after HEAT_PATH_LENGTH windows (one that circles in a slow region
            # would otherwise be followed for long)
            opts = {
                "start_points": seeds[keep],
                "broken_streamlines": False,
                "density": 2,
                "maxlength": HEAT_PATH_LENGTH,
            }
    sp = ax.streamplot(
        xs,
        ys,
        qx,
        qy,
        color="#f2fbfa",
        linewidth=0.6,
        arrowsize=0.7,
        integration_direction="forward",
        zorder=3,
        **opts,
    )
    sp.lines.set_path_effects(
        [patheffects.withStroke(linewidth=1.5, foreground="#1f1f1f", alpha=0.6)]
    )
