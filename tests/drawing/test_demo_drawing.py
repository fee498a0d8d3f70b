"""The demo drawing: its script is deterministic and matches the committed file, `fvheat
layers` lists it, and the demo case built on it runs (one regression pin)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from fvheat.case.geometry import SAGITTA, SNAP
from fvheat.case.load import load_case
from fvheat.drawing.dxf import read_drawing
from fvheat.drawing.survey import survey
from fvheat.study import run_study

ROOT = Path(__file__).resolve().parents[2]
SCRIPT = ROOT / "scripts" / "make_demo_drawing.py"
DRAWING = ROOT / "cases" / "details" / "kestrel_undercroft_edge.dxf"
CASE = ROOT / "cases" / "undercroft_slab_edge.toml"
LAYERS = (
    "CONCRETE",
    "MINERAL_WOOL",
    "EPS",
    "SCREED",
    "DUCT",
    "SURF_IN",
    "SURF_FLOOR",
    "SURF_OUT",
    "SURF_UNDER",
    "NOTES",
    "DIMS",
)


def fvheat(*args: str) -> subprocess.Popen:
    return subprocess.Popen(
        [sys.executable, "-m", "fvheat", *args],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )


def test_script_is_deterministic_and_matches_the_committed_drawing(tmp_path):
    """Two runs write the same bytes; the committed drawing holds the same layers, entities,
    shapes and extents (bytes may differ with another ezdxf version)."""
    outs = [tmp_path / "a.dxf", tmp_path / "b.dxf"]
    procs = [
        subprocess.Popen([sys.executable, str(SCRIPT), "--out", str(o)], stdout=subprocess.PIPE)
        for o in outs
    ]
    assert all(p.wait(timeout=120) == 0 for p in procs)
    assert outs[0].read_bytes() == outs[1].read_bytes()
    fresh = survey(read_drawing(outs[0], SAGITTA * 1000), SNAP * 1000, "mm")
    committed = survey(read_drawing(DRAWING, SAGITTA * 1000), SNAP * 1000, "mm")
    assert fresh == committed
    assert {r.name for r in committed} >= set(LAYERS)


def test_layers_command_lists_the_demo_layers():
    """`fvheat layers` prints every layer with its counts; a bad file gives exit 2 and one
    line."""
    ok = fvheat("layers", str(DRAWING), "--units", "mm")
    missing = fvheat("layers", str(DRAWING.with_name("none.dxf")))
    not_dxf = fvheat("layers", str(CASE))
    out, err = ok.communicate(timeout=120)
    assert ok.returncode == 0, err
    for name in LAYERS:
        assert name in out
    assert "read as mm" in out and "HATCH 1" in out and "INSERT 2" in out
    for proc, words in ((missing, "drawing file not found"), (not_dxf, "not a DXF drawing")):
        out, err = proc.communicate(timeout=120)
        assert proc.returncode == 2
        assert err.strip().count("\n") == 0 and words in err and "Traceback" not in err


def test_demo_case_reads_its_drawing():
    """The demo case: regions and boundaries all from the drawing (its ψ is pinned with
    the other demos in tests/evaluate/test_demo_cases.py)."""
    case = load_case(CASE)
    assert case.geometry is not None and case.geometry.units == "mm"
    # CONCRETE: slab hatch and wall; MINERAL_WOOL: façade and lining; EPS; SCREED; 2 ducts
    assert len(case.regions) == 8
    assert sorted(len(r.holes) for r in case.regions) == [0] * 7 + [2]  # the duct holes
    study = run_study(case, check_grid=False)
    assert study.solution.balance.relative < 1e-9
