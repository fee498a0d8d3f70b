"""A summary.json edited into another shape (a table where a number was, text for a
point, a list for a table) is refused by ``fvheat report``, ``plot`` and ``collect`` in
one line naming the file and the key (exit 2, the report already there kept), not with a
traceback (the bad-input contract of the project rules). The run is an invented wall
junction; no physical reference is involved."""

from __future__ import annotations

import json
import shutil

import pytest
from casefiles import write_case

from fvheat.cli.main import main
from fvheat.output.summary_shape import summary_problem

WALL = """
title = "two-layer wall"
[mesh]
max_cell = 0.05
[materials.brick]
conductivity = 0.8
density = 1800
specific_heat = 900
[materials.wool]
conductivity = 0.035
density = 30
specific_heat = 1000
[[regions]]
material = "brick"
box = [0.0, 0.0, 0.2, 1.5]
[[regions]]
material = "wool"
box = [0.2, 0.0, 0.3, 1.5]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 1.5]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.3, 0.0], [0.3, 1.5]]]
air_temperature = -5.0
resistance = 0.04
[[probes]]
name = "mid"
at = [0.1, 0.7]
[junction]
inside = ["inside"]
outside = ["outside"]
f_rsi_limit = 0.7
[[junction.flanking]]
name = "wall"
length = 1.5
cut = [[0.0, 0.5], [0.3, 0.5]]
"""
TIME = "[time]\nduration = 7200\nstep = 600\ninitial_temperature = 10.0\n"


@pytest.fixture(scope="module")
def runs(tmp_path_factory):
    """A steady and a transient results folder (no figures, no fields)."""
    folder = tmp_path_factory.mktemp("runs")
    out = {}
    for kind, text in (
        ("steady", WALL),
        ("transient", WALL.replace("[junction]", TIME + "[junction]")),
    ):
        path = write_case(folder, text, f"{kind}.toml")
        target = folder / kind
        assert (
            main(
                [
                    "run",
                    str(path),
                    "--out",
                    str(target),
                    "--quiet",
                    "--no-plots",
                    "--fields",
                    "none",
                ]
            )
            == 0
        )
        out[kind] = target
    return out


def test_real_summaries_pass(runs):
    for folder in runs.values():
        assert summary_problem(json.loads((folder / "summary.json").read_text())) is None


BAD = [
    ("steady", ("boundaries",), [1]),
    ("steady", ("boundaries", "inside", "heat_flow"), "x"),
    ("steady", ("boundaries", "inside", "min_at"), 3),
    ("steady", ("probes",), "x"),
    ("steady", ("probes", "mid"), [1]),
    ("steady", ("junction",), 3),
    ("steady", ("junction", "psi"), "x"),
    ("steady", ("junction", "f_Rsi"), None),
    ("steady", ("junction", "f_Rsi_limit"), None),  # a pass/fail without its limit
    ("steady", ("junction", "theta_si_min_at"), [1]),
    ("steady", ("junction", "flanking"), "x"),
    ("steady", ("junction", "psi_by_dimensions"), 3),
    ("steady", ("overrides",), 3),
    ("steady", ("warnings",), None),
    ("steady", ("mesh",), "x"),
    ("steady", ("energy_balance",), [1]),
    ("steady", ("solve_seconds",), "x"),
    ("transient", ("boundaries", "inside", "min_temperature_over_run_at"), "x"),
    ("transient", ("boundaries", "inside", "max_temperature_over_run_time_s"), "x"),
    ("transient", ("junction", "f_min_over_run"), [1]),
]


@pytest.mark.parametrize(("kind", "path", "bad"), BAD, ids=[".".join(p) for _, p, _ in BAD])
def test_damaged_summary_refused_in_one_line(runs, tmp_path, capsys, kind, path, bad):
    folder = tmp_path / "run"
    shutil.copytree(runs[kind], folder)
    f = folder / "summary.json"
    data = json.loads(f.read_text())
    node = data
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = bad
    f.write_text(json.dumps(data))
    report = (folder / "report.html").read_bytes()
    for command in ("report", "collect", "plot"):
        assert main([command, str(folder)]) == 2, command
        lines = capsys.readouterr().err.strip().splitlines()
        assert len(lines) == 1, lines
        assert lines[0].startswith(f"fvheat: error: {f}: {'.'.join(path)}: expected"), lines[0]
    assert (folder / "report.html").read_bytes() == report
