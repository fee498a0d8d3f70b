"""Output details a reviewer trips on: figure captions claim only what applies to the
figure, the junction table reads left to right, material colours never repeat within a
figure, frost fronts are not joined across a jump, and `fvheat materials` fits 80 columns
without cutting a name."""

from __future__ import annotations

import json

import numpy as np
from matplotlib.colors import to_hex

from fvheat.case.load import load_case
from fvheat.cli.materials_command import library_text
from fvheat.output.plots import style
from fvheat.output.plots.meshplot import mesh_figure
from fvheat.output.plots.preview import material_colours
from fvheat.output.plots.transient import front_figure, with_gaps
from fvheat.properties.library import library

from .conftest import CASES, RANGE


def test_colour_range_is_claimed_only_by_temperature_maps(steady_results):
    """steady_results was redrawn with `fvheat plot --range 0 20 --zoom ...`."""
    index = {
        e["name"]: e["caption"]
        for e in json.loads((steady_results / "figures" / "figures.json").read_text())
    }
    claim = f"Colour range fixed at {RANGE[0]} to {RANGE[1]} °C."
    assert claim in index["temperature"]
    for name in ("heat_flux", "mesh"):
        assert "Colour range" not in index[name] and "Window x" in index[name]


def test_junction_values_are_not_right_aligned(steady_results):
    html = (steady_results / "report.html").read_text(encoding="utf-8")
    junction = html[html.index('id="junction"') :]
    junction = junction[: junction.index("<h", 10)]
    assert "<td>ψ, internal dimensions" in junction and 'class="n"' not in junction


def test_distinct_colours_never_repeat():
    for n in (1, 10, 11, 60, 150):
        colours = style.distinct_colours(n)
        assert len(colours) == n == len(set(colours))
    avoid = style.distinct_colours(12)
    more = style.distinct_colours(30, first=avoid[:3], avoid=avoid)
    assert not set(more) & set(avoid)


def window_case():
    (path,) = [c for c in CASES if c.stem == "window_frame_section"]
    return load_case(path)


def test_window_frame_figures_give_every_material_its_own_colour():
    """The frame section has more materials (cavities included) than the base palette."""
    from fvheat.mesh.rectilinear import build_mesh
    from fvheat.output.view import geometry_view

    case = window_case()
    assert len(case.materials) > len(style.MATERIAL_COLOURS)
    colours = [c for c in material_colours(case, np.ones(len(case.materials), int)) if c]
    assert len(colours) == len(set(colours)) == len(case.materials)
    mesh = build_mesh(case)
    fig = mesh_figure(geometry_view(mesh))
    patches = [h for h in fig.legends[0].legend_handles if hasattr(h, "get_facecolor")]
    fills = [to_hex(p.get_facecolor()) for p in patches if p.get_label() in mesh.material_names]
    assert len(fills) == len(set(fills)) >= len(style.MATERIAL_COLOURS) + 1


def test_a_front_that_jumps_is_not_joined():
    t = np.arange(6) * 3600.0
    depth = np.array([0.1, 0.2, 0.3, 0.4, 0.02, 0.03])  # thaw: the first crossing jumps up
    tg, vg = with_gaps(t, depth)
    assert np.isnan(vg[4]) and np.isnan(tg[4]) and vg.size == depth.size + 1
    assert not np.isnan(with_gaps(t, np.linspace(0, 0.5, 6))[1]).any()  # steady motion
    fig = front_figure(t, {"front_a": depth}, None)
    (line,) = fig.axes[0].get_lines()
    assert np.isnan(line.get_ydata()).sum() == 1


def test_materials_list_fits_80_columns_and_keeps_names_whole():
    text = library_text(80)
    lines = text.splitlines()
    assert max(len(line) for line in lines) <= 80
    starts = {line.split()[0] for line in lines if line and not line.startswith(" ")}
    assert set(library()) <= starts
