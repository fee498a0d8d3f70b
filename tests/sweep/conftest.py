"""Shared sweep fixtures: the demo balcony case on a coarse mesh, and one 2×3 sweep of it."""

from __future__ import annotations

from pathlib import Path

import pytest

from fvheat.cli.main import main

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


def sweep_args(out: Path, *extra: str) -> list[str]:
    """``fvheat sweep`` arguments for the 2×3 coarse sweep of the balcony case into ``out``."""
    return ["sweep", str(CASE), *VARY_2X3, *COARSE, "--out", str(out), "-q", *extra]


@pytest.fixture(scope="session")
def sweep_2x3(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path]:
    """One finished 2×3 sweep (2 workers): its folder and its exported table."""
    folder = tmp_path_factory.mktemp("sweep_2x3")
    table = folder.parent / "sweep_2x3.csv"
    code = main(sweep_args(folder, "--jobs", "2", "--table", str(table)))
    assert code == 0
    return folder, table
