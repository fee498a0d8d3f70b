"""``fvheat run`` leaves everything a reviewer needs; ``fvheat plot`` and ``fvheat report``
redraw from the folder; bad options are one-line errors with exit code 2."""

from __future__ import annotations

import json

import numpy as np
import pytest

from .conftest import RANGE, ZOOM, run_cli, run_demo

STEADY_FILES = [
    "summary.json",
    "inputs.json",
    "cells.csv",
    "fields/field.vtu",
    "fields/fields.json",
    "figures/temperature.png",
    "figures/temperature.svg",
    "figures/heat_flux.png",
    "figures/heat_flux.svg",
    "figures/mesh.png",
    "figures/figures.json",
    "report.html",
    "report.md",
]


def test_steady_run_writes_every_output(steady_results):
    for name in STEADY_FILES:
        assert (steady_results / name).is_file(), name
    leftovers = [p for p in steady_results.rglob(".*") if p.is_file()]
    assert leftovers == []  # no temporary files from the atomic writes


def test_transient_run_writes_series_and_time_plots(transient_results):
    meta = json.loads((transient_results / "fields" / "fields.json").read_text())
    assert len(meta["files"]) >= 2
    for entry in meta["files"]:
        assert (transient_results / "fields" / entry["file"]).is_file()
    assert (transient_results / "fields" / "field.pvd").is_file()
    for name in ("probes", "heat_flows", "snapshots", "temperature", "heat_flux"):
        assert (transient_results / "figures" / f"{name}.png").is_file(), name
    assert (transient_results / "timeseries.csv").is_file()


def test_plot_redraws_with_range_and_zoom(steady_results):
    index = json.loads((steady_results / "figures" / "figures.json").read_text())
    caption = next(r["caption"] for r in index if r["name"] == "temperature")
    assert f"{RANGE[0]} to {RANGE[1]} °C" in caption
    assert f"x {ZOOM[0]} to {ZOOM[2]} m, y {ZOOM[1]} to {ZOOM[3]} m" in caption


@pytest.mark.parametrize(
    "args, key",
    [
        (["--zoom", "1", "0", "0", "1"], "--zoom"),
        (["--range", "5", "5"], "--range"),
    ],
)
def test_plot_rejects_bad_windows(steady_results, capsys, args, key):
    assert run_cli(["plot", steady_results, *args]) == 2
    err = capsys.readouterr().err.strip()
    assert err.startswith("fvheat: error:") and key in err and "\n" not in err


@pytest.mark.parametrize("command", ["plot", "report"])
def test_commands_need_a_results_folder(tmp_path, capsys, command):
    assert run_cli([command, tmp_path]) == 2
    err = capsys.readouterr().err.strip()
    assert str(tmp_path) in err and "summary.json" in err and "\n" not in err


def test_no_plots_run_writes_all_but_figures(steady_results):
    before = steady_results.parent / "no_plots"
    assert not (before / "figures").exists()
    assert (before / "fields" / "field.vtu").is_file() and (before / "cells.csv").is_file()
    html = (before / "report.html").read_text(encoding="utf-8")
    assert "<img" not in html and "No figures in this folder" in html


def test_no_plots_run_does_not_show_stale_figures(tmp_path, steady_results):
    import shutil

    out = tmp_path / "r"
    shutil.copytree(steady_results, out)  # figures of an earlier run in the same folder
    assert run_demo("balcony_slab", out, "--no-plots") == 0
    assert "<img" not in (out / "report.html").read_text(encoding="utf-8")


def test_report_rebuilds_from_the_folder(steady_results):
    html = steady_results / "report.html"
    html.unlink()
    assert run_cli(["report", steady_results, "-q"]) == 0
    assert html.is_file() and (steady_results / "report.md").is_file()


def test_cells_csv_matches_the_field_file(steady_results):
    import meshio

    data = np.genfromtxt(
        steady_results / "cells.csv", delimiter=",", names=True, dtype=None, encoding="utf-8"
    )
    m = meshio.read(steady_results / "fields" / "field.vtu")
    np.testing.assert_array_equal(data["temperature_C"], m.cell_data["temperature"][0])
