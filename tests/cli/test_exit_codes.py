"""Exit codes of ``fvheat run``: 0 success, 2 bad input, 1 numerical failure — each with a
one-line message, and nothing written when the run fails."""

from __future__ import annotations

from casefiles import write_case

from fvheat.cli.main import main

WALL = """
[mesh]
max_cell = 0.05
[materials.w]
conductivity = 1.0
[[regions]]
material = "w"
box = [0, 0, 0.2, 0.2]
[[boundaries]]
name = "in"
edges = [[[0, 0], [0, 0.2]]]
air_temperature = 20
resistance = 0.13
[[boundaries]]
name = "out"
edges = [[[0.2, 0], [0.2, 0.2]]]
air_temperature = -5
convection = 10
emissivity = 0.9
radiant_temperature = -30
"""


def test_success_bad_input_and_numerical_failure(tmp_path, capsys):
    case = write_case(tmp_path, WALL)
    assert main(["run", str(case), "-o", str(tmp_path / "ok"), "-q", "--no-plots"]) == 0
    assert (tmp_path / "ok" / "summary.json").is_file()

    bad = [
        "run",
        str(case),
        "-o",
        str(tmp_path / "bad"),
        "-q",
        "--set",
        "materials.w.conductivity=-1",
    ]
    assert main(bad) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "materials.w.conductivity" in err
    assert not (tmp_path / "bad").exists()

    # an AMG-CG allowed one iteration cannot converge: a numerical failure, exit 1
    failing = [
        "run",
        str(case),
        "-o",
        str(tmp_path / "fail"),
        "-q",
        "--set",
        'solver.method="amg"',
        "--set",
        "solver.max_iterations=1",
    ]
    assert main(failing) == 1
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and err.startswith("fvheat: numerical failure:")
    assert not (tmp_path / "fail").exists()
