"""The geometry preview: the model as the solver will see it, drawn before any solve.

Cells are filled by the material the mesher painted them with (so a layer that lost all its
cells shows as missing), the regions' outlines as typed are drawn over them, every boundary
along the exterior faces the mesher attached to it with its condition in the legend,
adiabatic faces dashed, and the probes, probe lines, flanking-element cuts, the junction's
warm and cold sides and its centre marked. Optionally the grid lines (every k-th one on
fine grids). Coordinates in m.
"""

from __future__ import annotations

import io
import math
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from fvheat.case.model import Case
from fvheat.drawing.polygons import signed_area
from fvheat.errors import CaseError
from fvheat.mesh.geometry import points_in_polygon
from fvheat.mesh.mesh import Mesh
from fvheat.output.files import atomic_write
from fvheat.output.plots import layers, style
from fvheat.output.plots.meshplot import edge_width
from fvheat.output.plots.preview_text import (
    boundary_label,
    material_label,
    ordinal,
)
from fvheat.output.view import GeometryView, geometry_view

if TYPE_CHECKING:
    from matplotlib.figure import Figure

#: the caution every preview carries
PREVIEW_NOTE = "preview: no solve; check geometry, materials and boundary conditions before use"
#: file formats by suffix
FORMATS = {".png": "png", ".svg": "svg"}
ADIABATIC_LABEL = "adiabatic (cut-off plane)"
#: gids of the preview's artists (tests and SVG readers find them by these)
FILL_GID = "preview-materials"
MESH_GID = "preview-mesh"
OUTLINE_GID = "preview-region-outlines"
#: fills of air cavities: pale, cool, apart from the solid materials' colours
CAVITY_COLOURS = ("#e3eef6", "#cfe2ec", "#dfe2f4", "#cde3df", "#e8f1e2", "#d8daee")
WARM_COLOUR = "#b2182b"
COLD_COLOUR = "#2166ac"
MARK_COLOUR = "#111111"
#: average spacing (pt on the page) below which grid lines are thinned to every k-th one
MIN_LINE_SPACING = 2.5
#: room (in) around the axes for tick labels, axis labels and headings
_SIDE_ROOM, _HEAD_ROOM = 0.8, 1.25


def preview_format(path: str | Path) -> str:
    """The figure format ("png" or "svg") of ``path`` from its suffix. Raises
    :class:`CaseError` naming the file for another suffix, a missing folder, or a path that
    is a folder."""
    path = Path(path)
    fmt = FORMATS.get(path.suffix.lower())
    if fmt is None:
        got = f"{path.suffix!r}" if path.suffix else "no suffix"
        raise CaseError(
            f"a preview is a .png or .svg file (the suffix chooses the format), got {got}",
            file=str(path),
        )
    parent = path.parent
    if not parent.is_dir():
        what = "is a file, not a folder" if parent.exists() else "does not exist"
        raise CaseError(f"the output folder {str(parent)!r} {what}", file=str(path))
    if path.is_dir():
        raise CaseError("is a folder; give a file name ending in .png or .svg", file=str(path))
    return fmt


def write_preview(case: Case, mesh: Mesh, path: str | Path, *, show_mesh: bool = False) -> Path:
    """Draw :func:`preview_figure` and write it to ``path`` (.png or .svg, by the suffix)
    through a temporary file and a rename; nothing is written on failure."""
    path = Path(path)
    fmt = preview_format(path)
    fig = preview_figure(case, mesh, show_mesh=show_mesh)
    buf = io.BytesIO()
    meta = {"Date": None} if fmt == "svg" else {"Software": None}
    with style.style():  # also fixes the SVG's element ids: the same file every time
        fig.savefig(buf, format=fmt, dpi=style.PNG_DPI, metadata=meta)
    try:
        return atomic_write(path, lambda fh: fh.write(buf.getvalue()), binary=True)
    except OSError as err:
        raise CaseError(f"cannot write the preview: {err.strerror or err}", file=str(path)) from err


def preview_figure(case: Case, mesh: Mesh, *, show_mesh: bool = False) -> Figure:
    """The model of ``case`` as meshed in ``mesh`` (a rectilinear grid), before any solve.

    With ``show_mesh`` the grid lines are drawn too: every one, or on fine grids every k-th
    one (said in a note above the plot). Returns a matplotlib Figure (Agg canvas). Raises
    :class:`CaseError` for a mesh without a rectilinear grid (not drawn yet).
    """
    if mesh.triangles is not None:
        from fvheat.output.plots.triangles import mesh_map

        return mesh_map(mesh, case.title)
    if mesh.grid is None:
        raise CaseError(
            "the preview draws rectilinear grids and triangles only", file=str(case.source)
        )
    geom = geometry_view(mesh)
    with style.style():
        window = layers.window_of(geom)
        x0, y0, x1, y1 = window
        fig = style.new_figure(*style.field_size(x1 - x0, y1 - y0, extra_width=0.4))
        fig.set_dpi(style.PNG_DPI)  # text measured for the layout as the PNG draws it
        ax = fig.add_subplot()
        layers.set_window(ax, window)
        # at the top left of its layout box, so the layout sees the labels where they are
        ax.set_anchor("NW")
        material_handles = _draw_materials(ax, case, geom)
        note = _draw_mesh(fig, ax, geom, window) if show_mesh else ""
        outline_handle = _draw_region_outlines(ax, case)
        boundary_handles = _draw_boundaries(ax, case, geom)
        marker_handles = _draw_markers(ax, case)
        _label_sides(ax, case, geom)
        _label_regions(ax, case)
        layers.add_scale_bar(ax, geom, window)
        handles = material_handles + boundary_handles + [outline_handle, *marker_handles]
        _fit_legend(fig, ax, handles, (x1 - x0, y1 - y0))
        caption = " · ".join(t for t in (f"{geom.n_cells} cells", PREVIEW_NOTE, note) if t)
        style.headings(fig, ax, case.title)
        # the caption starts at the axes' left edge: wrapped a little short of the width
        ax.set_title(
            style.wrap(caption, fig, 8.0, share=0.85), fontsize=8.0, fontweight="normal", loc="left"
        )
        _settle(fig, ax)
    return fig


# --- materials -------------------------------------------------------------------------


def material_colours(case: Case, counts: np.ndarray) -> list[str | None]:
    """Fill colour per material of ``case`` (in the order of ``case.materials``): solids
    take the style's material colours, cavities pale cool ones, each in order of use; None
    for a material that paints no cell (``counts``: cells per material)."""
    drawn = [(m, n > 0) for m, n in zip(case.materials.values(), counts, strict=True)]
    n_solid = sum(1 for m, used in drawn if used and not m.cavity)
    n_cavity = sum(1 for m, used in drawn if used and m.cavity)
    # no colour repeats within the figure: cavities never share a solid's colour
    solid_set = style.distinct_colours(n_solid)
    solids = iter(solid_set)
    cavities = iter(style.distinct_colours(n_cavity, first=CAVITY_COLOURS, avoid=solid_set))
    return [None if not used else next(cavities) if m.cavity else next(solids) for m, used in drawn]


def _draw_materials(ax, case: Case, geom: GeometryView) -> list:
    """The painted cells, filled by material; legend handles, one per material."""
    from matplotlib.colors import BoundaryNorm, ListedColormap
    from matplotlib.patches import Patch

    names = geom.material_names
    counts = np.bincount(geom.material, minlength=len(names))
    colours = material_colours(case, counts)
    cmap = ListedColormap([c or "white" for c in colours])
    norm = BoundaryNorm(np.arange(len(names) + 1) - 0.5, len(names))
    quad = layers.draw_cells(ax, geom, geom.material, cmap=cmap, norm=norm)
    quad.set_gid(FILL_GID)
    used = {r.material for r in case.regions}
    handles = []
    for k, name in enumerate(names):
        label = material_label(case.materials[name], int(counts[k]), used=name in used)
        if colours[k] is None:
            patch = Patch(facecolor="none", edgecolor="#777777", lw=0.6, ls="--", label=label)
        else:
            patch = Patch(facecolor=colours[k], edgecolor="#3c3c3c", lw=0.5, label=label)
        handles.append(patch)
    return handles


# --- mesh and typed outlines --------------------------------------------------------------


def mesh_step(geom: GeometryView, axes_inches: tuple[float, float]) -> int:
    """Draw every k-th grid line so that the lines are on average at least
    ``MIN_LINE_SPACING`` pt apart on axes of ``axes_inches`` (width, height)."""
    most_x = max(1.0, 72.0 * axes_inches[0] / MIN_LINE_SPACING)
    most_y = max(1.0, 72.0 * axes_inches[1] / MIN_LINE_SPACING)
    return max(1, math.ceil(max(geom.grid.x.size / most_x, geom.grid.y.size / most_y)))


def _draw_mesh(fig, ax, geom: GeometryView, window: layers.Window) -> str:
    """Grid lines (every k-th on fine grids); returns the note saying what is drawn."""
    from matplotlib.collections import LineCollection

    x0, y0, x1, y1 = window
    step = mesh_step(geom, style.axes_size(x1 - x0, y1 - y0, extra_width=0.4))
    width = min(0.45, edge_width(fig, geom, window) * step)
    lines = LineCollection(
        list(layers.cell_edges(geom, step)), colors="#5a5a5a", linewidths=width, zorder=2
    )
    lines.set_gid(MESH_GID)
    ax.add_collection(lines)
    nx, ny = geom.grid.x.size, geom.grid.y.size
    if step == 1:
        return f"mesh: all {nx} × {ny} grid lines"
    return f"mesh: every {ordinal(step)} of {nx} × {ny} grid lines drawn (too fine to show all)"


def _draw_region_outlines(ax, case: Case):
    """The regions' outlines and holes as typed, thin; returns their legend handle."""
    from matplotlib.collections import LineCollection
    from matplotlib.lines import Line2D

    rings = [np.vstack([ring, ring[:1]]) for r in case.regions for ring in (r.vertices, *r.holes)]
    lines = LineCollection(rings, colors=style.OUTLINE_COLOUR, linewidths=0.45, zorder=3)
    lines.set_gid(OUTLINE_GID)
    ax.add_collection(lines)
    return Line2D(
        [],
        [],
        color=style.OUTLINE_COLOUR,
        lw=0.6,
        label="outlines as typed (fill: the cells as meshed)",
    )


def _label_regions(ax, case: Case) -> None:
    """The name of every named region entry, inside its largest shape."""
    best: dict[str, tuple[float, np.ndarray]] = {}
    for r in case.regions:
        if not r.name:
            continue
        area = abs(signed_area(r.vertices)) - sum(abs(signed_area(h)) for h in r.holes)
        if r.name not in best or area > best[r.name][0]:
            best[r.name] = (area, _label_point(r.vertices, r.holes))
    for name, (_, (x, y)) in best.items():
        ax.text(
            x,
            y,
            name,
            ha="center",
            va="center",
            fontsize=6.5,
            style="italic",
            color="#333333",
            bbox={"boxstyle": "round,pad=0.2", "fc": "white", "ec": "none", "alpha": 0.7},
            zorder=6,
        )


# --- boundaries ----------------------------------------------------------------------------


def _draw_boundaries(ax, case: Case, geom: GeometryView) -> list:
    """Boundaries along their faces and adiabatic faces dashed; legend handles for every
    boundary (those without faces too) and for the adiabatic faces."""
    from matplotlib.lines import Line2D

    counts = np.bincount(
        geom.face_boundary[geom.face_boundary >= 0], minlength=len(case.boundaries)
    )
    labels = [boundary_label(case, b, int(n)) for b, n in zip(case.boundaries, counts, strict=True)]
    drawn = layers.draw_boundaries(ax, geom, labels=labels, adiabatic_label=ADIABATIC_LABEL)
    handles = []
    it = iter(drawn)
    for k, label in enumerate(labels):
        if counts[k] > 0:
            handles.append(next(it))
        else:
            colour = style.BOUNDARY_COLOURS[k % len(style.BOUNDARY_COLOURS)]
            handles.append(Line2D([], [], color=colour, lw=2.6, ls=":", label=label))
    return handles + list(it)


def _label_sides(ax, case: Case, geom: GeometryView) -> None:
    """ "warm side" and "cold side" just outside the middle of the longest straight run of
    the junction's inside and outside boundaries."""
    j = case.junction
    if j is None:
        return
    names = geom.boundary_names
    for text, sides, colour in (
        ("warm side", j.inside, WARM_COLOUR),
        ("cold side", j.outside, COLD_COLOUR),
    ):
        ids = [names.index(n) for n in sides if n in names]
        sel = np.isin(geom.face_boundary, ids)
        if not sel.any():
            continue
        runs = layers.merge_segments(geom.face_ends[sel])
        lengths = np.hypot(*(runs[:, 1] - runs[:, 0]).T)
        a, b = runs[int(np.argmax(lengths))]
        mid, out = 0.5 * (a + b), _outward(geom, a, b)
        horizontal = abs(out[0]) >= abs(out[1])
        ax.annotate(
            text,
            (float(mid[0]), float(mid[1])),
            xytext=(5.0 * out[0], 5.0 * out[1]),
            textcoords="offset points",
            # along a vertical boundary the label runs along it: it needs little room
            # beside a model that fills the width of the page
            rotation=90 if horizontal else 0,
            ha=("left" if out[0] > 0 else "right") if horizontal else "center",
            va="center" if horizontal else ("bottom" if out[1] > 0 else "top"),
            rotation_mode="anchor",
            fontsize=7,
            fontweight="bold",
            color=colour,
            bbox={"boxstyle": "round,pad=0.25", "fc": "white", "ec": colour, "lw": 0.6},
            zorder=7,
            annotation_clip=False,
        )


def _outward(geom: GeometryView, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Unit normal of the exterior segment ``a``–``b`` (m) pointing out of the body."""
    t = (b - a) / float(np.hypot(*(b - a)))
    n = np.array([t[1], -t[0]])
    x0, y0, x1, y1 = geom.extent
    probe = 0.5 * (a + b) + 1e-6 * max(x1 - x0, y1 - y0) * n
    return -n if layers.inside(geom.grid, probe[:1], probe[1:])[0] else n


# --- probes, probe lines, flanking cuts, junction centre -------------------------------


#: how the marks look (line and marker keywords of ``Axes.plot``), and their legend texts
_Style = dict[str, Any]
PROBE_STYLE: _Style = {"ls": "none", "marker": "o", "ms": 3.5, "mfc": "white", "mec": MARK_COLOUR}
PROBE_LINE_STYLE: _Style = {"color": MARK_COLOUR, "lw": 0.9, "ls": (0, (1, 1.2))}
CUT_STYLE: _Style = {"color": MARK_COLOUR, "lw": 1.0, "ls": "-."}
CENTRE_STYLE: _Style = {"ls": "none", "marker": "P", "ms": 6, "mfc": "white", "mec": MARK_COLOUR}
_NAME: _Style = {"fontsize": 6.5, "color": MARK_COLOUR, "zorder": 8, "textcoords": "offset points"}
_NAME_BOX: _Style = {"boxstyle": "round,pad=0.15", "fc": "white", "ec": "none", "alpha": 0.8}


def _draw_markers(ax, case: Case) -> list:
    """Probes, probe lines, flanking-element cuts and the junction centre with their names;
    returns legend handles for the kinds present."""
    from matplotlib.lines import Line2D

    handles = []
    if case.probes:
        pts = np.array([p.at for p in case.probes], float)
        ax.plot(*pts.T, mew=0.8, zorder=8, **PROBE_STYLE)
        for p in case.probes:
            ax.annotate(
                p.name, p.at, xytext=(4, 3), ha="left", va="bottom", bbox=_NAME_BOX, **_NAME
            )
        handles.append(Line2D([], [], label="probe", **PROBE_STYLE))
    for line in case.probe_lines:
        (xa, ya), (xb, yb) = line.start, line.end
        ax.plot([xa, xb], [ya, yb], zorder=7, **PROBE_LINE_STYLE)
        ax.plot([xa], [ya], ls="none", marker="o", ms=2.5, color=MARK_COLOUR, zorder=7)
        _name_along(ax, line.start, line.end, line.name, below=True)
    if case.probe_lines:
        label = "probe line (dot: its start, where the front is measured from)"
        handles.append(Line2D([], [], label=label, **PROBE_LINE_STYLE))
    cuts = [f for f in case.junction.flanking if f.cut is not None] if case.junction else []
    for f in cuts:
        assert f.cut is not None
        (xa, ya), (xb, yb) = f.cut
        ax.plot([xa, xb], [ya, yb], zorder=7, **CUT_STYLE)
        _name_along(ax, f.cut[0], f.cut[1], f.name)
    if cuts:
        label = "flanking-element cut (U from the layers)"
        handles.append(Line2D([], [], label=label, **CUT_STYLE))
    if case.junction is not None and case.junction.centre is not None:
        cx, cy = case.junction.centre
        ax.plot([cx], [cy], mew=0.8, zorder=8, **CENTRE_STYLE)
        handles.append(Line2D([], [], label="junction centre", **CENTRE_STYLE))
    return handles


def _name_along(ax, start, end, name: str, *, below: bool = False) -> None:
    """``name`` above (or ``below``) the middle of the segment ``start``–``end`` (m),
    written along it (equal aspect: the angle on the page is the angle in the model)."""
    (xa, ya), (xb, yb) = start, end
    angle = float(np.degrees(np.arctan2(yb - ya, xb - xa)))
    angle = angle - 180.0 if angle > 90.0 else angle + 180.0 if angle <= -90.0 else angle
    up = np.radians(angle + (-90.0 if below else 90.0))
    ax.annotate(
        name,
        (0.5 * (xa + xb), 0.5 * (ya + yb)),
        xytext=(2.5 * np.cos(up), 2.5 * np.sin(up)),
        rotation=angle,
        rotation_mode="anchor",
        ha="center",
        va="top" if below else "bottom",
        bbox=_NAME_BOX,
        **_NAME,
    )


# --- layout --------------------------------------------------------------------------------


def _fit_legend(fig, ax, handles: list, span: tuple[float, float]) -> None:
    """Put the legend to the right of a tall, narrow model and below a wide one (whichever
    leaves the larger drawing) and size the figure to the A4 text width around both."""
    leg_w, leg_h = _legend_inches(fig, handles, 1)
    dx, dy = span
    room_x = style.PAGE_WIDTH - _SIDE_ROOM
    below = min(room_x / dx, style.MAX_AXES_HEIGHT / dy)
    right = min((room_x - leg_w - 0.2) / dx, style.MAX_AXES_HEIGHT / dy)
    if right > 0 and right >= 0.65 * below:
        width = min(style.PAGE_WIDTH, right * dx + _SIDE_ROOM + leg_w + 0.2)
        fig.set_size_inches(max(width, 3.6), max(right * dy, leg_h) + _HEAD_ROOM)
        ax.legend(
            handles=handles,
            loc="upper left",
            bbox_to_anchor=(1.04, 1.0),
            borderaxespad=0.0,
            **_LEGEND,
        )
        return
    ncols = max(1, min(3, len(handles), int((style.PAGE_WIDTH - 0.2) // leg_w)))
    w_c, h_c = _legend_inches(fig, handles, ncols)
    while w_c > style.PAGE_WIDTH - 0.1 and ncols > 1:
        ncols -= 1
        w_c, h_c = _legend_inches(fig, handles, ncols)
    width = min(style.PAGE_WIDTH, max(below * dx + _SIDE_ROOM, w_c + 0.2, 3.6))
    fig.set_size_inches(width, below * dy + _HEAD_ROOM + h_c)
    fig.legend(handles=handles, loc="outside lower center", ncols=ncols, **_LEGEND)


_LEGEND = {
    "frameon": False,
    "title": "materials, boundaries and marks",
    "title_fontsize": 7.5,
    "alignment": "left",
    "handlelength": 2.2,
}


def _settle(fig, ax) -> None:
    """Lay the figure out and adjust its size: widen it (up to the A4 text width) when its
    contents run past its edges (narrow it when a legend beside the axes ends short of
    the edge), and drop the height the equal-aspect axes leave empty.

    The layout measures titles and labels from the axes' layout box, which is taller than
    the drawn axes when the width limits them; so the true margins are measured once with
    the height too small (axes limited by height, box = axes) and the height set to the
    drawn axes plus those margins.
    """
    fig.canvas.draw()
    width, height = fig.get_size_inches()
    box = fig.get_tightbbox(fig.canvas.get_renderer())
    over = max(0.0, box.x1 - width) + max(0.0, -box.x0)
    if over > 0.01:
        width = min(style.PAGE_WIDTH, width + over + 0.1)
    elif ax.get_legend() is not None and box.x1 < width - 0.15:
        width = box.x1 + 0.1  # legend beside the axes: nothing to the right of it
    if width != fig.get_figwidth():
        fig.set_size_inches(width, height)
        fig.canvas.draw()
    drawn = ax.get_position().height * height
    spare = ax.get_position(original=True).height * height - drawn
    if spare <= 0.05:
        return
    probe = max(height - spare - 0.25, 0.5 * height)
    fig.set_size_inches(width, probe)
    fig.canvas.draw()
    margins = probe - ax.get_position(original=True).height * probe
    # a little slack keeps the axes limited by the width (a box taller than the axes)
    fig.set_size_inches(width, drawn + margins + 0.1)


def _legend_inches(fig, handles: list, ncols: int) -> tuple[float, float]:
    """Width and height (in) of the legend in ``ncols`` columns."""
    leg = fig.legend(handles=handles, ncols=ncols, **_LEGEND)
    box = leg.get_window_extent(fig.canvas.get_renderer())
    leg.remove()
    return box.width / fig.dpi, box.height / fig.dpi


def _label_point(vertices: np.ndarray, holes: tuple[np.ndarray, ...]) -> np.ndarray:
    """A point (m) well inside the polygon ``vertices`` minus ``holes``: of a 24 × 24
    sample of its bounding box, the inside point farthest from every edge."""
    lo, hi = vertices.min(axis=0), vertices.max(axis=0)
    f = (np.arange(24) + 0.5) / 24
    px, py = np.meshgrid(lo[0] + f * (hi[0] - lo[0]), lo[1] + f * (hi[1] - lo[1]))
    px, py = px.ravel(), py.ravel()
    ok = points_in_polygon(px, py, vertices)
    for h in holes:
        ok &= ~points_in_polygon(px, py, h)
    if not ok.any():
        return vertices.mean(axis=0)
    px, py = px[ok], py[ok]
    a = np.concatenate([vertices, *holes])
    b = np.concatenate([np.roll(vertices, -1, axis=0), *(np.roll(h, -1, axis=0) for h in holes)])
    d = b - a
    rel = np.stack([px, py], axis=1)[:, None, :] - a[None]
    u = np.clip(np.einsum("pek,ek->pe", rel, d) / np.einsum("ek,ek->e", d, d), 0.0, 1.0)
    dist = np.hypot(*(rel - u[..., None] * d[None]).transpose(2, 0, 1)).min(axis=1)
    k = int(np.argmax(dist))
    return np.array([px[k], py[k]])
