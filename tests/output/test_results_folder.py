"""The results folder under misuse: bad --out paths are refused before any solve, one run
writes a folder at a time, and a rerun leaves nothing of the earlier run that could pass
for current."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest

from fvheat.output.lock import LOCK_FILE

from .conftest import CASES, coarse_overrides, run_cli

BALCONY = next(c for c in CASES if c.stem == "balcony_slab")
WALL = next(c for c in CASES if c.stem == "wall_daily_cycle")


def run(case, out, *extra):
    sets = [a for o in coarse_overrides(case) for a in ("--set", o)]
    return run_cli(["run", case, "-o", out, "-q", "--no-plots", *sets, *extra])


def test_out_is_a_file(tmp_path, capsys):
    target = tmp_path / "results"
    target.write_text("keep me")
    assert run(BALCONY, target) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--out" in err[0] and "is a file" in err[0]
    assert target.read_text() == "keep me"


def test_out_under_a_file(tmp_path, capsys):
    (tmp_path / "f").write_text("x")
    assert run(BALCONY, tmp_path / "f" / "results") == 2
    err = capsys.readouterr().err
    assert "lies under" in err and "which is a file, not a folder" in err
    assert sorted(os.listdir(tmp_path)) == ["f"]


@pytest.mark.skipif(os.geteuid() == 0, reason="root may write anywhere")
def test_out_not_writable(tmp_path, capsys):
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o555)
    try:
        assert run(BALCONY, locked / "results") == 2
        assert "not writable (no permission)" in capsys.readouterr().err
    finally:
        locked.chmod(0o755)


def test_second_run_into_a_busy_folder_refused(tmp_path, capsys):
    """A lock held by a live process (a sleeping child standing in for another run) makes
    the run refuse, exit 2, and leaves the lock alone; a lock of a process that no longer
    exists is stale and taken over, and removed when the run ends."""
    out = tmp_path / "results"
    out.mkdir()
    sleeper = subprocess.Popen([sys.executable, "-c", "import time; time.sleep(60)"])
    try:
        (out / LOCK_FILE).write_text(json.dumps({"pid": sleeper.pid, "host": os.uname().nodename}))
        assert run(BALCONY, out) == 2
        err = capsys.readouterr().err
        assert f"another fvheat run (process {sleeper.pid}" in err
        assert not (out / "summary.json").exists() and (out / LOCK_FILE).exists()
    finally:
        sleeper.kill()
        sleeper.wait()
    assert run(BALCONY, out) == 0  # the dead process's lock is stale
    assert (out / "summary.json").exists() and not (out / LOCK_FILE).exists()


def test_rerun_leaves_nothing_stale(tmp_path):
    """A transient run saving 4 fields, then a steady run into the same folder: no old VTU
    series, no timeseries.csv, a fresh report."""
    out = tmp_path / "results"
    assert run(WALL, out) == 0
    assert (out / "timeseries.csv").exists() and (out / "fields" / "field.pvd").exists()
    assert run(BALCONY, out) == 0
    assert not (out / "timeseries.csv").exists()
    assert sorted(os.listdir(out / "fields")) == ["field.vtu", "fields.json", "surface_solve.vtu"]
    summary = json.loads((out / "summary.json").read_text())
    assert summary["mode"] == "steady"
    assert summary["title"] in (out / "report.md").read_text()


def test_failure_while_writing_leaves_no_old_report(tmp_path, monkeypatch, capsys):
    """The outputs after summary.json fail: the folder holds the new summary and none of the
    earlier run's report or fields."""
    out = tmp_path / "results"
    assert run(BALCONY, out) == 0
    assert (out / "report.html").exists()

    def broken(*args, **kwargs):
        raise OSError("disk full (simulated)")

    monkeypatch.setattr("fvheat.output.folder.write_outputs", broken)
    with pytest.raises(OSError):
        run(BALCONY, out, "--set", "title=second run")
    assert json.loads((out / "summary.json").read_text())["title"] == "second run"
    assert not (out / "report.html").exists() and not (out / "fields").exists()
    assert not (out / LOCK_FILE).exists()


def test_failed_solve_removes_the_folder_it_created(tmp_path, monkeypatch, capsys):
    """A numerical failure (exit 1) in a folder the run created leaves no empty folder."""
    from fvheat.errors import ConvergenceError

    def fails(*args, **kwargs):
        raise ConvergenceError("did not converge (simulated)")

    monkeypatch.setattr("fvheat.run.run_study", fails)
    out = tmp_path / "results"
    assert run(BALCONY, out) == 1
    assert "did not converge" in capsys.readouterr().err
    assert not out.exists()
