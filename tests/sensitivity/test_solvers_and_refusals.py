"""The adjoint on the AMG-CG path agrees with the direct one; runs it does not apply to are
refused in one line (exit 2)."""

from __future__ import annotations

from pathlib import Path

import pytest

from fvheat.cli.main import main
from tests.sensitivity.helpers import CASES, adjoint


def test_amg_path_agrees_with_the_direct_solver() -> None:
    """AMG-CG (relative residual 1e-12) against SuperLU: the same derivatives to 1e-6."""
    path = CASES / "balcony_slab.toml"
    direct = adjoint(path)
    amg = adjoint(path, ("solver.method=amg", "solver.tolerance=1e-12"))
    for q, (value, entries) in direct.quantities.items():
        for key, e in entries.items():
            scale = 1e-6 * (abs(e.derivative) + abs(value) / e.value)
            assert amg.derivative(q, key) == pytest.approx(e.derivative, abs=scale), (q, key)


def test_transient_run_refused_in_one_line(tmp_path: Path, capsys) -> None:
    name, message = "wall_daily_cycle.toml", "steady runs only"
    code = main(["run", str(CASES / name), "--sensitivities", "--out", str(tmp_path / "o"), "-q"])
    assert code == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "sensitivities" in err and message in err
    assert not (tmp_path / "o").exists()


def test_direct_solver_preferred_only_when_left_to_auto() -> None:
    """With sensitivities, "auto" keeps LU factorisations up to 150 000 cells (adjoint
    solves are then back-substitutions); an explicit choice is left alone."""
    from fvheat.case.load import load_case
    from fvheat.sensitivity.quantities import DIRECT_LIMIT, case_for_sensitivities

    path = CASES / "balcony_slab.toml"
    assert case_for_sensitivities(load_case(path)).solver.amg_above == DIRECT_LIMIT
    for chosen in (["solver.method=amg"], ["solver.amg_above=1000"]):
        case = load_case(path, chosen)
        assert case_for_sensitivities(case) is case


SOIL_WALL = """
[sensitivities]
enabled = true
[mesh]
max_cell = 0.05
[materials.soil]
conductivity = 1.5
density = 1800
specific_heat = 1400
latent_heat = 100000
phase_change = [-0.5, 0.0]
frozen = { conductivity = 2.2 }
[[regions]]
material = "soil"
box = [0, 0, 0.4, 0.2]
[[boundaries]]
name = "in"
edges = [[[0, 0], [0, 0.2]]]
air_temperature = 5
resistance = 0.13
[[boundaries]]
name = "out"
edges = [[[0.4, 0], [0.4, 0.2]]]
air_temperature = -10
resistance = 0.04
"""


def test_case_asking_where_they_do_not_apply_is_bad_input(tmp_path: Path, capsys) -> None:
    """[sensitivities] enabled with phase-dependent conductivity: refused at load time
    (also by `fvheat check`), naming the key."""
    path = tmp_path / "soil.toml"
    path.write_text(SOIL_WALL)
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err.strip()
    assert "sensitivities.enabled" in err and "phase-dependent conductivity" in err
    path.write_text(SOIL_WALL.replace("frozen = { conductivity = 2.2 }", ""))
    assert main(["check", str(path)]) == 0
