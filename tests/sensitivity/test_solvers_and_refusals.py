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
