"""``fvheat run`` draws its figures from the fields in memory; ``fvheat plot DIR`` redraws
them from the written VTU files. Both must give the same pictures (compared pixel by pixel),
on the cell-by-cell maps of small meshes and on the resampled images of large ones, and
``--fields none`` must change nothing but the field files."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import numpy as np
import pytest

from fvheat.output.plots import raster

from .conftest import run_cli, run_demo


def _pngs(folder: Path) -> dict[str, np.ndarray]:
    from matplotlib.image import imread

    return {p.name: imread(p) for p in sorted((folder / "figures").glob("*.png"))}


def _same_pictures(first: dict[str, np.ndarray], second: dict[str, np.ndarray]) -> None:
    assert first.keys() == second.keys() and first
    for name, a in first.items():
        b = second[name]
        assert a.shape == b.shape, name
        # the same drawing code on the same numbers: at most a few pixels may differ by
        # rounding (tolerance: 0.1 % of the pixels, any amount)
        differ = np.any(np.abs(a - b) > 1.0 / 255.0, axis=-1)
        assert differ.mean() <= 1e-3, f"{name}: {differ.mean():.2%} of the pixels differ"


def _redrawn_from_files(out: Path) -> dict[str, np.ndarray]:
    again = out.parent / f"{out.name}_redrawn"
    shutil.copytree(out, again)
    shutil.rmtree(again / "figures")
    assert run_cli(["plot", again, "-q"]) == 0
    return _pngs(again)


@pytest.mark.parametrize("stem", ["balcony_slab", "wall_daily_cycle"])
def test_figures_from_memory_equal_figures_from_the_vtu(tmp_path, stem):
    out = tmp_path / "results"
    assert run_demo(stem, out) == 0
    _same_pictures(_pngs(out), _redrawn_from_files(out))


def test_resampled_maps_from_memory_equal_those_from_the_vtu(tmp_path, monkeypatch):
    """Large meshes are drawn as images at the figure's resolution; forced here on a small
    one so the test stays quick."""
    monkeypatch.setattr(raster, "RASTER_CELLS", 0)
    out = tmp_path / "results"
    assert run_demo("balcony_slab", out) == 0
    _same_pictures(_pngs(out), _redrawn_from_files(out))


def test_figures_from_uncompressed_field_files(tmp_path, monkeypatch):
    """Large fields are written uncompressed with raw appended arrays (fvheat.output.vtu):
    forced here on the transient demo, whose redrawn figures must match too."""
    from fvheat.output import fields

    monkeypatch.setattr(fields, "COMPRESS_CELLS", 0)
    out = tmp_path / "results"
    assert run_demo("wall_daily_cycle", out) == 0
    assert b'encoding="raw"' in next((out / "fields").glob("field_*.vtu")).read_bytes()[:4000]
    _same_pictures(_pngs(out), _redrawn_from_files(out))


def test_resampled_map_shows_the_cell_values(tmp_path, monkeypatch):
    """Each pixel of the resampled temperature map has the colour of the cell under it:
    checked against the cell-by-cell map of the same field (most pixels agree; cell edges
    may fall one pixel apart)."""
    from fvheat.case.load import load_case
    from fvheat.output.plots.temperature import temperature_figure
    from fvheat.output.view import field_view
    from fvheat.study import run_study

    from .conftest import CASES, coarse_overrides

    (path,) = [c for c in CASES if c.stem == "balcony_slab"]
    view = field_view(run_study(load_case(path, coarse_overrides(path))).solution)

    def drawn() -> np.ndarray:
        fig = temperature_figure(view, vrange=(0.0, 20.0))
        fig.canvas.draw()
        return np.asarray(fig.canvas.buffer_rgba())[..., :3].astype(float)

    quads = drawn()
    monkeypatch.setattr(raster, "RASTER_CELLS", 0)
    image = drawn()
    assert quads.shape == image.shape
    differ = np.any(np.abs(quads - image) > 8.0, axis=-1)
    assert differ.mean() < 0.03


def test_fields_none_writes_no_field_files_and_the_same_summary(tmp_path):
    full, bare = tmp_path / "full", tmp_path / "bare"
    assert run_demo("balcony_slab", full, "--no-plots") == 0
    assert run_demo("balcony_slab", bare, "--no-plots", "--fields", "none") == 0
    assert (full / "fields" / "field.vtu").is_file() and (full / "cells.csv").is_file()
    assert not (bare / "fields").exists() and not (bare / "cells.csv").exists()

    def summary(folder: Path) -> dict:
        s = json.loads((folder / "summary.json").read_text(encoding="utf-8"))
        s.pop("solve_seconds")  # wall time
        return s

    assert summary(bare) == summary(full)


def test_fields_last_writes_the_end_time_only(tmp_path):
    out = tmp_path / "results"
    assert run_demo("wall_daily_cycle", out, "--no-plots", "--fields", "last") == 0
    meta = json.loads((out / "fields" / "fields.json").read_text(encoding="utf-8"))
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    assert [e["time_s"] for e in meta["files"]] == [summary["time_s"]]
    assert len(list((out / "fields").glob("field_*.vtu"))) == 1


def test_bad_fields_choice_is_one_line_exit_2(tmp_path, capsys):
    out = tmp_path / "results"
    assert run_demo("balcony_slab", out, "--fields", "some") == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--fields" in err[0] and "all, last, none" in err[0]
    assert not out.exists()
