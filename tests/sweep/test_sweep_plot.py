"""``fvheat sweep-plot``: a result against one varied key, one line per value of another."""

from __future__ import annotations

import pytest

from fvheat.cli.main import main
from fvheat.errors import CaseError
from fvheat.sweep.plot import plot_lines
from fvheat.sweep.table import from_store

from .conftest import INSULATION, INSULATION_VALUES, SLAB, SLAB_VALUES, stored


def test_lines_hold_the_stored_results(sweep_2x3):
    folder, _ = sweep_2x3
    lines = plot_lines(from_store(folder), x=INSULATION, y="psi", series=SLAB)
    assert [line.label for line in lines] == list(SLAB_VALUES)
    psi = {(r.params[SLAB], float(r.params[INSULATION])): r.results["psi"] for r in stored(folder)}
    for line in lines:
        assert line.x == tuple(sorted(float(w) for w in INSULATION_VALUES))
        assert line.y == tuple(psi[(line.label, x)] for x in line.x)


def test_a_further_varied_key_must_be_pinned(sweep_2x3):
    folder, _ = sweep_2x3
    table = from_store(folder)
    with pytest.raises(CaseError, match="several rows"):
        plot_lines(table, x=INSULATION, y="psi")
    (line,) = plot_lines(table, x=INSULATION, y="psi", where=[f"{SLAB}=2.50"])
    assert len(line.x) == len(INSULATION_VALUES)


def test_sweep_plot_writes_a_png(sweep_2x3, tmp_path, capsys):
    folder, _ = sweep_2x3
    png = tmp_path / "psi.png"
    args = ["sweep-plot", str(folder), "--x", INSULATION, "--y", "psi", "--series", SLAB]
    assert main([*args, "--out", str(png)]) == 0
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert "Caution" in capsys.readouterr().out
    assert main([*args[:-4], "--y", "nonsense", "--out", str(png)]) == 2
    assert "unknown result 'nonsense'" in capsys.readouterr().err
