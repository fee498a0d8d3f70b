"""What ``fvheat run --sensitivities`` writes: summary.json entries for every quantity and
key (elasticity = derivative × value / quantity), the console's ranked table, the report's
section and the bar chart in the figure index. The numbers themselves are checked against
finite differences in tests/sensitivity/."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from fvheat.cli.main import main

CASES = Path(__file__).resolve().parents[2] / "cases"
COARSE = ["--set", "mesh.max_cell=0.1", "--set", "mesh.min_cell=0.01"]


def test_run_writes_every_sensitivity_output(tmp_path: Path, capsys) -> None:
    out = tmp_path / "r"
    code = main(
        ["run", str(CASES / "balcony_slab.toml"), "--sensitivities", "--out", str(out), *COARSE]
    )
    assert code == 0
    printed = capsys.readouterr().out
    assert "sensitivities of ψ" in printed
    assert "ψ is most sensitive to materials.slab.conductivity" in printed

    s = json.loads((out / "summary.json").read_text())
    sens = s["sensitivities"]
    expected = {"psi", "L2D", "f_Rsi", "theta_si_min"} | {f"heat_flow_{b}" for b in s["boundaries"]}
    assert expected <= set(sens)
    keys = set(sens["psi"])
    assert "materials.slab.conductivity" in keys and "boundaries.outside.resistance" in keys
    values = {"psi": s["junction"]["psi"], "f_Rsi": s["junction"]["f_Rsi"]}
    for q, value in values.items():
        assert set(sens[q]) == keys
        for e in sens[q].values():
            assert e["method"] == "adjoint"
            assert e["elasticity"] == pytest.approx(e["derivative"] * e["value"] / value)
    assert s["sensitivity_seconds"] >= 0.0

    figures = json.loads((out / "figures" / "figures.json").read_text())
    assert "sensitivities" in [f["name"] for f in figures]
    assert (out / "figures" / "sensitivities.png").stat().st_size > 1000
    report = (out / "report.md").read_text()
    assert "### Sensitivities" in report
    assert "materials.slab.conductivity" in report


def test_run_without_sensitivities_writes_none(tmp_path: Path) -> None:
    out = tmp_path / "n"
    assert (
        main(
            [
                "run",
                str(CASES / "balcony_slab.toml"),
                "--out",
                str(out),
                "-q",
                "--no-plots",
                *COARSE,
            ]
        )
        == 0
    )
    s = json.loads((out / "summary.json").read_text())
    assert "sensitivities" not in s
    assert "Sensitivities" not in (out / "report.md").read_text()
