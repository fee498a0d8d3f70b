"""``[parameters]``: named numbers substituted into coordinates. The reference is always
the same case with the numbers typed in place (plain substitution must give the very same
case and results)."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from casefiles import load

from fvheat.case.load import load_case
from fvheat.cli.main import main
from fvheat.study import run_study

CASES = Path(__file__).resolve().parents[2] / "cases"

WALL = """
[parameters]
thickness = {thickness}

[mesh]
max_cell = 0.05

[materials.w]
conductivity = 1.0

[[regions]]
material = "w"
box = [0, 0, {x1}, 0.5]

[[boundaries]]
name = "in"
edges = [[[0, 0], [0, 0.5]]]
air_temperature = 20
resistance = 0.13

[[boundaries]]
name = "out"
edges = [[[{x1}, 0], [{x1}, 0.5]]]
air_temperature = -5
resistance = 0.04
"""


def _wall(tmp_path: Path, x1: str, thickness: str = "0.3", units: str = "", **kw):
    text = WALL.format(x1=x1, thickness=thickness)
    if units:
        text = f'[geometry]\nunits = "{units}"\n' + text
    return load(tmp_path, text, **kw)


def _flows(case) -> dict[str, float]:
    return {n: r.heat_flow for n, r in run_study(case).solution.surfaces.items()}


def test_both_forms_give_the_typed_case(tmp_path: Path) -> None:
    typed = _flows(_wall(tmp_path, "0.3"))
    assert _flows(_wall(tmp_path, '"${thickness}"')) == typed
    assert _flows(_wall(tmp_path, '{ parameter = "thickness" }')) == typed
    # 0.1 + 2 × 0.1 is 0.30000000000000004 in floating point: equal to round-off
    form = '{ parameter = "thickness", offset = 0.1, scale = 2 }'
    assert _flows(_wall(tmp_path, form, thickness="0.1")) == pytest.approx(typed, rel=1e-12)
    # one-dimensional check: q = ΔT/(R_si + d/λ + R_se) (Incropera & DeWitt, plane wall)
    assert typed["in"] == pytest.approx(25.0 / (0.13 + 0.3 + 0.04) * 0.5, rel=1e-9)


def test_set_changes_every_use(tmp_path: Path) -> None:
    moved = _wall(tmp_path, '"${thickness}"', overrides=["parameters.thickness=0.2"])
    typed = _wall(tmp_path, "0.2")
    assert np.array_equal(moved.regions[0].vertices, typed.regions[0].vertices)
    assert moved.boundary("out").edges == typed.boundary("out").edges
    assert moved.parameters == {"thickness": 0.2}


def test_parameters_follow_the_case_units(tmp_path: Path) -> None:
    """Substituted before ``[geometry] units`` converts: a parameter used as a coordinate is
    in the case's unit."""
    mm = _wall(tmp_path, '"${thickness}"', thickness="300", units="mm")
    assert mm.regions[0].vertices[1, 0] == pytest.approx(0.3, abs=1e-12)  # 300 mm
    assert mm.boundary("out").edges[0][0][0] == pytest.approx(0.3, abs=1e-12)


@pytest.mark.parametrize(
    ("x1", "thickness", "key", "message"),
    [
        ('"${depth}"', "0.3", "regions.0.box.2", "no parameter 'depth'"),
        ('{ parameter = "thickness", offset = "a" }', "0.3", "regions.0.box.2.offset", "number"),
        ('"${thickness}"', '"thick"', "parameters.thickness", "number"),
    ],
)
def test_bad_parameters_exit_2_naming_the_key(
    tmp_path: Path, capsys, x1: str, thickness: str, key: str, message: str
) -> None:
    path = tmp_path / "bad.toml"
    path.write_text(WALL.format(x1=x1, thickness=thickness))
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and str(path) in err and key in err and message in err


def test_demo_with_a_parameter_equals_the_typed_balcony() -> None:
    """cases/balcony_thermal_break.toml (break length as a parameter) gives exactly the ψ of
    cases/balcony_slab.toml with the break module material typed in place."""
    a = run_study(load_case(CASES / "balcony_thermal_break.toml"), check_grid=False).junction
    b = run_study(
        load_case(CASES / "balcony_slab.toml", ["regions.3.material=thermal_break"]),
        check_grid=False,
    ).junction
    assert a is not None and b is not None
    assert a.psi == b.psi and a.f_rsi == b.f_rsi


@pytest.mark.slow
def test_parameter_sensitivity_and_target(tmp_path: Path) -> None:
    """The finite-difference sensitivity to a parameter in summary.json matches a wider
    central difference of two full runs (step 10 mm, the reference) within 2 %, and
    `fvheat target --vary parameters.break_length` meets its goal, reproduced by a fresh run."""
    path = CASES / "balcony_thermal_break.toml"
    out = tmp_path / "run"
    assert main(["run", str(path), "--out", str(out), "-q", "--no-plots"]) == 0
    s = json.loads((out / "summary.json").read_text())
    d = s["sensitivities"]["psi"]["parameters.break_length"]["derivative"]
    psi = [
        run_study(load_case(path, [f"parameters.break_length={v}"]), check_grid=False).junction
        for v in (0.09, 0.07)
    ]
    wide = (psi[0].psi - psi[1].psi) / 0.02
    assert d == pytest.approx(wide, rel=0.02)
    assert d < 0.0  # a longer break lowers ψ

    t_out = tmp_path / "target"
    code = main(
        [
            "target",
            str(path),
            "--vary",
            "parameters.break_length",
            "--goal",
            "psi<=0.25",
            "--between",
            "0.08",
            "0.16",
            "--out",
            str(t_out),
            "-q",
        ]
    )
    assert code == 0
    t = json.loads((t_out / "target.json").read_text())
    assert 0.25 - t["tolerance"] <= t["achieved"] <= 0.25
    fresh = run_study(
        load_case(path, [f"parameters.break_length={t['value']!r}"]), check_grid=False
    ).junction
    assert fresh.psi == pytest.approx(t["achieved"], rel=1e-10)
