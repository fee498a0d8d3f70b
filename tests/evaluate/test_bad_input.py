"""Bad ``[junction]`` input: the CLI exits with code 2 and one line naming the file and the
key path (the case-file contract of the design notes; no external source needed)."""

from __future__ import annotations

import pytest

from fvheat.cli.main import main

from .helpers import write_case

BASE = """
title = "two-material wall"
[mesh]
max_cell = 0.1
min_cell = 0.02
[materials.brick]
conductivity = 0.77
[materials.concrete]
conductivity = 2.3
[[regions]]
material = "brick"
box = [0.0, 0.0, 0.3, 1.0]
[[regions]]
material = "concrete"
box = [0.0, 1.0, 0.3, 2.0]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 1.0]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "inside_upper"
edges = [[[0.0, 1.0], [0.0, 2.0]]]
air_temperature = {upper}
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.3, 0.0], [0.3, 2.0]]]
air_temperature = -5.0
resistance = 0.04
[junction]
inside = {inside}
outside = {outside}
centre = [0.0, 1.0]
[[junction.flanking]]
name = "wall"
length = 2.0
{flanking}
"""
GOOD_CUT = "cut = [[0.0, 0.5], [0.3, 0.5]]"

BAD = {
    "unknown boundary": (
        {"inside": '["inside", "insdie"]'},
        "junction.inside",
        "no boundary is called 'insdie'",
    ),
    "both u_value and cut": (
        {"flanking": "u_value = 0.3\n" + GOOD_CUT},
        "junction.flanking.0",
        "exactly one of u_value",
    ),
    "neither u_value nor cut": ({"flanking": ""}, "junction.flanking.0", "exactly one of u_value"),
    "cut along the brick-concrete interface": (
        {"flanking": "cut = [[0.0, 1.0], [0.3, 1.0]]"},
        "junction.flanking.0.cut",
        "material edge",
    ),
    "cut ending inside the body": (
        {"flanking": "cut = [[0.0, 0.5], [0.2, 0.5]]"},
        "junction.flanking.0.cut",
        "surfaces",
    ),
    "sloped cut not perpendicular to the element": (
        {"flanking": "cut = [[0.0, 0.5], [0.3, 0.6]]"},
        "junction.flanking.0.cut",
        "perpendicular to its surfaces",
    ),
    "different inside temperatures": (
        {"inside": '["inside", "inside_upper"]', "upper": "18.0"},
        "junction.inside",
        "share one temperature",
    ),
    # L2D = Φ/(θ_i − θ_e) counts each surface's heat flow once (ISO 10211); a name listed
    # twice gave L2D and ψ with that surface's flow doubled, exit 0
    "a boundary listed twice on the warm side": (
        {"inside": '["inside", "inside_upper", "inside"]'},
        "junction.inside",
        "'inside' listed more than once",
    ),
    "a boundary listed twice on the cold side": (
        {"outside": '["outside", "outside"]'},
        "junction.outside",
        "'outside' listed more than once",
    ),
    "a boundary both inside and outside": (
        {"inside": '["inside", "outside"]'},
        "junction.outside",
        "both inside and outside",
    ),
}


def case_text(**kw: str) -> str:
    values = {
        "upper": "20.0",
        "inside": '["inside", "inside_upper"]',
        "outside": '["outside"]',
        "flanking": GOOD_CUT,
    }
    values.update(kw)
    return BASE.format(**values)


def test_good_case_runs(tmp_path, capsys):
    """The base case itself is fine (exit 0), so each bad one fails for its own reason."""
    path = write_case(tmp_path, case_text())
    assert main(["run", str(path), "--out", str(tmp_path / "out"), "--quiet"]) == 0


@pytest.mark.parametrize("what", list(BAD))
def test_bad_junction_input(tmp_path, capsys, what):
    """Exit code 2, one stderr line ``fvheat: error: FILE: KEY: message``, nothing written."""
    kw, key, words = BAD[what]
    path = write_case(tmp_path, case_text(**kw))
    out = tmp_path / "out"
    assert main(["run", str(path), "--out", str(out), "--quiet"]) == 2
    err = capsys.readouterr().err
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    assert lines[0].startswith(f"fvheat: error: {path}: {key}: "), lines[0]
    assert words in lines[0]
    assert not (out / "summary.json").exists()
