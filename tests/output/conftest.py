"""Fixtures for the output tests: every demo case, coarsened so the tests stay fast.

Figures are drawn with matplotlib's Agg renderer on plain Figure objects; MPLBACKEND=Agg
also keeps any pyplot use headless.
"""

from __future__ import annotations

import os
import tomllib
from pathlib import Path

import pytest

os.environ.setdefault("MPLBACKEND", "Agg")

CASES = sorted((Path(__file__).resolve().parents[2] / "cases").glob("*.toml"))


def coarse_overrides(case_file: Path) -> list[str]:
    """--set overrides that make a demo case quick: cells three times larger (on the
    rectilinear grid), and a transient run cut to three steps, each saved."""
    data = tomllib.loads(case_file.read_text(encoding="utf-8"))
    mesh = data.get("mesh", {})
    big = 3.0 * float(mesh.get("max_cell", 0.05))
    # these tests draw and write the grid's views; the triangle mesh's outputs are tested
    # in tests/mesh
    out = [f"mesh.max_cell={big!r}", "mesh.kind=rectilinear"]
    if "min_cell" in mesh:
        out.append(f"mesh.min_cell={min(3.0 * float(mesh['min_cell']), big)!r}")
    t = data.get("time")
    if t is not None:
        step = float(t["step"])
        out += [f"time.duration={3 * step!r}", f"time.save_every={step!r}"]
        if t.get("periodic"):
            out.append("time.periodic=false")
    return out


@pytest.fixture(scope="session")
def case_files() -> list[Path]:
    return CASES


def run_cli(args: list[str]) -> int:
    from fvheat.cli.main import main

    return main([str(a) for a in args])


def run_demo(stem: str, out: Path, *extra: str) -> int:
    """``fvheat run`` of a coarsened demo case into ``out``; returns the exit code."""
    (path,) = [c for c in CASES if c.stem == stem]
    sets = [a for o in coarse_overrides(path) for a in ("--set", o)]
    return run_cli(["run", path, "-o", out, "-q", *sets, *extra])


#: the window and colour range the steady results are redrawn with
ZOOM = ("-0.5", "-0.5", "1", "0.8")
RANGE = ("0", "20")


@pytest.fixture(scope="session")
def steady_results(tmp_path_factory) -> Path:
    """Results folder of the balcony junction (steady, with junction results), made the way
    a user would redo figures: ``run --no-plots``, ``plot --range --zoom``, ``report``.
    The state before plotting is kept in ``no_plots/`` next to it."""
    import shutil

    out = tmp_path_factory.mktemp("balcony") / "results"
    assert run_demo("balcony_slab", out, "--no-plots") == 0
    shutil.copytree(out, out.parent / "no_plots")
    assert run_cli(["plot", out, "--range", *RANGE, "--zoom", *ZOOM, "-q"]) == 0
    assert run_cli(["report", out, "-q"]) == 0
    return out


@pytest.fixture(scope="session")
def transient_results(tmp_path_factory) -> Path:
    """Results folder of the lintel wall under a daily cycle (transient, no junction)."""
    out = tmp_path_factory.mktemp("wall") / "results"
    assert run_demo("wall_daily_cycle", out) == 0
    return out
