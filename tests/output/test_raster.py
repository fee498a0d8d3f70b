"""Resampling cells to pixels: the rectilinear lookup against a direct point-in-box count,
and the nearest-centre lookup for general meshes against the rectilinear one (on a uniform
grid a cell is exactly the set of points nearest to its centre)."""

from __future__ import annotations

import re

import numpy as np

from fvheat.mesh.mesh import RectGrid
from fvheat.output.plots.raster import grid_cells, image_size, nearest_cells, pixel_centres


def _grid() -> RectGrid:
    x = np.array([0.0, 0.1, 0.25, 0.3, 0.6])  # graded columns
    y = np.array([0.0, 0.2, 0.4, 0.5])
    index = np.arange(12).reshape(3, 4)
    index[1, 2] = -1  # a hole
    index[index > 6] -= 1
    return RectGrid(x=x, y=y, cell_index=index)


def test_grid_lookup_finds_the_box_holding_each_pixel():
    g = _grid()
    xs, ys = pixel_centres((-0.05, -0.05, 0.65, 0.55), 70, 60)
    got = grid_cells(g, xs, ys)
    px, py = np.meshgrid(xs, ys)
    want = np.full(px.shape, -1)
    for j in range(3):  # written out box by box
        for i in range(4):
            box = (px >= g.x[i]) & (px < g.x[i + 1]) & (py >= g.y[j]) & (py < g.y[j + 1])
            want[box] = g.cell_index[j, i]
    np.testing.assert_array_equal(got, want)


def test_nearest_centre_lookup_agrees_inside_the_body_on_a_uniform_grid():
    h = 0.1
    x, y = np.arange(6) * h, np.arange(4) * h
    index = np.arange(15).reshape(3, 5)
    g = RectGrid(x=x, y=y, cell_index=index)
    rows, cols = np.nonzero(index >= 0)
    centres = np.column_stack([g.xc[cols], g.yc[rows]])[np.argsort(index[rows, cols])]
    radius = np.full(15, 0.5 * h * np.sqrt(2.0))
    xs, ys = pixel_centres((-0.1, -0.1, 0.6, 0.4), 141, 101)  # no pixel on a grid line
    exact = grid_cells(g, xs, ys)
    near = nearest_cells(centres, radius, xs, ys)
    np.testing.assert_array_equal(near[exact >= 0], exact[exact >= 0])
    # outside: blank, or (within a cell's reach of the edge) the nearest edge cell
    px, py = np.meshgrid(xs, ys)
    out = (exact < 0) & (near >= 0)
    gap = np.hypot(
        np.maximum(np.maximum(-px, px - 0.5), 0.0), np.maximum(np.maximum(-py, py - 0.3), 0.0)
    )
    assert (gap[out] <= h).all() and (near[gap > h] == -1).all()


def test_image_keeps_the_window_aspect():
    assert image_size((0.0, 0.0, 2.0, 1.0), (1000, 1000)) == (1000, 500)
    assert image_size((0.0, 0.0, 1.0, 3.0), (1000, 900)) == (300, 900)


FINE_WALL = """
title = "fine wall"
[mesh]
max_cell = 0.004
min_cell = 0.004
[materials.brick]
conductivity = 0.8
[[regions]]
material = "brick"
box = [0.0, 0.0, 1.0, 1.0]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 1.0]]]
air_temperature = 20.0
resistance = 0.13
"""


def test_mesh_figure_of_a_fine_grid_draws_every_kth_line_and_says_so(tmp_path):
    """250 × 250 cells cannot all be outlined on a page: every k-th grid line is drawn
    (on average at least 2.5 pt apart) and the subtitle says which."""
    from casefiles import load
    from matplotlib.collections import LineCollection

    from fvheat.mesh.rectilinear import build_mesh
    from fvheat.output.plots.meshplot import mesh_figure
    from fvheat.output.view import geometry_view

    view = geometry_view(build_mesh(load(tmp_path, FINE_WALL)))
    assert view.n_cells == 250 * 250
    fig = mesh_figure(view)
    subtitle = fig.axes[0].get_title(loc="left").replace("\n", " ")
    found = re.search(
        r"every (\d+)(st|nd|rd|th) grid line drawn \(too fine to show all\)", subtitle
    )
    assert found is not None, subtitle
    k = int(found.group(1))
    assert k >= 2
    # the grid lines: 251 in each direction, every k-th drawn
    (lines,) = [
        c for c in fig.axes[0].collections if isinstance(c, LineCollection) and c.get_gid() is None
    ][:1]
    segs = lines.get_segments()
    xs = {round(float(s[0][0]), 9) for s in segs if abs(s[0][0] - s[1][0]) < 1e-12}
    assert len(xs) == len(range(0, 251, k))


def test_an_image_is_resampled_once_per_file_and_still_drawn(tmp_path):
    """The layout pass before saving skips the image (no resampling for nothing), the
    drawing of each file does not: the PNG shows the image's colours (a skip in the real
    drawing would leave the axes white) and the SVG embeds it."""
    import io

    from matplotlib.colors import Normalize
    from PIL import Image

    from fvheat.output.plots import style
    from fvheat.output.plots.raster import draw_image

    fig = style.new_figure(3.0, 2.0)
    ax = fig.add_subplot()
    cells = np.zeros((40, 60), dtype=np.int64)  # every pixel the one cell
    image = draw_image(
        ax, cells, np.array([0.0]), (0.0, 0.0, 0.6, 0.4), cmap="viridis", norm=Normalize(0, 1)
    )
    fig.colorbar(image, ax=ax)
    calls = []
    make_image = image.make_image

    def counted(*args, **kwargs):
        calls.append(1)
        return make_image(*args, **kwargs)

    image.make_image = counted
    png, svg = style.save(fig, tmp_path / "map")
    assert len(calls) == 2  # one per file, none in the layout pass
    pixels = np.asarray(Image.open(io.BytesIO(png.read_bytes())).convert("RGB"))
    viridis_low = np.array([68, 1, 84])  # viridis at 0 (matplotlib's table)
    assert (np.abs(pixels.astype(int) - viridis_low).sum(axis=2) < 6).sum() > 1000
    assert "<image" in svg.read_text(encoding="utf-8")
