"""Shared sweep fixtures and helpers: the demo balcony case on a coarse mesh, one 2×3 sweep
of it, the sweep command line and the rows a sweep stored."""

from __future__ import annotations

from pathlib import Path

import pytest

from fvheat.cli.main import main
from fvheat.sweep.store import Row, SweepStore

ROOT = Path(__file__).resolve().parents[2]
CASE = ROOT / "cases" / "balcony_slab.toml"
#: coarse mesh so that every variant solves in a fraction of a second
COARSE = ("--set", "mesh.max_cell=0.1", "--set", "mesh.min_cell=0.02")
SLAB = "materials.slab.conductivity"
INSULATION = "materials.facade_insulation.conductivity"
SLAB_VALUES = ("1.6", "2.5")
INSULATION_VALUES = ("0.03", "0.035", "0.04")
VARY_2X3 = (
    "--vary",
    f"{SLAB}={','.join(SLAB_VALUES)}",
    "--vary",
    f"{INSULATION}={','.join(INSULATION_VALUES)}",
)


def sweep_args(out: Path, *extra: str, vary: tuple[str, ...] = VARY_2X3) -> list[str]:
    """``fvheat sweep`` arguments for a coarse sweep of the balcony case into ``out`` (the
    2×3 sweep unless ``vary`` says otherwise), then ``extra``."""
    return ["sweep", str(CASE), *vary, *COARSE, "--out", str(out), *extra]


def stored(folder: Path) -> list[Row]:
    """The rows of the sweep database in ``folder``, read-only."""
    with SweepStore(folder / "sweep.sqlite", readonly=True) as store:
        return store.rows()


@pytest.fixture(scope="session")
def sweep_2x3(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path]:
    """One finished 2×3 sweep (2 workers): its folder and its exported table."""
    folder = tmp_path_factory.mktemp("sweep_2x3")
    table = folder.parent / "sweep_2x3.csv"
    code = main(sweep_args(folder, "-q", "--jobs", "2", "--table", str(table)))
    assert code == 0
    return folder, table
