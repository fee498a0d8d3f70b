"""Figures for every demo case: they render headless, are not blank, fit an A4 page, and the
coldest-point marker is drawn where the solver reported the coldest surface point."""

from __future__ import annotations

import functools
from pathlib import Path

import numpy as np
import pytest

from fvheat.case.load import load_case
from fvheat.output.plots import style
from fvheat.output.plots.heatflux import heat_flux_figure, heat_path_seeds
from fvheat.output.plots.layers import inside
from fvheat.output.plots.meshplot import mesh_figure
from fvheat.output.plots.temperature import COLDEST_GID, coldest_point, temperature_figure
from fvheat.output.plots.transient import flow_figure, probe_figure, snapshot_figure
from fvheat.output.summary import build_summary
from fvheat.output.view import field_view
from fvheat.study import run_study

from .conftest import CASES, coarse_overrides


@functools.cache
def solve(case_file: Path):
    case = load_case(case_file, coarse_overrides(case_file))
    study = run_study(case)
    return study, build_summary(study), field_view(study.solution)


@pytest.fixture(scope="module", params=CASES, ids=[c.stem for c in CASES])
def solved(request):
    return solve(request.param)


def demo(stem: str) -> Path:
    (path,) = [c for c in CASES if c.stem == stem]
    return path


def pixels(fig) -> np.ndarray:
    """RGB pixels (rows top to bottom) of the figure drawn by Agg."""
    fig.canvas.draw()
    return np.asarray(fig.canvas.buffer_rgba())[..., :3].astype(float)


def axes_box(fig, ax, shape) -> tuple[slice, slice]:
    x0, y0, x1, y1 = ax.get_window_extent().extents
    h = shape[0]
    return slice(int(h - y1), int(h - y0)), slice(int(x0), int(x1))


def expected_coldest(study) -> tuple[float, float]:
    """The point the solver reports, taken from the study objects (not the summary)."""
    if study.junction is not None:
        return study.junction.theta_si_min_at
    surfaces = study.solution.surfaces
    name = min(surfaces, key=lambda n: surfaces[n].min_temperature)
    return surfaces[name].min_at


def test_temperature_map_renders_and_marks_the_coldest_point(solved):
    study, summary, view = solved
    marked = coldest_point(summary)
    fig = temperature_figure(view, title=study.solution.case.title, marked=marked)
    ax = fig.axes[0]
    img = pixels(fig)

    # fits the text width of an A4 page, so it is never shrunk; no text below 6 pt
    assert fig.get_figwidth() <= style.PAGE_WIDTH + 1e-9
    sizes = [t.get_fontsize() for t in fig.findobj(lambda a: hasattr(a, "get_fontsize"))]
    assert min(sizes) >= 6.0
    h, w = img.shape[:2]
    assert w == pytest.approx(fig.get_figwidth() * fig.dpi, abs=1)
    assert h == pytest.approx(fig.get_figheight() * fig.dpi, abs=1)

    rows, cols = axes_box(fig, ax, img.shape)
    assert img[rows, cols].std() > 20.0  # a field, not a blank canvas

    # the marker's pixels (its fill colour is used nowhere else) sit on the reported point
    x, y = expected_coldest(study)
    assert (marked.x, marked.y) == pytest.approx((x, y), abs=1e-12)
    (marker,) = [a for a in ax.get_children() if a.get_gid() == COLDEST_GID]
    assert marker.get_visible()
    rgb = np.array([int(style.COLDEST_COLOUR[k : k + 2], 16) for k in (1, 3, 5)], float)
    hit = np.linalg.norm(img - rgb, axis=-1) < 40.0
    r, c = np.nonzero(hit)
    assert r.size >= 10
    px, py = ax.transData.transform((x, y))
    assert c.mean() == pytest.approx(px, abs=1.5)
    assert (h - r.mean()) == pytest.approx(py, abs=1.5)


def test_heat_flux_map_renders(solved):
    study, _, view = solved
    fig = heat_flux_figure(view, title=study.solution.case.title)
    img = pixels(fig)
    rows, cols = axes_box(fig, fig.axes[0], img.shape)
    assert img[rows, cols].std() > 20.0
    assert len(fig.axes[0].collections) > 3  # cells, lines along q, outlines, boundaries


def test_heat_paths_start_inside_the_body_where_heat_enters(solved):
    _, _, view = solved
    seeds = heat_path_seeds(view, 12)
    if seeds.size == 0:
        assert not (view.face_flux[view.face_boundary >= 0] > 0).any()
        return
    assert inside(view.grid, seeds[:, 0], seeds[:, 1]).all()


def test_mesh_plot_renders():
    study, _, view = solve(demo("balcony_slab"))
    fig = mesh_figure(view, title=study.solution.case.title)
    img = pixels(fig)
    rows, cols = axes_box(fig, fig.axes[0], img.shape)
    assert img[rows, cols].std() > 20.0


def test_transient_plots_render():
    study, _, _ = solve(demo("wall_daily_cycle"))
    sol = study.solution
    h = sol.history
    times = np.asarray(h.times)
    probes = {p.name: np.asarray(h.probes)[:, k] for k, p in enumerate(sol.case.probes)}
    flows = {b.name: np.asarray(h.flows)[:, k] for k, b in enumerate(sol.case.boundaries)}
    views = [field_view(sol, f, t) for t, f in zip(h.times, h.fields, strict=True)]
    for fig, n_lines in (
        (probe_figure(times, probes), len(probes)),
        (flow_figure(times, flows), len(flows)),
    ):
        ax = fig.axes[0]
        plotted = [ln for ln in ax.get_lines() if ln.get_label() in set(probes) | set(flows)]
        assert len(plotted) == n_lines
        for ln in plotted:  # the x axis is in hours for a run this short
            assert ln.get_xdata()[-1] == pytest.approx(times[-1] / 3600)
    fig = snapshot_figure(views[:4])
    assert sum(ax.get_visible() for ax in fig.axes) == min(4, len(views)) + 1  # + colour bar
    assert pixels(fig).std() > 20.0


def test_theta_si_min_marked_on_the_map_it_comes_from(steady_results):
    """The balcony junction's f_Rsi comes from a separate surface-temperature solve
    (R_si = 0.25): its map is drawn too and carries the θ_si,min marker at the reported
    point; the heat-loss map carries none. The surface field read back is that solve's
    (its inside surface minimum is the reported θ_si,min)."""
    import json

    from fvheat.output.results import ResultsFolder

    folder = ResultsFolder.open(steady_results)
    j = folder.summary["junction"]
    assert j["f_Rsi_separate_solve"] is True
    index = {
        r["name"]: r for r in json.loads((steady_results / "figures/figures.json").read_text())
    }
    assert "temperature_surface" in index
    main_svg = (steady_results / index["temperature"]["svg"]).read_text()
    surface_svg = (steady_results / index["temperature_surface"]["svg"]).read_text()
    assert COLDEST_GID not in main_svg
    assert COLDEST_GID in surface_svg
    assert "θ_si,min" in index["temperature_surface"]["caption"]
    assert "heat-loss solve" in index["temperature"]["caption"]
    view = folder.surface_field()
    inside = [
        view.boundary_names.index(n) for n in ("inside_wall", "inside_ceiling", "inside_floor")
    ]
    face_min = view.face_temperature[np.isin(view.face_boundary, inside)].min()
    # the reported minimum also covers face end points, so it is at or below the faces'
    assert j["theta_si_min"] <= face_min + 1e-12
    assert j["theta_si_min"] > face_min - 0.5
