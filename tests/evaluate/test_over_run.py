"""Extremes over a transient run, sampled at every step.

Saving every step, the series of saved states is the series of all steps, so the reported
lowest and highest surface temperatures over the run must equal the extremes of the
per-step steady-style evaluation (:func:`fvheat.evaluate.surfaces.surface_results` on each
saved field), the lowest temperature factor the minimum of f(t) computed from them with the
boundary temperatures at each time, and the largest frozen area and front positions the
maxima of the saved measures. Source: definition (the same evaluation, sampled twice).
Tolerance: exact (the same arithmetic).
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import numpy as np
import pytest

from fvheat.case.load import load_case
from fvheat.cli.main import main
from fvheat.evaluate.extremes import F_MIN_DIFFERENCE
from fvheat.evaluate.surfaces import surface_results
from fvheat.study import run_study
from fvheat.sweep.table import collect, csv_text

CASES = Path(__file__).resolve().parents[2] / "cases"

JUNCTION = """
[junction]
inside = ["inside"]
outside = ["outside"]
centre = [0.0, 0.62]
[[junction.flanking]]
name = "wall"
cut = [[0.0, 0.2], [0.365, 0.2]]
length = 1.2
"""


def lintel_case(tmp_path: Path, hours: int = 24):
    """The demo lintel wall with a junction, every step saved, over ``hours``."""
    text = (CASES / "wall_daily_cycle.toml").read_text() + JUNCTION
    path = tmp_path / "lintel.toml"
    path.write_text(text)
    return path, load_case(path, (f"time.duration={hours * 3600}", "time.save_every=600"))


def test_lowest_over_run_equals_the_per_step_series(tmp_path):
    _, case = lintel_case(tmp_path)
    s = run_study(case)
    sol, ext = s.solution, s.solution.extremes
    h = sol.history
    assert len(h.times) == ext.steps == 24 * 6 + 1  # every step and the initial state
    series = [surface_results(sol.system, f, t) for f, t in zip(h.fields, h.times, strict=True)]
    for name in sol.surfaces:
        lows = [r[name].min_temperature for r in series]
        highs = [r[name].max_temperature for r in series]
        k, m = int(np.argmin(lows)), int(np.argmax(highs))
        assert ext.lowest[name].value == lows[k]  # exact
        assert ext.lowest[name].time == h.times[k]
        assert ext.lowest[name].at == series[k][name].min_at
        assert ext.highest[name].value == highs[m]
        assert ext.highest[name].time == h.times[m]
    # the lowest over the run is no higher than the lowest at any saved time, and here it
    # is lower than at the end (the outside is coldest at 03:00)
    assert ext.lowest["inside"].value < sol.surfaces["inside"].min_temperature
    # f(t): the minimum over the steps, with the outside temperature at each time
    outside = case.boundary("outside").air_temperature
    f = [
        (r["inside"].min_temperature - outside.at(t)) / (20.0 - outside.at(t))
        for r, t in zip(series, h.times, strict=True)
        if abs(20.0 - outside.at(t)) >= F_MIN_DIFFERENCE
    ]
    assert ext.f_min is not None and ext.f_min.value == min(f)
    assert ext.f_skipped == 0


def test_summary_console_collect_and_report(tmp_path, capsys):
    path, _ = lintel_case(tmp_path)
    out = tmp_path / "out"
    args = ["run", str(path), "--out", str(out), "--no-plots"]
    args += ["--set", "time.duration=86400"]
    assert main(args) == 0
    printed = capsys.readouterr().out
    assert "over the run" in printed
    assert "lowest temperature factor over the run" in printed
    summary = json.loads((out / "summary.json").read_text())
    b = summary["boundaries"]["inside"]
    for key in ("min_temperature_over_run", "max_temperature_over_run"):
        assert {key, f"{key}_at", f"{key}_time_s"} <= set(b)
    assert b["min_temperature_over_run"] <= b["min_temperature"]
    j = summary["junction"]
    assert 0.0 < j["f_min_over_run"] < 1.0 and j["f_over_run_steps"] == 145
    rows = list(csv.DictReader(io.StringIO(csv_text(collect([out])))))
    assert float(rows[0]["min_temperature_over_run_inside"]) == b["min_temperature_over_run"]
    assert float(rows[0]["f_min_over_run"]) == j["f_min_over_run"]
    assert "Extremes over the run" in (out / "report.md").read_text()


def test_steady_runs_have_no_over_run_keys(tmp_path):
    path = CASES / "balcony_slab.toml"
    out = tmp_path / "out"
    assert main(["run", str(path), "--out", str(out), "--quiet", "--no-plots"]) == 0
    summary = json.loads((out / "summary.json").read_text())
    assert all("min_temperature_over_run" not in b for b in summary["boundaries"].values())
    assert "f_min_over_run" not in summary["junction"]


def test_frost_maxima_equal_the_per_step_series():
    """Largest frozen area and fronts over the run (every step saved); the surface extremes
    use the conductivity of each step's phases, as the saved evaluation does."""
    case = load_case(
        CASES / "frost_slab_edge.toml",
        ("time.duration=518400", "time.save_every=3600", "time.initial_temperature=2.0"),
    )
    s = run_study(case)
    sol, ext, h = s.solution, s.solution.extremes, s.solution.history
    assert ext.phase, "the run must freeze some ground"
    for key, e in ext.phase.items():
        values = [p[key] for p in h.phase if p.get(key) is not None]
        assert e.value == max(values)
    from fvheat.assembly.enthalpy import EnthalpyModel

    model = EnthalpyModel.build(case, sol.mesh)
    base = sol.system
    lows = [
        surface_results(base.with_conductivity(model.conductivity(f)), f, t)
        for f, t in zip(h.fields, h.times, strict=True)
    ]
    for name in sol.surfaces:
        assert ext.lowest[name].value == pytest.approx(
            min(r[name].min_temperature for r in lows), abs=0.0
        )
