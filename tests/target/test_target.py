"""``fvheat target``: the found value meets the goal within its tolerance, a fresh run at
that value reproduces it, an unreachable goal exits 1 naming both ends, bad goals exit 2.

The reference for "meets the goal" is an independent full run (load, mesh, solve,
evaluate) of the balcony demo at the value target.json reports.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from fvheat.case.load import load_case
from fvheat.cli.main import main
from fvheat.sensitivity.named import named_results
from fvheat.study import run_study

BALCONY = Path(__file__).resolve().parents[2] / "cases" / "balcony_slab.toml"
BREAK = "regions.3.material=thermal_break"


def _fresh(key: str, value: float, *more: str) -> dict[str, float]:
    case = load_case(BALCONY, (*more, f"{key}={value!r}"))
    return named_results(run_study(case, check_grid=False))


@pytest.mark.slow
def test_thermal_break_conductivity_for_psi(tmp_path: Path, capsys) -> None:
    out = tmp_path / "t"
    key = "materials.thermal_break.conductivity"
    code = main(
        [
            "target",
            str(BALCONY),
            "--set",
            BREAK,
            "--vary",
            key,
            "--goal",
            "psi<=0.20",
            "--out",
            str(out),
        ]
    )
    assert code == 0
    printed = capsys.readouterr().out
    assert "run  1 (bracket)" in printed and "(search)" in printed
    t = json.loads((out / "target.json").read_text())
    assert t["key"] == key and t["goal"] == "psi<=0.2" and t["met"] is True
    assert 0.2 - t["tolerance"] <= t["achieved"] <= 0.2
    assert 2 <= len(t["iterations"]) <= 15
    # a fresh run at the found value reproduces it, as does the written folder
    again = _fresh(key, t["value"], BREAK)["psi"]
    assert again == pytest.approx(t["achieved"], rel=1e-10)
    summary = json.loads((out / "summary.json").read_text())
    assert summary["junction"]["psi"] == pytest.approx(t["achieved"], rel=1e-10)
    assert f"{key}={t['value']!r}" in summary["overrides"]


@pytest.mark.slow
def test_greater_or_equal_goal_on_f_rsi(tmp_path: Path) -> None:
    key = "materials.slab.conductivity"
    code = main(
        [
            "target",
            str(BALCONY),
            "--vary",
            key,
            "--goal",
            "f_Rsi>=0.80",
            "--between",
            "0.5",
            "2.5",
            "--out",
            str(tmp_path / "f"),
            "-q",
        ]
    )
    assert code == 0
    t = json.loads((tmp_path / "f" / "target.json").read_text())
    assert 0.80 <= t["achieved"] <= 0.80 + t["tolerance"]
    assert _fresh(key, t["value"])["f_Rsi"] == pytest.approx(t["achieved"], rel=1e-10)


def test_unreachable_goal_exits_1_with_both_ends(tmp_path: Path, capsys) -> None:
    code = main(
        [
            "target",
            str(BALCONY),
            "--vary",
            "materials.slab.conductivity",
            "--goal",
            "psi<=0.20",
            "--between",
            "1.0",
            "3.0",
            "--out",
            str(tmp_path / "u"),
        ]
    )
    assert code == 1
    err = capsys.readouterr().err
    assert "not reachable" in err
    # regression pins of cases/balcony_slab.toml (the tool's own ψ at these slab
    # conductivities, as in tests/evaluate/test_demo_cases.py), printed to 2 decimals
    assert "materials.slab.conductivity = 1 gives psi = 0.59" in err
    assert "materials.slab.conductivity = 3 gives psi = 1.29" in err
    assert not (tmp_path / "u").exists()


@pytest.mark.parametrize(
    ("goal", "message"),
    [
        ("psi<0.2", "expected QUANTITY<=VALUE"),
        ("colour<=1", "unknown quantity"),
        ("psi<=abc", "not a number"),
    ],
)
def test_bad_goal_exits_2(tmp_path: Path, capsys, goal: str, message: str) -> None:
    code = main(
        [
            "target",
            str(BALCONY),
            "--vary",
            "materials.slab.conductivity",
            "--goal",
            goal,
            "--out",
            str(tmp_path / "b"),
        ]
    )
    assert code == 2
    err = capsys.readouterr().err
    assert message in err and "--goal" in err and "Traceback" not in err


def test_missing_key_exits_2(tmp_path: Path, capsys) -> None:
    code = main(
        [
            "target",
            str(BALCONY),
            "--vary",
            "materials.glass.conductivity",
            "--goal",
            "psi<=0.2",
            "--out",
            str(tmp_path / "m"),
        ]
    )
    assert code == 2
    assert "materials.glass.conductivity" in capsys.readouterr().err


@pytest.mark.slow
def test_temperature_key_and_heat_flow_goal(tmp_path: Path) -> None:
    """A key that may be negative (the outside air temperature, no sensitivity: the bracket
    grows in steps from the case's −5 °C) and a goal on a boundary heat flow."""
    key = "boundaries.outside.air_temperature"
    out = tmp_path / "a"
    assert (
        main(
            [
                "target",
                str(BALCONY),
                "--vary",
                key,
                "--goal",
                "theta_si_min>=15",
                "--out",
                str(out),
                "-q",
            ]
        )
        == 0
    )
    t = json.loads((out / "target.json").read_text())
    assert 15.0 <= t["achieved"] <= 15.0 + t["tolerance"]
    assert _fresh(key, t["value"])["theta_si_min"] == pytest.approx(t["achieved"], rel=1e-10)
    # θ_si,min is linear in the outside temperature (a linear problem; superposition): the
    # straight line through two other runs gives the achieved value at the found one
    a, b = _fresh(key, -5.0)["theta_si_min"], _fresh(key, 5.0)["theta_si_min"]
    line = a + (t["value"] + 5.0) * (b - a) / 10.0
    assert line == pytest.approx(t["achieved"], abs=1e-9)

    out = tmp_path / "h"
    key = "materials.slab.conductivity"
    assert (
        main(
            [
                "target",
                str(BALCONY),
                "--vary",
                key,
                "--goal",
                "heat_flow_outside>=-40",
                "--out",
                str(out),
                "-q",
            ]
        )
        == 0
    )
    t = json.loads((out / "target.json").read_text())
    assert -40.0 <= t["achieved"] <= -40.0 + t["tolerance"]
