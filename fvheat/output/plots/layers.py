"""Drawing pieces shared by the field plots: cells, outlines, boundaries, isotherms, scale.

All coordinates in m, temperatures in °C; ``ax`` is a matplotlib Axes at equal aspect.
The views are of either mesh: what depends on it (cells, outlines, isotherms, whether a
point is in the body) goes to :mod:`fvheat.output.plots.triangles` for a triangle view.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

import numpy as np

from fvheat.mesh.mesh import RectGrid
from fvheat.output.plots import raster, style
from fvheat.output.triangle_view import AnyGeometryView, TriangleGeometryView
from fvheat.output.view import GeometryView

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.collections import QuadMesh, TriMesh
    from matplotlib.colors import Colormap, Normalize
    from matplotlib.contour import ContourSet
    from matplotlib.image import AxesImage

Window = tuple[float, float, float, float]


def window_of(view: AnyGeometryView, zoom: Window | None = None) -> Window:
    """The plotted window (x0, y0, x1, y1), m: ``zoom`` or the model with a 3 % margin."""
    if zoom is not None:
        return zoom
    x0, y0, x1, y1 = view.extent
    m = 0.03 * max(x1 - x0, y1 - y0)
    return x0 - m, y0 - m, x1 + m, y1 + m


def set_window(ax: Axes, window: Window) -> None:
    """Limits, equal aspect and axis labels in metres."""
    x0, y0, x1, y1 = window
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.set_aspect("equal")
    ax.set_xlabel("x (m)")
    ax.set_ylabel("y (m)")


def inside(grid: RectGrid, x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """True where the point (``x``, ``y``) m lies in a cell of the body."""
    i = np.searchsorted(grid.x, x) - 1
    j = np.searchsorted(grid.y, y) - 1
    ok = (i >= 0) & (i < grid.x.size - 1) & (j >= 0) & (j < grid.y.size - 1)
    out = np.zeros(np.shape(x), dtype=bool)
    out[ok] = grid.cell_index[j[ok], i[ok]] >= 0
    return out


def _bracket(centres: np.ndarray, p: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    if centres.size == 1:
        zero = np.zeros(p.shape, dtype=int)
        return zero, zero, np.zeros(p.shape)
    hi = np.clip(np.searchsorted(centres, p), 1, centres.size - 1)
    lo = hi - 1
    return lo, hi, np.clip((p - centres[lo]) / (centres[hi] - centres[lo]), 0.0, 1.0)


def sample_cells(
    view: GeometryView, values: np.ndarray, x: np.ndarray, y: np.ndarray
) -> np.ma.MaskedArray:
    """Bilinear interpolation of cell ``values`` (n, ...) between cell centres at points
    (``x``, ``y``) m, weights renormalised over cells of the body; masked outside it."""
    g = view.grid
    i0, i1, wx = _bracket(g.xc, x)
    j0, j1, wy = _bracket(g.yc, y)
    cells = np.stack(
        [g.cell_index[j0, i0], g.cell_index[j0, i1], g.cell_index[j1, i0], g.cell_index[j1, i1]]
    )
    w = np.stack([(1 - wx) * (1 - wy), wx * (1 - wy), (1 - wx) * wy, wx * wy])
    w = np.where(cells >= 0, w, 0.0)
    total = w.sum(axis=0)
    ok = inside(g, x, y) & (total > 0)
    w = np.where(ok, w / np.where(ok, total, 1.0), 0.0)
    vals = values[np.maximum(cells, 0)]  # (4, *shape, ...)
    extra = (slice(None),) * w.ndim + (None,) * (vals.ndim - w.ndim)
    out = (w[extra] * vals).sum(axis=0)
    mask = np.broadcast_to(~ok[(...,) + (None,) * (vals.ndim - w.ndim)], out.shape).copy()
    return np.ma.masked_array(out, mask=mask)


def in_body(view: AnyGeometryView, x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """True where the point (``x``, ``y``) m lies in the body (a cell or a triangle)."""
    if isinstance(view, TriangleGeometryView):
        return view.shape.inside(x, y)
    return inside(view.grid, x, y)


def draw_cells(
    ax: Axes,
    view: AnyGeometryView,
    values: np.ndarray,
    *,
    window: Window | None = None,
    **kwargs: Any,
) -> QuadMesh | AxesImage | TriMesh:
    """Cell values over the real geometry (voids left blank): flat-shaded quads up to
    ``raster.RASTER_CELLS`` cells, above one image at the figure's resolution (each pixel
    the value of the cell under its centre) over ``window`` (default: the whole model).
    On a triangle view: node values, linear in each triangle."""
    if isinstance(view, TriangleGeometryView):
        from fvheat.output.plots.triangles import draw_node_values

        return draw_node_values(ax, view, values, window=window, **kwargs)
    if view.n_cells <= raster.RASTER_CELLS:
        g = view.grid
        return ax.pcolormesh(
            g.x, g.y, view.grid_values(values), shading="flat", rasterized=True, **kwargs
        )
    window = window if window is not None else window_of(view)
    w, h = raster.image_size(window, raster.axes_pixels(ax, style.PNG_DPI))
    xs, ys = raster.pixel_centres(window, w, h)
    return raster.draw_image(ax, raster.grid_cells(view.grid, xs, ys), values, window, **kwargs)


def sample_window(
    view: AnyGeometryView, window: Window, most: int
) -> tuple[np.ndarray, np.ndarray]:
    """A uniform lattice (x (cols,), y (rows,), m) over ``window`` with ``most`` points
    across its longer side."""
    x0, y0, x1, y1 = window
    if x1 - x0 >= y1 - y0:
        nx, ny = most, max(8, round(most * (y1 - y0) / (x1 - x0)))
    else:
        nx, ny = max(8, round(most * (x1 - x0) / (y1 - y0))), most
    return np.linspace(x0, x1, nx), np.linspace(y0, y1, ny)


def _edges(mat: np.ndarray, x: np.ndarray, y: np.ndarray, pick: str) -> np.ndarray:
    """Grid-line segments (k, 2, 2) between cells of different material (``pick`` =
    "interface": both sides in the body; "outline": one side outside it)."""
    mp = np.pad(mat, 1, constant_values=-1)
    segs = []
    # vertical lines x[i] between columns i-1 and i, rows j
    a, b = mp[1:-1, :-1], mp[1:-1, 1:]
    sel = (a != b) & (((a >= 0) & (b >= 0)) if pick == "interface" else ((a < 0) ^ (b < 0)))
    j, i = np.nonzero(sel)
    segs.append(np.stack([np.column_stack([x[i], y[j]]), np.column_stack([x[i], y[j + 1]])], 1))
    a, b = mp[:-1, 1:-1], mp[1:, 1:-1]
    sel = (a != b) & (((a >= 0) & (b >= 0)) if pick == "interface" else ((a < 0) ^ (b < 0)))
    j, i = np.nonzero(sel)
    segs.append(np.stack([np.column_stack([x[i], y[j]]), np.column_stack([x[i + 1], y[j]])], 1))
    return np.concatenate(segs)


def cell_edges(view: GeometryView, step: int = 1) -> np.ndarray:
    """Every grid-line segment (k, 2, 2) that bounds at least one cell of the body, joined
    into long runs; with ``step`` > 1 only those on every ``step``-th grid line (counted
    from the first) in each direction."""
    act = view.grid.cell_index >= 0
    ap = np.pad(act, 1)
    x, y = view.grid.x, view.grid.y
    j, i = np.nonzero(ap[1:-1, :-1] | ap[1:-1, 1:])
    j, i = j[i % step == 0], i[i % step == 0]
    vert = np.stack([np.column_stack([x[i], y[j]]), np.column_stack([x[i], y[j + 1]])], 1)
    j, i = np.nonzero(ap[:-1, 1:-1] | ap[1:, 1:-1])
    j, i = j[j % step == 0], i[j % step == 0]
    hor = np.stack([np.column_stack([x[i], y[j]]), np.column_stack([x[i + 1], y[j]])], 1)
    return merge_segments(np.concatenate([vert, hor]))


def merge_segments(segs: np.ndarray) -> np.ndarray:
    """Join axis-aligned segments (k, 2, 2) that continue each other on one line into
    longer ones (fewer, cleaner strokes); other segments are returned unchanged."""
    if segs.shape[0] == 0:
        return segs
    out = []
    span = max(float(np.ptp(segs[..., 0])), float(np.ptp(segs[..., 1])), 1.0)
    tol = 1e-9 * span
    horizontal = np.abs(segs[:, 0, 1] - segs[:, 1, 1]) <= tol
    vertical = ~horizontal & (np.abs(segs[:, 0, 0] - segs[:, 1, 0]) <= tol)
    for sel, a in ((horizontal, 0), (vertical, 1)):
        s = segs[sel]
        if s.shape[0] == 0:
            continue
        b = 1 - a
        lo = np.minimum(s[:, 0, a], s[:, 1, a])
        hi = np.maximum(s[:, 0, a], s[:, 1, a])
        line = s[:, 0, b]
        order = np.lexsort((lo, line))
        lo, hi, line = lo[order], hi[order], line[order]
        start = np.ones(lo.size, dtype=bool)
        start[1:] = (np.abs(line[1:] - line[:-1]) > tol) | (lo[1:] > hi[:-1] + tol)
        group = np.cumsum(start) - 1
        first = np.flatnonzero(start)
        g_lo = lo[first]
        g_hi = np.maximum.reduceat(hi, first)
        g_line = line[first]
        merged = np.empty((first.size, 2, 2))
        merged[:, 0, a], merged[:, 1, a] = g_lo, g_hi
        merged[:, 0, b] = merged[:, 1, b] = g_line
        out.append(merged)
        del group
    out.append(segs[~horizontal & ~vertical])
    return np.concatenate(out)


def draw_outlines(ax: Axes, view: AnyGeometryView, *, colour: str = style.OUTLINE_COLOUR) -> None:
    """Thin lines on material interfaces and a slightly heavier outline of the body."""
    from matplotlib.collections import LineCollection

    if isinstance(view, TriangleGeometryView):  # edges between materials, found once
        inner_t = list(merge_segments(view.shape.interfaces))
        ax.add_collection(LineCollection(inner_t, colors=colour, linewidths=0.35, alpha=0.8))
        outer_t = list(merge_segments(view.face_ends))
        ax.add_collection(LineCollection(outer_t, colors=colour, linewidths=0.7))
        return

    mat = view.grid_values(view.material).filled(-1)
    x, y = view.grid.x, view.grid.y
    inner = merge_segments(_edges(mat, x, y, "interface"))
    outer = merge_segments(_edges(mat, x, y, "outline"))
    ax.add_collection(LineCollection(list(inner), colors=colour, linewidths=0.35, alpha=0.8))
    ax.add_collection(LineCollection(list(outer), colors=colour, linewidths=0.7))


def draw_boundaries(
    ax: Axes,
    view: AnyGeometryView,
    *,
    width: float = 2.6,
    labels: Sequence[str] | None = None,
    adiabatic_label: str = "adiabatic (cut-off)",
) -> list:
    """Boundary faces as coloured edge lines; returns legend handles (named boundaries, then
    adiabatic faces if any), labelled by the boundary names or by ``labels`` (one per
    boundary, in the order of ``view.boundary_names``)."""
    from matplotlib.collections import LineCollection
    from matplotlib.lines import Line2D

    handles = []
    for k, name in enumerate(view.boundary_names):
        sel = view.face_boundary == k
        if not sel.any():
            continue
        colour = style.BOUNDARY_COLOURS[k % len(style.BOUNDARY_COLOURS)]
        ax.add_collection(
            LineCollection(
                list(merge_segments(view.face_ends[sel])),
                colors=colour,
                linewidths=width,
                capstyle="projecting",
                zorder=4,
            )
        )
        label = name if labels is None else labels[k]
        handles.append(Line2D([], [], color=colour, lw=width, label=label))
    if (view.face_boundary < 0).any():
        ax.add_collection(
            LineCollection(
                list(merge_segments(view.face_ends[view.face_boundary < 0])),
                colors=style.ADIABATIC_COLOUR,
                linewidths=width * 0.5,
                linestyles=(0, (2, 1.5)),
                zorder=4,
            )
        )
        handles.append(
            Line2D(
                [],
                [],
                color=style.ADIABATIC_COLOUR,
                lw=width * 0.5,
                ls=(0, (2, 1.5)),
                label=adiabatic_label,
            )
        )
    return handles


def isotherm_levels(lo: float, hi: float, n: int = 10) -> np.ndarray:
    """Round isotherm temperatures (°C) strictly between ``lo`` and ``hi``: steps of
    1, 2, 2.5 or 5 × 10^k giving about ``n`` lines."""
    from matplotlib.ticker import MaxNLocator

    if not hi > lo:
        return np.array([])
    levels = np.asarray(MaxNLocator(nbins=n, steps=[1, 2, 2.5, 5, 10]).tick_values(lo, hi))
    return levels[(levels > lo) & (levels < hi)]


def draw_isotherms(
    ax: Axes,
    view: AnyGeometryView,
    values: np.ndarray,
    levels: np.ndarray,
    *,
    cmap: str | Colormap | None = None,
    norm: Normalize | None = None,
    labels: bool = True,
    window: Window | None = None,
) -> ContourSet | None:
    """Isotherms through the cell centres (on a grid of more than
    ``raster.CONTOUR_SAMPLES`` columns or rows: through a bilinear sample of that many
    points across ``window``), optionally labelled. With ``cmap`` and ``norm`` each line is
    dark over light colours and light over dark ones. On a triangle view: through the node
    values, linear in each triangle (above ``raster.RASTER_CELLS`` triangles through a
    sample of ``raster.CONTOUR_SAMPLES`` points across ``window``)."""
    if levels.size == 0:
        return None
    colours = ["#161616"] * levels.size
    if cmap is not None and norm is not None:
        from matplotlib import colormaps

        rgb = (
            colormaps[cmap](norm(levels))[:, :3]
            if isinstance(cmap, str)
            else cmap(norm(levels))[:, :3]
        )
        luminance = rgb @ np.array([0.2126, 0.7152, 0.0722])
        colours = ["#161616" if v > 0.45 else "#f4f4f4" for v in luminance]
    opts: dict[str, Any] = {"levels": levels, "colors": colours, "linewidths": 0.6, "zorder": 3}
    cs: ContourSet
    if isinstance(view, TriangleGeometryView):
        if view.n_triangles <= raster.RASTER_CELLS:
            cs = ax.tricontour(view.shape.triangulation, values, **opts)
        else:
            xs, ys = sample_window(view, window or window_of(view), raster.CONTOUR_SAMPLES)
            gx, gy = np.meshgrid(xs, ys)
            cs = ax.contour(xs, ys, view.shape.interpolate(values, gx, gy), **opts)
    else:
        g = view.grid
        if max(g.xc.size, g.yc.size) <= raster.CONTOUR_SAMPLES:
            xs, ys, grid_vals = g.xc, g.yc, view.grid_values(values)
        else:  # a fine grid: traced on a uniform sample finer than the lines can show
            xs, ys = sample_window(view, window or window_of(view), raster.CONTOUR_SAMPLES)
            gx, gy = np.meshgrid(xs, ys)
            grid_vals = sample_cells(view, values, gx, gy)
        cs = ax.contour(xs, ys, grid_vals, **opts)
    if labels:
        ax.clabel(cs, fmt=lambda v: f"{v:g}", fontsize=6.2, inline_spacing=2)
    return cs


def nice_length(span: float) -> float:
    """A round length (1, 2 or 5 × 10^k m) of about a fifth of ``span`` (m)."""
    target = 0.2 * span
    k = np.floor(np.log10(target))
    for m in (5.0, 2.0, 1.0):
        if m * 10**k <= target:
            return float(m * 10**k)
    return float(10**k)


def void_fraction(view: AnyGeometryView, x: np.ndarray, y: np.ndarray) -> float:
    """Share of the points (m) that lie outside the body."""
    return float(np.mean(~in_body(view, np.asarray(x, float), np.asarray(y, float))))


def emptiest_corner(view: AnyGeometryView, window: Window) -> tuple[str, float]:
    """The window corner ("lower right", ...) least covered by the body, and the share of
    that corner area outside the body."""
    x0, y0, x1, y1 = window
    f = np.linspace(0.02, 0.25, 8)
    best, where = -1.0, "lower right"
    for name, (ax_, ay) in {
        "lower right": (1, 0),
        "lower left": (0, 0),
        "upper right": (1, 1),
        "upper left": (0, 1),
    }.items():
        fx = f if ax_ == 0 else 1 - f
        fy = f if ay == 0 else 1 - f
        gx, gy = np.meshgrid(x0 + fx * (x1 - x0), y0 + fy * (y1 - y0))
        v = void_fraction(view, gx, gy)
        if v > best + 1e-9:
            best, where = v, name
    return where, best


def add_scale_bar(
    ax: Axes, view: AnyGeometryView, window: Window, *, min_free: float = 0.6
) -> bool:
    """A scale bar of a round length in metres in the emptiest corner of the window, if at
    least ``min_free`` of that corner is outside the body (the axes are in metres anyway).
    Returns whether it was drawn."""
    from matplotlib.font_manager import FontProperties
    from mpl_toolkits.axes_grid1.anchored_artists import AnchoredSizeBar

    corner, free = emptiest_corner(view, window)
    if free < min_free:
        return False
    x0, y0, x1, y1 = window
    length = nice_length(x1 - x0)
    label = f"{length:g} m" if length >= 0.1 else f"{1000 * length:g} mm"
    bar = AnchoredSizeBar(
        ax.transData,
        length,
        label,
        corner,
        pad=0.4,
        borderpad=0.6,
        sep=3,
        frameon=True,
        size_vertical=0.006 * (y1 - y0),
        color="#222222",
        fontproperties=FontProperties(size=7),
    )
    bar.patch.set(facecolor="white", edgecolor="none", alpha=0.85)
    bar.set_zorder(7)
    ax.add_artist(bar)
    return True


def label_position(
    view: AnyGeometryView,
    point: tuple[float, float],
    window: Window,
    box: tuple[float, float],
) -> np.ndarray:
    """Centre (m) of a label box of ``box`` = (width, height) m for ``point`` (m): among
    boxes placed in 12 directions at 4 distances and moved inside the window, the one that
    covers the least of the body and does not cover the point (nearer ones preferred)."""
    x0, y0, x1, y1 = window
    w, h = box
    diag = np.hypot(x1 - x0, y1 - y0)
    ang = np.deg2rad(np.arange(0, 360, 30) + 15)
    dirs = np.column_stack([np.cos(ang), np.sin(ang)])
    radii = np.array([0.08, 0.15, 0.25, 0.4]) * diag
    # box centres pushed out by half the box so its near edge is at the radius
    reach = radii[None, :, None] + 0.5 * np.abs(dirs[:, None, :]) * np.array([w, h])
    centre = np.asarray(point, float) + dirs[:, None, :] * reach  # (12, 4, 2)
    cx = np.clip(centre[..., 0], x0 + 0.5 * w, max(x1 - 0.5 * w, x0 + 0.5 * w))
    cy = np.clip(centre[..., 1], y0 + 0.5 * h, max(y1 - 0.5 * h, y0 + 0.5 * h))
    f = np.linspace(-0.5, 0.5, 5)
    px = cx[..., None, None] + f[:, None] * w
    py = cy[..., None, None] + f[None, :] * h
    px, py = np.broadcast_arrays(px, py)
    free = (~in_body(view, px, py)).mean(axis=(-2, -1))
    covers = (np.abs(cx - point[0]) < 0.5 * w + 0.02 * diag) & (
        np.abs(cy - point[1]) < 0.5 * h + 0.02 * diag
    )
    score = free - 0.06 * np.arange(radii.size)[None, :] - 2.0 * covers
    k, r = np.unravel_index(int(np.argmax(score)), score.shape)
    return np.array([cx[k, r], cy[k, r]])
