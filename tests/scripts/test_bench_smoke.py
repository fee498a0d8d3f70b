"""Smoke test of ``scripts/bench.py --quick``: the benchmark runs end to end on tiny grids.

It checks that every path runs and agrees with the bare scipy/pyamg solution of the same
discrete problem to the benchmark's own 1e-6 criterion; it measures no speed (speed targets
are checked by running the script, never by tests).
"""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

SCRIPT = Path(__file__).resolve().parents[2] / "scripts" / "bench.py"


def test_bench_quick_runs_and_agrees(tmp_path):
    proc = subprocess.run(
        [sys.executable, str(SCRIPT), "--quick", "--no-fipy", "--work", str(tmp_path)],
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert proc.returncode == 0, proc.stdout + proc.stderr
    out = proc.stdout
    rows = re.findall(
        r"^(steady|transient) \S+\s+(\w[\w-]*)\s+([\d.]+)\s+([\d.]+)\s+(\d+)\s+(\S+)", out, re.M
    )
    paths = {(kind, path) for kind, path, *_ in rows}
    assert {("steady", "bare"), ("steady", "api"), ("steady", "cli")} <= paths
    assert {("transient", "bare"), ("transient", "api"), ("transient", "cli")} <= paths
    for *_, agreement in rows:
        assert float(agreement) <= 1e-6
    assert re.search(r"steady cost exponent \(api, .*\): N\^-?[\d.]+", out)
    assert "process start to summary.json written" in out
    assert re.search(r"steady 400: / bare assembly\+AMG-CG = [\d.]+ \(target ≤ 2\)", out)
    assert (tmp_path / "out_transient_10" / "timeseries.csv").is_file()
    # every target of the output / start-up / sweep measurements is printed with a verdict
    for target in (
        r"figures of a steady run at [\d,]+ cells, as fvheat run draws them .* (PASS|FAIL)",
        r"field files read back by meshio with every codec at [\d,]+ cells: PASS",
        r"start-up, fvheat --help: .* (PASS|FAIL)",
        r"sweep overhead per variant, balcony demo, --fields none, 1 worker: .* (PASS|FAIL)",
    ):
        assert re.search(target, out), target
