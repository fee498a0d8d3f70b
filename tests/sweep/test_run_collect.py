"""Shell-loop sweeps: ``fvheat run --quiet`` is silent and repeatable, ``fvheat collect``
gathers many runs into one table, and the example script works end to end."""

from __future__ import annotations

import csv
import io
import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from fvheat.cli.main import main
from fvheat.sweep.results import TIMING_FIELDS

from .conftest import CASE, COARSE, INSULATION, ROOT, SLAB


def run_quiet(out: Path, *overrides: str) -> None:
    sets = [a for o in overrides for a in ("--set", o)]
    assert main(["run", str(CASE), "--out", str(out), "-q", "--no-plots", *COARSE, *sets]) == 0


def read_csv(text: str) -> list[dict[str, str]]:
    return list(csv.DictReader(io.StringIO(text)))


def test_quiet_run_prints_nothing_and_repeats_exactly(tmp_path, capsys):
    run_quiet(tmp_path / "a", f"{SLAB}=2.0")
    run_quiet(tmp_path / "b", f"{SLAB}=2.0")
    captured = capsys.readouterr()
    assert captured.out == "" and captured.err == ""
    a, b = (json.loads((tmp_path / d / "summary.json").read_text()) for d in "ab")
    assert "solve_seconds" in a and TIMING_FIELDS <= set(a)
    for s in (a, b):
        for field in TIMING_FIELDS:
            del s[field]
    assert a == b
    assert a["overrides"] == ["mesh.max_cell=0.1", "mesh.min_cell=0.02", f"{SLAB}=2.0"]


def test_collect_makes_one_row_per_run_and_ignores_timing(tmp_path, capsys):
    for name, k in (("lo", "1.6"), ("hi", "2.5")):
        run_quiet(tmp_path / name, f"{SLAB}={k}")
    folders = [str(tmp_path / "lo"), str(tmp_path / "hi")]
    assert main(["collect", *folders, "--csv", str(tmp_path / "t1.csv"), "-q"]) == 0
    # the same runs again, into the same folders: the table must not change
    for name, k in (("lo", "1.6"), ("hi", "2.5")):
        run_quiet(tmp_path / name, f"{SLAB}={k}")
    assert main(["collect", *folders, "-q"]) == 0
    printed = capsys.readouterr().out
    assert printed == (tmp_path / "t1.csv").read_text()
    rows = read_csv(printed)
    header = next(csv.reader(io.StringIO(printed)))
    assert header[:4] == ["mesh.max_cell", "mesh.min_cell", SLAB, "status"]
    assert not TIMING_FIELDS & set(header)
    for row, folder in zip(rows, folders, strict=True):
        summary = json.loads((Path(folder) / "summary.json").read_text())
        assert row["output"] == folder and row["status"] == "done"
        assert float(row["psi"]) == summary["junction"]["psi"]
        assert float(row["f_Rsi"]) == summary["junction"]["f_Rsi"]
        for name, b in summary["boundaries"].items():
            assert float(row[f"heat_flow_{name}"]) == b["heat_flow"]
    assert [r[SLAB] for r in rows] == ["1.6", "2.5"]


def test_collect_of_a_folder_without_summary_is_bad_input(tmp_path, capsys):
    assert main(["collect", str(tmp_path / "nothing")]) == 2
    err = capsys.readouterr().err.strip()
    assert err.count("\n") == 0 and "nothing/summary.json: no summary.json here" in err


@pytest.mark.skipif(shutil.which("bash") is None, reason="needs bash")
def test_example_script_loops_two_parameters_and_collects(tmp_path):
    out = tmp_path / "example"
    env = {
        **os.environ,
        "SLAB_VALUES": "1.6 2.5",
        "INSULATION_VALUES": "0.030 0.040",
        "FVHEAT": f"{sys.executable} -m fvheat",
    }
    result = subprocess.run(
        ["bash", str(ROOT / "scripts" / "sweep-example.sh"), str(out), *COARSE],
        env=env,
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
    )
    assert result.returncode == 0, result.stderr
    rows = read_csv((out / "table.csv").read_text())
    assert [(r[SLAB], r[INSULATION]) for r in rows] == [
        ("1.6", "0.030"),
        ("1.6", "0.040"),
        ("2.5", "0.030"),
        ("2.5", "0.040"),
    ]
    for row in rows:
        summary = json.loads((Path(row["output"]) / "summary.json").read_text())
        assert float(row["psi"]) == summary["junction"]["psi"]
    psi = {(r[SLAB], r[INSULATION]): float(r["psi"]) for r in rows}
    # common practice: a more conductive slab through the insulation plane is a worse
    # thermal bridge, at either insulation conductivity
    assert psi[("2.5", "0.030")] > psi[("1.6", "0.030")]
    assert psi[("2.5", "0.040")] > psi[("1.6", "0.040")]
