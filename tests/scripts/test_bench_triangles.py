"""Smoke test of ``scripts/bench.py --triangles``: both meshes run on a small problem and
their inside heat flows agree within the discretisation error (1 %, both second order);
no speed is measured."""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

SCRIPT = Path(__file__).resolve().parents[2] / "scripts" / "bench.py"


def test_bench_triangles_runs():
    proc = subprocess.run(
        [sys.executable, str(SCRIPT), "--triangles", "3000"],
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert proc.returncode == 0, proc.stdout + proc.stderr
    rows = dict(
        re.findall(
            r"^(rectilinear|triangles)\s+\d+ unknowns\s+[\d.]+ s\s+inside (\S+)", proc.stdout, re.M
        )
    )
    assert set(rows) == {"rectilinear", "triangles"}
    a, b = float(rows["rectilinear"]), float(rows["triangles"])
    assert abs(b / a - 1.0) < 0.01
    assert "triangles / rectilinear wall time" in proc.stdout
