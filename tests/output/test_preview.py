"""The geometry preview (``fvheat check CASE --plot FILE``): the model as the mesher painted it,
drawn before any solve.

What the figures are checked against: the case file (names, conductivities, conditions as
typed), the mesh the preview is drawn from (painted materials, boundary faces, grid lines),
and the project's page format (``style.PAGE_WIDTH`` at ``style.PNG_DPI``). Texts are read
back from the written SVG, where matplotlib stores every string as an XML comment ahead of
its glyph outlines.
"""

from __future__ import annotations

import functools
import html
import math
import re
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from casefiles import load, write_case
from matplotlib.collections import LineCollection, QuadMesh
from matplotlib.image import imread

from fvheat.case.load import load_case
from fvheat.errors import CaseError
from fvheat.mesh.rectilinear import build_mesh
from fvheat.output.plots import preview, preview_text, style
from fvheat.output.view import geometry_view

from .conftest import CASES


@functools.cache
def demo(case_file: Path):
    case = load_case(case_file)
    return case, build_mesh(case)


def svg_texts(path: Path) -> list[str]:
    """Every string drawn in an SVG written by matplotlib (text as paths: each string is
    kept as a comment; text as text: in <text> elements)."""
    svg = path.read_text(encoding="utf-8")
    found = re.findall(r"<!-- (.*?) -->", svg, flags=re.S)
    found += re.findall(r"<text[^>]*>(.*?)</text>", svg, flags=re.S)
    return [html.unescape(t) for t in found]


def by_gid(fig, gid: str) -> list:
    return fig.findobj(lambda a: a.get_gid() == gid)


def legend_texts(fig) -> list[str]:
    legends = fig.legends + [ax.get_legend() for ax in fig.axes if ax.get_legend()]
    return [t.get_text() for leg in legends for t in leg.get_texts()]


@pytest.mark.parametrize("case_file", CASES, ids=[c.stem for c in CASES])
def test_every_demo_case_previews_as_png_and_svg(case_file, tmp_path):
    case, mesh = demo(case_file)

    png = preview.write_preview(case, mesh, tmp_path / "model.png")
    img = imread(png)[..., :3]
    # fits the text width of an A4 page at the project's PNG resolution, so never shrunk
    assert img.shape[1] <= round(style.PAGE_WIDTH * style.PNG_DPI)
    # a drawing, not a blank canvas: many non-white pixels of several colours
    assert (img.min(axis=-1) < 0.9).mean() > 0.05
    assert img.std() > 0.1

    texts = svg_texts(preview.write_preview(case, mesh, tmp_path / "model.svg"))
    joined = " ".join(texts)
    for b in case.boundaries:
        assert any(t.startswith(f"{b.name}: ") for t in texts), b.name
    for name, material in case.materials.items():
        label = next(t for t in texts if t.startswith(f"{name}: "))
        assert "λ" in label and f"{material.conductivity:.4g}" in label
    assert ("adiabatic" in joined) == bool((mesh.b_boundary < 0).any())
    for p in case.probes:
        assert p.name in texts
    for line in case.probe_lines:
        assert line.name in texts
    for f in case.junction.flanking if case.junction else ():
        assert f.cut is None or f.name in texts
    assert f"{mesh.n_cells} cells" in joined
    assert "preview: no solve" in joined and "boundary conditions before use" in joined


def test_the_demo_cases_have_adiabatic_faces_probes_and_junctions():
    """The demo loop above covers the branches it claims to (so its checks can fail)."""
    meshes = [demo(c) for c in CASES]
    assert any((m.b_boundary < 0).any() for _, m in meshes)
    assert any(c.probes for c, _ in meshes)
    assert any(c.probe_lines for c, _ in meshes)
    assert any(c.junction and any(f.cut for f in c.junction.flanking) for c, _ in meshes)


WALL = """
title = "test wall"
[mesh]
max_cell = 0.05
min_cell = 0.05
[materials.brick]
conductivity = 0.6
[[regions]]
material = "brick"
box = [0.0, 0.0, 0.2, 0.2]
[[boundaries]]
name = "room"
edges = [[[0.0, 0.0], [0.0, 0.2]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "sky"
edges = [[[0.2, 0.0], [0.2, 0.2]]]
air_temperature = -5.0
convection = 8.0
emissivity = 0.9
radiant_temperature = -10.0
[[probes]]
name = "mid_wall"
at = [0.1, 0.1]
"""


def test_every_painted_cell_is_filled_with_its_material(tmp_path):
    case = load(tmp_path, WALL)
    mesh = build_mesh(case)
    fig = preview.preview_figure(case, mesh)
    (quad,) = by_gid(fig, preview.FILL_GID)
    assert isinstance(quad, QuadMesh)
    painted = geometry_view(mesh).grid_values(mesh.material)
    drawn = quad.get_array()
    assert drawn.count() == mesh.n_cells == 16  # 4 × 4 cells of 50 mm
    np.testing.assert_array_equal(np.ma.getmaskarray(drawn).ravel(), painted.mask.ravel())


def test_fill_colours_match_the_legend_swatches(tmp_path):
    """The pixels inside each material's cells have the colour of its legend swatch."""
    text = WALL.replace("box = [0.0, 0.0, 0.2, 0.2]", "box = [0.0, 0.0, 0.1, 0.2]") + (
        '[materials.wool]\nconductivity = 0.035\n[[regions]]\nmaterial = "wool"\n'
        "box = [0.1, 0.0, 0.2, 0.2]\n"
    )
    case = load(tmp_path, text)
    fig = preview.preview_figure(case, build_mesh(case))
    fig.canvas.draw()
    img = np.asarray(fig.canvas.buffer_rgba())[..., :3] / 255.0
    leg = (fig.legends + [ax.get_legend() for ax in fig.axes if ax.get_legend()])[0]
    pairs = zip(leg.legend_handles, leg.get_texts(), strict=True)
    swatch = {t.get_text().split(":")[0]: h for h, t in pairs}
    ax = fig.axes[0]
    for name, point in (("brick", (0.05, 0.04)), ("wool", (0.15, 0.04))):
        px, py = ax.transData.transform(point)
        pixel = img[img.shape[0] - round(float(py)), round(float(px))]
        np.testing.assert_allclose(pixel, swatch[name].get_facecolor()[:3], atol=2 / 255)
    assert not np.allclose(swatch["brick"].get_facecolor(), swatch["wool"].get_facecolor())


def test_mesh_lines_are_the_grid_lines_and_only_on_request(tmp_path):
    case = load(tmp_path, WALL)
    mesh = build_mesh(case)
    assert not by_gid(preview.preview_figure(case, mesh), preview.MESH_GID)

    fig = preview.preview_figure(case, mesh, show_mesh=True)
    (lines,) = by_gid(fig, preview.MESH_GID)
    segs = np.asarray(lines.get_segments())
    # a 0.2 m square of 50 mm cells: five vertical and five horizontal lines, each one run
    grid = np.linspace(0.0, 0.2, 5)
    vertical = np.isclose(segs[:, 0, 0], segs[:, 1, 0])
    np.testing.assert_allclose(np.sort(segs[vertical, 0, 0]), grid, atol=1e-12)
    np.testing.assert_allclose(np.sort(segs[~vertical, 0, 1]), grid, atol=1e-12)
    assert segs.shape[0] == 10
    assert "mesh: all 5 × 5 grid lines" in fig.axes[0].get_title(loc="left").replace("\n", " ")

    out = preview.write_preview(case, mesh, tmp_path / "mesh.svg", show_mesh=True)
    assert f'id="{preview.MESH_GID}"' in out.read_text(encoding="utf-8")


def test_fine_grids_draw_every_kth_line_and_say_so(tmp_path):
    case = load(tmp_path, WALL, ["mesh.max_cell=0.0005", "mesh.min_cell=0.0005"])
    mesh = build_mesh(case)
    geom = geometry_view(mesh)
    n = geom.grid.x.size  # 401 lines each way
    fig = preview.preview_figure(case, mesh, show_mesh=True)
    (lines,) = by_gid(fig, preview.MESH_GID)
    segs = np.asarray(lines.get_segments())
    vertical = np.isclose(segs[:, 0, 0], segs[:, 1, 0])
    xs = np.unique(segs[vertical, 0, 0])
    step = round(float((xs[1] - xs[0]) / np.diff(geom.grid.x)[0]))
    assert step > 1
    assert xs.size == math.ceil(n / step)
    np.testing.assert_allclose(xs, geom.grid.x[::step], atol=1e-12)
    caption = fig.axes[0].get_title(loc="left").replace("\n", " ")
    assert f"of {n} × {n} grid lines drawn (too fine to show all)" in caption


def test_boundary_conditions_in_words(tmp_path):
    """The legend repeats the case file's values (the source), with units."""
    case = load(
        tmp_path,
        WALL
        + """
[[boundaries]]
name = "ground"
edges = [[[0.0, 0.0], [0.2, 0.0]]]
temperature = 10.0
[[boundaries]]
name = "sun"
edges = [[[0.0, 0.2], [0.1, 0.2]]]
heat_flux = 15.0
[[boundaries]]
name = "cycle"
edges = [[[0.1, 0.2], [0.2, 0.2]]]
air_temperature = { mean = 4.0, amplitude = 7.0, period = 86400, phase = 54000 }
resistance = 0.04
heat_flux = 2.5
""",
    )
    words = {b.name: preview_text.boundary_condition(b) for b in case.boundaries}
    assert words == {
        "room": "20 °C, R = 0.13 m²K/W",
        "sky": "−5 °C, h_c = 8 W/(m²K), ε 0.9 → −10 °C",
        "ground": "fixed 10 °C",
        "sun": "q = 15 W/m²",
        "cycle": "4 ± 7 °C, period 24 h, peak at 15 h, R = 0.04 m²K/W, q = 2.5 W/m²",
    }


def test_boundary_from_a_csv_column_is_named_by_file_and_column(tmp_path):
    (tmp_path / "weather.csv").write_text("time_s,t_out\n0,-2\n3600,-4\n", encoding="utf-8")
    case = load(
        tmp_path,
        WALL.replace(
            "air_temperature = -5.0", 'air_temperature = { file = "weather.csv", column = "t_out" }'
        ),
    )
    assert preview_text.boundary_condition(case.boundary("sky")).startswith(
        "t_out from weather.csv (°C), h_c = 8"
    )


def test_boundary_faces_are_drawn_where_the_mesher_attached_them(tmp_path):
    case = load(tmp_path, WALL)
    mesh = build_mesh(case)
    fig = preview.preview_figure(case, mesh)
    colour = style.BOUNDARY_COLOURS[0]  # "room", the first boundary: the face x = 0
    from matplotlib.colors import to_rgba

    (room,) = [
        c
        for c in fig.axes[0].collections
        if isinstance(c, LineCollection)
        and np.allclose(c.get_colors()[0], to_rgba(colour))
        and c.get_gid() is None
    ]
    np.testing.assert_allclose(np.asarray(room.get_segments()), [[[0.0, 0.0], [0.0, 0.2]]])
    labels = legend_texts(fig)
    assert "room: 20 °C, R = 0.13 m²K/W" in labels
    assert preview.ADIABATIC_LABEL in labels  # top and bottom faces are on no boundary


def test_a_boundary_whose_faces_another_claims_is_refused(tmp_path):
    """Two boundaries on one face cannot be drawn (nor solved): meshing refuses it."""
    later = '[[boundaries]]\nname = "room_again"\nedges = [[[0.0, 0.0], [0.0, 0.2]]]\n'
    case = load(tmp_path, WALL + later + "temperature = 18.0\n")
    with pytest.raises(CaseError, match="'room_again' and boundary 'room' both claim"):
        build_mesh(case)


def test_a_mesh_without_grid_is_refused_in_one_line(tmp_path):
    case = load(tmp_path, WALL)
    mesh = replace(build_mesh(case), grid=None)
    with pytest.raises(CaseError, match="rectilinear grids and triangles only"):
        preview.preview_figure(case, mesh)


JUNCTION = (
    # a layer cut needs surface resistances at its ends (no radiation)
    WALL.replace(
        "convection = 8.0\nemissivity = 0.9\nradiant_temperature = -10.0", "resistance = 0.04"
    )
    + """
[junction]
inside = ["room"]
outside = ["sky"]
centre = [0.1, 0.1]
[[junction.flanking]]
name = "plain_wall"
length = 1.0
cut = [[0.0, 0.125], [0.2, 0.125]]
"""
)


def test_junction_sides_centre_and_cut_are_marked(tmp_path):
    case = load(tmp_path, JUNCTION)
    fig = preview.preview_figure(case, build_mesh(case))
    ax = fig.axes[0]
    texts = {t.get_text(): t for t in ax.texts}
    # the side labels sit outside the body next to their boundary: room at x = 0, sky at 0.2
    warm = texts["warm side"]
    cold = texts["cold side"]
    assert warm.xy == pytest.approx((0.0, 0.1)) and warm.get_position()[0] < 0
    assert cold.xy == pytest.approx((0.2, 0.1)) and cold.get_position()[0] > 0
    assert "plain_wall" in texts
    labels = legend_texts(fig)
    assert "room: 20 °C, R = 0.13 m²K/W (warm side)" in labels
    assert any(t.startswith("sky: ") and t.endswith("(cold side)") for t in labels)
    assert "junction centre" in labels
    centre = [ln for ln in ax.get_lines() if ln.get_marker() == "P"]
    assert len(centre) == 1 and (centre[0].get_xdata()[0], centre[0].get_ydata()[0]) == (0.1, 0.1)


THIN = """
title = "vanishing layer"
[mesh]
max_cell = 0.02
min_cell = 0.02
[materials.concrete]
conductivity = 2.3
[materials.membrane]
conductivity = 0.2
[[regions]]
material = "concrete"
box = [0.0, 0.0, 0.4, 0.4]
[[regions]]
material = "membrane"
{layer}
{cover}
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.4]]]
air_temperature = 20.0
resistance = 0.13
"""
#: a 1 mm sloped layer between 20 mm cell centres; a 1 mm flat layer painted over later
SLOPED = ("polygon = [[0.0, 0.1], [0.4, 0.3], [0.4, 0.301], [0.0, 0.101]]", "")
COVERED = (
    "box = [0.0, 0.2, 0.4, 0.201]",
    '[[regions]]\nmaterial = "concrete"\nbox = [0.0, 0.15, 0.4, 0.25]',
)


@pytest.mark.parametrize("layer, cover", [SLOPED, COVERED], ids=["sloped", "covered"])
def test_a_layer_that_paints_no_cells_is_not_drawn_as_filled(tmp_path, layer, cover):
    case = load(tmp_path, THIN.format(layer=layer, cover=cover))
    mesh = build_mesh(case)
    membrane = mesh.material_names.index("membrane")
    assert not (mesh.material == membrane).any()  # the premise: the mesher lost the layer

    fig = preview.preview_figure(case, mesh)
    (quad,) = by_gid(fig, preview.FILL_GID)
    assert membrane not in set(quad.get_array().compressed().tolist())
    legends = fig.legends + [ax.get_legend() for ax in fig.axes if ax.get_legend()]
    ((swatch, text),) = [
        (h, t.get_text())
        for leg in legends
        for h, t in zip(leg.legend_handles, leg.get_texts(), strict=True)
        if t.get_text().startswith("membrane")
    ]
    assert text == "membrane: λ 0.2 W/(m·K) — 0 cells"
    assert swatch.get_facecolor()[3] == 0.0  # an empty swatch: no fill colour stands for it
    # its outline as typed is still drawn, so the difference shows
    (outlines,) = by_gid(fig, preview.OUTLINE_GID)
    typed = case.regions[1].vertices
    assert any(
        s.shape == (typed.shape[0] + 1, 2) and np.allclose(s[:-1], typed)
        for s in outlines.get_segments()
    )


def test_a_material_no_region_uses_is_listed_as_such(tmp_path):
    case = load(tmp_path, WALL + "[materials.spare]\nconductivity = 0.04\n")
    labels = legend_texts(preview.preview_figure(case, build_mesh(case)))
    assert "spare: λ 0.04 W/(m·K) — used by no region" in labels


def test_cavity_materials_show_their_equivalent_conductivity():
    (path,) = [c for c in CASES if c.stem == "window_frame_section"]
    case, mesh = demo(path)
    labels = legend_texts(preview.preview_figure(case, mesh))
    cavities = [n for n, m in case.materials.items() if m.cavity]
    assert cavities
    for name in cavities:
        k = case.materials[name].conductivity
        assert f"{name}: cavity, λ_eq {k:.4g} W/(m·K)" in labels


def test_named_regions_are_labelled_and_holes_outlined(tmp_path):
    """Region names and holes (from drawings) are drawn as typed."""
    case = load(tmp_path, WALL)
    hole = np.array([[0.12, 0.12], [0.18, 0.12], [0.18, 0.18], [0.12, 0.18]])
    case = replace(case, regions=(replace(case.regions[0], name="leaf", holes=(hole,)),))
    fig = preview.preview_figure(case, build_mesh(case))
    (outlines,) = by_gid(fig, preview.OUTLINE_GID)
    rings = outlines.get_segments()
    assert len(rings) == 2
    assert np.allclose(rings[1][:-1], hole) and np.allclose(rings[1][-1], hole[0])
    (label,) = [t for t in fig.axes[0].texts if t.get_text() == "leaf"]
    x, y = label.get_position()
    # in the region, not in its hole
    assert 0 < x < 0.2 and 0 < y < 0.2 and not (0.12 <= x <= 0.18 and 0.12 <= y <= 0.18)


def test_svg_is_the_same_every_time(tmp_path):
    case = load(tmp_path, WALL)
    mesh = build_mesh(case)
    a = preview.write_preview(case, mesh, tmp_path / "a.svg").read_bytes()
    b = preview.write_preview(case, mesh, tmp_path / "b.svg").read_bytes()
    assert a == b


# --- through the command line -----------------------------------------------------------


def fvheat(*args) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "fvheat", *map(str, args)],
        capture_output=True,
        text=True,
        timeout=120,
    )


def test_check_writes_the_preview(tmp_path):
    case = write_case(tmp_path, JUNCTION)
    out = tmp_path / "model.png"
    res = fvheat("check", case, "--plot", out, "--mesh")
    assert res.returncode == 0, res.stderr
    assert out.is_file() and imread(out).shape[1] <= round(style.PAGE_WIDTH * style.PNG_DPI)
    lines = res.stdout.splitlines()
    # the check's own output is unchanged, the preview's path comes last
    assert lines[0] == f"{case}: valid (steady) — test wall"
    assert lines[1].startswith("mesh: kind rectilinear, cells 16, ")
    assert lines[2:4] == ["boundary room: surface, 4 faces", "boundary sky: surface, 4 faces"]
    assert lines[4] == f"preview: {out}"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["case.toml", "model.png"]  # no temp


@pytest.mark.parametrize(
    "target, message",
    [
        ("out.txt", "a preview is a .png or .svg file"),
        ("missing/out.png", "does not exist"),
        ("case.toml/out.png", "is a file, not a folder"),
    ],
)
def test_check_rejects_a_bad_plot_file(tmp_path, target, message):
    case = write_case(tmp_path, WALL)
    before = sorted(tmp_path.rglob("*"))
    res = fvheat("check", case, "--plot", tmp_path / target)
    assert res.returncode == 2
    err = res.stderr.strip()
    assert len(err.splitlines()) == 1 and "Traceback" not in res.stderr
    assert err.startswith("fvheat: error: ") and str(tmp_path / target) in err and message in err
    assert res.stdout == ""  # fails before the check runs
    assert sorted(tmp_path.rglob("*")) == before  # nothing written, no folder made


def test_mesh_without_plot_is_bad_input(tmp_path):
    res = fvheat("check", write_case(tmp_path, WALL), "--mesh")
    assert res.returncode == 2
    assert res.stderr.strip() == (
        "fvheat: error: --mesh: draws the grid into the preview: give --plot FILE.png too"
    )


def test_check_without_plot_prints_only_the_check(tmp_path, capsys):
    from fvheat.cli.main import main

    case = write_case(tmp_path, WALL)
    assert main(["check", str(case)]) == 0
    out = capsys.readouterr().out.splitlines()
    assert len(out) == 4 and out[0] == f"{case}: valid (steady) — test wall"
    assert out[2:] == ["boundary room: surface, 4 faces", "boundary sky: surface, 4 faces"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["case.toml"]
