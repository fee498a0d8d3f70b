"""Figures and field files of runs on the triangle mesh, as on the grid: heat paths on the
heat-flux map, snapshots and fronts of a transient run with the grid's file names and
captions, ``fvheat plot DIR`` redrawing them from the VTU pixel for pixel, and the grid's
compression rule for the VTU files.

Sources: the 1-D two-layer wall (ISO 6946 series resistances: q = Δθ/ΣR, uniform, so
equal steps of entering heat are equal steps along the surface); the solver's own boundary
heat flows (summary.json) for the flow the heat paths are spaced by (an identity: the same
surface balance); the grid's outputs of the same demo case for names and captions.
"""

from __future__ import annotations

import json
from pathlib import Path

import meshio
import numpy as np
import pytest
from casefiles import write_case
from wallcases import TRIANGLE_WALL

from fvheat.output import fields
from fvheat.output.plots import raster
from fvheat.output.plots.heatflux import (
    HEAT_PATHS,
    STREAM_SAMPLES,
    heat_flux_figure,
    heat_path_seeds,
    sample_flux,
)
from fvheat.output.results import ResultsFolder
from fvheat.output.triangle_view import TriangleFieldView
from fvheat.output.vtu import read_vtu
from fvheat.run import run_to_folder

from .conftest import CASES, coarse_overrides, run_cli, run_demo
from .test_figures_from_memory import _pngs, _redrawn_from_files, _same_pictures

WALL = TRIANGLE_WALL
#: ISO 6946: q = Δθ / (R_si + Σ d/λ + R_se), W/m²
Q_WALL = 20.0 / (0.13 + 0.1 / 1.0 + 0.1 / 0.1 + 0.04)


def _demo(stem: str) -> Path:
    (path,) = [c for c in CASES if c.stem == stem]
    return path


def _run_triangles(stem: str, out: Path, *extra: str) -> int:
    """A coarsened demo case on the triangle mesh (the later --set wins)."""
    path = _demo(stem)
    sets = [a for o in [*coarse_overrides(path), "mesh.kind=triangles"] for a in ("--set", o)]
    return run_cli(["run", path, "-o", out, "-q", *sets, *extra])


@pytest.fixture(scope="module")
def wall(tmp_path_factory) -> tuple[Path, dict]:
    out = tmp_path_factory.mktemp("wall") / "results"
    path = write_case(out.parent, WALL)
    _, summary = run_to_folder(path, out, plots=True)
    return out, summary


@pytest.fixture(scope="module")
def frost(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("frost") / "results"
    assert _run_triangles("frost_slab_edge", out) == 0
    return out


def test_heat_paths_are_spaced_by_the_solvers_heat_flow(wall):
    """The entering heat the paths are spaced by is the solver's: per boundary, Σ q·L over
    the exterior edges read back from the VTU equals summary.json's heat flow (1e-9). In
    the uniform 1-D flux the 24 seeds then sit at equal steps along the inside surface,
    y_k = (k + ½)·H/24, each within half an edge of it (a seed is the centre of the edge
    holding its step)."""
    out, summary = wall
    view = ResultsFolder.open(out).field()
    assert isinstance(view, TriangleFieldView)
    length = np.hypot(*(view.face_ends[:, 1] - view.face_ends[:, 0]).T)
    for k, name in enumerate(view.boundary_names):
        on = view.face_boundary == k
        flow = float(np.sum(view.face_flux[on] * length[on]))
        assert flow == pytest.approx(summary["boundaries"][name]["heat_flow"], rel=1e-9)
    assert summary["boundaries"]["inside"]["heat_flow"] == pytest.approx(Q_WALL * 0.5, rel=1e-9)
    seeds = heat_path_seeds(view)
    assert seeds.shape == (HEAT_PATHS, 2)
    exact = (np.arange(HEAT_PATHS) + 0.5) * 0.5 / HEAT_PATHS
    edge = float(length[view.face_boundary == 0].max())
    assert np.all(np.abs(seeds[:, 1] - exact) <= 0.5 * edge + 1e-12)
    assert np.all(seeds[:, 0] < 0.2) and np.all(seeds[:, 0] > 0.2 - edge)  # nudged inside


def test_sampled_flux_is_the_wall_flux(wall):
    """q sampled onto the heat paths' lattice is the ISO 6946 flux everywhere in the wall
    (−q in x, 0 in y; P1 is exact in 1-D), masked outside the body."""
    view = ResultsFolder.open(wall[0]).field()
    gx, gy = np.meshgrid(np.linspace(0.003, 0.197, 40), np.linspace(0.003, 0.497, 90))
    q = sample_flux(view, gx, gy)
    assert not np.ma.getmaskarray(q).any()
    np.testing.assert_allclose(q[..., 0], -Q_WALL, rtol=1e-9)
    np.testing.assert_allclose(q[..., 1], 0.0, atol=1e-9 * Q_WALL)
    outside = sample_flux(view, np.array([0.3, -0.1]), np.array([0.2, 0.2]))
    assert np.ma.getmaskarray(outside).all()


def test_heat_flux_figure_draws_a_path_from_every_seed(wall):
    """The grid's path routine on the triangle view: a drawn line starts at each seed
    (within one spacing of the sampled lattice: matplotlib begins a line one integration
    step on; the seeds are about 0.02 m apart)."""
    view = ResultsFolder.open(wall[0]).field()
    fig = heat_flux_figure(view)
    (ax,) = [a for a in fig.axes if a.get_label() != "<colorbar>"]
    (paths,) = [c for c in ax.collections if c.get_path_effects()]
    starts = np.array([s[0] for s in paths.get_segments()])
    seeds = heat_path_seeds(view)
    gap = np.min(np.hypot(*(starts[None, :, :] - seeds[:, None, :]).transpose(2, 0, 1)), axis=1)
    assert np.all(gap < 0.5 / STREAM_SAMPLES)
    # one line per seed, each crossing the wall to the cold side (heat flows along -x)
    lines = paths.get_segments()
    assert len(lines) == HEAT_PATHS
    assert all(np.ptp(line[:, 0]) > 0.9 * 0.2 and line[-1, 0] < 0.01 for line in lines)


def test_views_from_memory_equal_views_from_the_vtu(tmp_path):
    """The VTU stores every array the figures draw, to the bit."""
    from fvheat.output.memory import SolvedFields

    path = write_case(tmp_path, WALL)
    study, _ = run_to_folder(path, tmp_path / "out", plots=False)
    memory = SolvedFields(study.solution).field()
    files = ResultsFolder.open(tmp_path / "out").field()
    assert isinstance(memory, TriangleFieldView) and isinstance(files, TriangleFieldView)
    for name in ("temperature", "flux", "face_ends", "face_boundary", "face_flux"):
        np.testing.assert_array_equal(getattr(memory, name), getattr(files, name), err_msg=name)
    np.testing.assert_array_equal(memory.shape.triangles, files.shape.triangles)


def test_transient_triangle_run_has_the_grids_figures(frost, tmp_path):
    """Snapshots and fronts (and probes, heat flows) with the grid's file names and
    captions in figures.json, so the report embeds them."""
    grid = tmp_path / "grid"
    assert run_demo("frost_slab_edge", grid, "--no-plots") == 0
    assert run_cli(["plot", grid, "-q"]) == 0

    def index(folder: Path) -> dict[str, str]:
        entries = json.loads((folder / "figures" / "figures.json").read_text(encoding="utf-8"))
        return {e["name"]: e["caption"] for e in entries}

    tri, ref = index(frost), index(grid)
    assert list(tri) == list(ref)
    assert {"snapshots", "fronts", "probes", "heat_flows"} <= tri.keys()
    for name in ("fronts", "probes", "heat_flows"):
        assert tri[name] == ref[name]
    assert tri["snapshots"] == ref["snapshots"].replace(
        "Temperature field (°C)",
        "Temperature field (°C) on the triangle mesh (linear in each triangle)",
    )
    for name in ("snapshots", "fronts"):
        assert (frost / "figures" / f"{name}.png").stat().st_size > 10_000
    report = (frost / "report.md").read_text(encoding="utf-8")
    assert "figures/snapshots.png" in report and "figures/fronts.png" in report


@pytest.mark.parametrize("which", ["steady", "transient"])
def test_plot_redraws_triangle_figures_as_drawn_from_memory(which, frost, tmp_path):
    if which == "transient":
        out = frost
    else:
        out = tmp_path / "results"
        assert _run_triangles("eaves_pitched_roof", out) == 0
    _same_pictures(_pngs(out), _redrawn_from_files(out))


def test_resampled_triangle_maps_from_memory_equal_those_from_the_vtu(tmp_path, monkeypatch):
    """Above RASTER_CELLS triangles the maps are images (forced here on a small mesh)."""
    monkeypatch.setattr(raster, "RASTER_CELLS", 0)
    out = tmp_path / "results"
    assert _run_triangles("eaves_pitched_roof", out) == 0
    _same_pictures(_pngs(out), _redrawn_from_files(out))


def test_plot_options_on_a_triangle_folder(tmp_path):
    out = tmp_path / "results"
    assert _run_triangles("eaves_pitched_roof", out, "--no-plots") == 0
    zoom = ["--zoom", "-0.2", "-0.2", "0.4", "0.4", "--range", "0", "20"]
    assert run_cli(["plot", out, "-q", *zoom]) == 0
    captions = (out / "figures" / "figures.json").read_text(encoding="utf-8")
    assert "Colour range fixed at 0 to 20 °C" in captions and "Window x -0.2 to 0.4 m" in captions


def _compressed(vtu: Path) -> bool:
    return "vtkZLibDataCompressor" in vtu.read_bytes()[:2000].decode("latin-1")


def test_triangle_vtu_follows_the_grids_compression_rule(tmp_path, monkeypatch):
    """Compressed within the rule's limits, plain beyond (the triangles are the cells
    counted), and the same data either way."""
    path = write_case(tmp_path, WALL)
    run_to_folder(path, tmp_path / "small", plots=False)
    n_triangles = (
        meshio.read(tmp_path / "small" / "fields" / "field.vtu").cells_dict["triangle"].shape[0]
    )
    assert fields.compress_fields(n_triangles, 1)
    assert _compressed(tmp_path / "small" / "fields" / "field.vtu")
    monkeypatch.setattr(fields, "COMPRESS_CELLS", n_triangles - 1)
    assert not fields.compress_fields(n_triangles, 1)
    run_to_folder(path, tmp_path / "large", plots=False)
    assert not _compressed(tmp_path / "large" / "fields" / "field.vtu")
    large = tmp_path / "large" / "fields" / "field.vtu"
    assert b'encoding="raw"' in large.read_bytes()[:4000]  # fvheat.output.vtu
    a = meshio.read(tmp_path / "small" / "fields" / "field.vtu")
    for b in (meshio.read(large), read_vtu(large)):  # meshio, and fvheat's fast reader
        np.testing.assert_array_equal(a.point_data["temperature"], b.point_data["temperature"])
        assert [c.type for c in a.cells] == [c.type for c in b.cells]
        for x, y in zip(a.cells, b.cells, strict=True):
            np.testing.assert_array_equal(x.data, y.data)
        for name, blocks in a.cell_data.items():
            for x, y in zip(blocks, b.cell_data[name], strict=True):
                assert x.dtype == y.dtype
                np.testing.assert_array_equal(x, y)


def test_locator_agrees_with_matplotlibs_trifinder(wall):
    """Point location for the maps: the same triangle as matplotlib's trapezoid-map
    finder (an independent implementation) for random points in and around the body,
    and barycentric weights that reproduce the points."""
    view = ResultsFolder.open(wall[0]).field()
    rng = np.random.default_rng(7)
    x, y = rng.uniform(-0.05, 0.25, 20_000), rng.uniform(-0.05, 0.55, 20_000)
    tri, bary = view.shape.locator.locate(x, y)
    reference = view.shape.triangulation.get_trifinder()(x, y)
    assert np.mean(tri == reference) > 0.9999  # points on shared edges may go either way
    assert np.array_equal(tri >= 0, reference >= 0)
    inside = tri >= 0
    corners = view.shape.points[view.shape.triangles[tri[inside]]]
    back = np.einsum("pk,pkd->pd", bary[inside], corners)
    np.testing.assert_allclose(back, np.column_stack([x, y])[inside], atol=1e-12)


FROZEN_WALL = """
title = "frozen soil layer"
[mesh]
max_cell = 0.02
kind = "triangles"
[materials.soil]
conductivity = 1.5
density = 1800
specific_heat = 1400
latent_heat = 100000
phase_change = [-0.5, 0.0]
frozen = { conductivity = 2.2, specific_heat = 900 }
[[regions]]
material = "soil"
box = [0.0, 0.0, 0.2, 0.3]
[[boundaries]]
name = "warm"
edges = [[[0.2, 0.0], [0.2, 0.3]]]
air_temperature = -5.0
resistance = 0.13
[[boundaries]]
name = "cold"
edges = [[[0.0, 0.0], [0.0, 0.3]]]
air_temperature = -15.0
resistance = 0.04
"""


def test_triangle_flux_takes_the_frozen_conductivity(tmp_path):
    """A wholly frozen layer (every node below the phase range): q = Δθ/ΣR with the frozen
    conductivity (ISO 6946 series resistances), on the maps and in the VTU, as in the
    solver's heat flow (the material's unfrozen value would give 32 % less)."""
    path = write_case(tmp_path, FROZEN_WALL)
    _, summary = run_to_folder(path, tmp_path / "out", plots=False)
    q = 10.0 / (0.13 + 0.2 / 2.2 + 0.04)
    assert summary["boundaries"]["warm"]["heat_flow"] == pytest.approx(q * 0.3, rel=1e-6)
    view = ResultsFolder.open(tmp_path / "out").field()
    assert float(view.temperature.max()) < -0.5
    np.testing.assert_allclose(view.flux[:, 0], -q, rtol=1e-6)
