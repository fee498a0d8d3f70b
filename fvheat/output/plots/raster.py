"""Cell values resampled to the pixels of a figure, so that drawing a field costs what the
figure can show, not what the mesh holds.

Up to :data:`RASTER_CELLS` cells a map is drawn cell by cell (``pcolormesh``, exact cell
edges); above, each pixel of the axes takes the value of the cell under its centre and the
map is one image. The lookup is by grid lines on a rectilinear grid (:func:`grid_cells`) and
by the nearest cell centre on any other mesh (:func:`nearest_cells`), so a general
face-array mesh can be drawn the same way.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING, Any, cast

import numpy as np

from fvheat.mesh.mesh import RectGrid

if TYPE_CHECKING:
    from matplotlib.artist import Artist
    from matplotlib.axes import Axes
    from matplotlib.colors import Colormap, Normalize
    from matplotlib.figure import Figure
    from matplotlib.image import AxesImage

#: above this many cells a field map is drawn as an image at the figure's resolution
RASTER_CELLS = 50_000
#: isotherms and heat paths of a large grid are traced on a uniform sample grid of at most
#: this many points across the longer side of the window
CONTOUR_SAMPLES = 500

Window = tuple[float, float, float, float]


def pixel_centres(window: Window, width_px: int, height_px: int) -> tuple[np.ndarray, np.ndarray]:
    """Centres (m) of ``width_px`` × ``height_px`` pixels covering ``window``: x (cols,),
    y (rows,), rows from the bottom up."""
    x0, y0, x1, y1 = window
    xs = x0 + (np.arange(width_px) + 0.5) * (x1 - x0) / width_px
    ys = y0 + (np.arange(height_px) + 0.5) * (y1 - y0) / height_px
    return xs, ys


def grid_cells(grid: RectGrid, xs: np.ndarray, ys: np.ndarray) -> np.ndarray:
    """Index of the cell holding each point of the lattice ``xs`` × ``ys`` (m), shape
    (rows, cols), −1 outside the body. Costs one search per row and column."""
    i = np.searchsorted(grid.x, xs, side="right") - 1
    j = np.searchsorted(grid.y, ys, side="right") - 1
    ok_i = (i >= 0) & (i < grid.x.size - 1)
    ok_j = (j >= 0) & (j < grid.y.size - 1)
    out = np.full((ys.size, xs.size), -1, dtype=np.int64)
    sub = grid.cell_index[np.ix_(j[ok_j], i[ok_i])]
    out[np.ix_(ok_j, ok_i)] = sub
    return out


def nearest_cells(
    centres: np.ndarray, radius: np.ndarray, xs: np.ndarray, ys: np.ndarray
) -> np.ndarray:
    """For any mesh: index of the cell whose centre (``centres`` (n, 2), m) is nearest to
    each point of the lattice ``xs`` × ``ys`` (m), shape (rows, cols); −1 where that
    centre is farther than the cell's ``radius`` (n,), m (e.g. the largest distance from
    its centre to a vertex), i.e. outside the body. Near the edges of cells of very
    different size a pixel may take a neighbour's value; at the figure's resolution that is
    less than a pixel."""
    from scipy.spatial import cKDTree

    gx, gy = np.meshgrid(xs, ys)
    pts = np.column_stack([gx.ravel(), gy.ravel()])
    dist, idx = cKDTree(centres).query(pts, k=1)
    idx = np.where(dist <= radius[idx], idx, -1)
    return idx.reshape(ys.size, xs.size)


def axes_pixels(ax: Axes, dpi: float) -> tuple[int, int]:
    """The size (px) of ``ax`` at ``dpi`` as placed before the layout is computed (the
    layout, run when drawing, shrinks it a little), plus a tenth."""
    fig = cast("Figure", ax.figure)  # fvheat draws on figures, never subfigures
    size = np.asarray(ax.get_position().size) * np.asarray(fig.get_size_inches())
    w, h = size * dpi * 1.1
    return max(2, int(np.ceil(w))), max(2, int(np.ceil(h)))


def image_size(window: Window, most: tuple[int, int]) -> tuple[int, int]:
    """Pixels (width, height) of an image of ``window`` at equal aspect that fits ``most``
    (width, height) px."""
    x0, y0, x1, y1 = window
    s = min(most[0] / (x1 - x0), most[1] / (y1 - y0))
    return max(2, round((x1 - x0) * s)), max(2, round((y1 - y0) * s))


def draw_image(
    ax: Axes,
    cells: np.ndarray,
    values: np.ndarray,
    window: Window,
    *,
    cmap: str | Colormap,
    norm: Normalize,
    **kwargs: Any,
) -> AxesImage:
    """Cell ``values`` at the pixels of the cell-index image ``cells`` (rows bottom up, −1
    blank) as one image over ``window``; returns the AxesImage, which carries ``cmap`` and
    ``norm`` for a colour bar. The cells are coloured once (RGBA bytes), then indexed by
    pixel, so matplotlib only places the image."""
    from matplotlib import colormaps

    cm = colormaps[cmap] if isinstance(cmap, str) else cmap
    colours = cm(norm(values), bytes=True)  # (n, 4) uint8
    rgba = colours[np.maximum(cells, 0)]
    rgba[cells < 0] = 0  # transparent outside the body
    x0, y0, x1, y1 = window
    image = ax.imshow(
        rgba,
        origin="lower",
        extent=(x0, x1, y0, y1),
        interpolation="nearest",
        aspect="auto",
        rasterized=True,
        **kwargs,
    )
    from matplotlib.cm import ScalarMappable

    setattr(image, SCALE_ATTR, ScalarMappable(norm=norm, cmap=cm))  # see colour_scale
    image.draw = _unless_layout_pass(image.draw)  # type: ignore[method-assign,assignment]
    return image


def _unless_layout_pass(draw: Callable[[Any], None]) -> Callable[[Any], None]:
    """``draw`` (an image's), skipped in the pass matplotlib runs with drawing switched off
    before saving a figure with a layout engine: that pass only places the axes (an image
    inside them does not move them) but would resample the whole image for nothing. The
    pass is recognised by the renderer's ``draw_image`` being the no-op matplotlib puts in
    its place (a wrapper of ``RendererBase.draw_image``); otherwise the image is drawn."""
    from matplotlib.backend_bases import RendererBase

    def draw_unless_layout_pass(renderer: Any) -> None:
        disabled = getattr(renderer, "draw_image", None)
        if getattr(disabled, "__wrapped__", None) is RendererBase.draw_image:
            return
        draw(renderer)

    return draw_unless_layout_pass


#: attribute of a drawn image holding the colour scale its pixels were coloured with
SCALE_ATTR = "fvheat_colour_scale"


def colour_scale(artist: Artist) -> Any:
    """What a colour bar of ``artist`` (a QuadMesh or an image of :func:`draw_image`) is
    drawn from: the artist itself, or the scale its pixels were coloured with."""
    return getattr(artist, SCALE_ATTR, artist)
