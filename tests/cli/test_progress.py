"""The progress bar only on a terminal: with standard error captured (a pipe, a log
file) a run prints nothing there but warnings and its one error line. Before, the bar's
last refresh left an empty line in front of the error (found by tests/cli/test_fuzz.py)."""

from __future__ import annotations

from casefiles import write_case
from wallcases import series_wall

from fvheat.cli.main import main

#: a transient run (the bar shows its steps)
WALL = series_wall(-5.0)


def test_no_bar_on_captured_stderr(tmp_path, capsys):
    case = write_case(tmp_path, WALL)
    assert main(["run", str(case), "-o", str(tmp_path / "ok"), "--no-plots"]) == 0
    captured = capsys.readouterr()
    assert captured.err == ""
    assert "cells" in captured.out  # the results table still goes to standard output
    bad = ["run", str(case), "-o", str(tmp_path / "bad"), "--set", "probes.0.at=[1, 1]"]
    bad_case = write_case(
        tmp_path, WALL + '[[probes]]\nname = "p"\nat = [0.1, 0.05]\n', name="probe.toml"
    )
    bad[1] = str(bad_case)
    assert main(bad) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and err.startswith("fvheat: error: "), repr(err)
