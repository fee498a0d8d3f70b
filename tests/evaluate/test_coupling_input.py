"""``[[junction.environments]]``: bad input is one line naming the file and the key (exit 2,
the case-file contract), and environments next to inside / outside leave ψ as it was.

For two environments the one coupling coefficient is L2D (ISO 10211 defines L2D as the
coupling coefficient between the two environments): equal to 1e-9 relative.
"""

from __future__ import annotations

import json

import pytest

from fvheat.cli.main import main

from .helpers import study, write_case
from .test_bad_input import case_text

ENVS = """
[[junction.environments]]
name = "room"
boundaries = ["inside", "inside_upper"]
[[junction.environments]]
name = "out"
boundaries = ["outside"]
"""


def test_two_environments_give_l2d(tmp_path):
    """Pair and environments together: ψ unchanged, L_12 = L2D, the summary holds both."""
    plain = study(tmp_path, case_text(), name="plain.toml").junction
    both = study(tmp_path, case_text() + ENVS, name="both.toml")
    assert both.junction.psi == plain.psi
    L = both.coupling.matrix
    assert L[0, 1] == pytest.approx(plain.l2d, rel=1e-9)
    assert L[0, 0] == pytest.approx(L[0, 1], rel=1e-9)  # the diagonal is the row sum
    path = write_case(tmp_path, case_text() + ENVS, "run.toml")
    out = tmp_path / "out"
    assert main(["run", str(path), "--out", str(out), "--quiet", "--no-plots"]) == 0
    j = json.loads((out / "summary.json").read_text())["junction"]
    assert j["psi"] == plain.psi
    assert j["coupling"]["environments"] == ["room", "out"]
    assert "Thermal coupling coefficients" in (out / "report.md").read_text()


def test_pair_only_summary_has_no_coupling(tmp_path):
    path = write_case(tmp_path, case_text())
    out = tmp_path / "out"
    assert main(["run", str(path), "--out", str(out), "--quiet", "--no-plots"]) == 0
    assert "coupling" not in json.loads((out / "summary.json").read_text())["junction"]


BAD = {
    "one environment": (
        '\n[[junction.environments]]\nname = "room"\nboundaries = ["inside"]\n',
        "junction.environments",
        "two or more",
    ),
    "a boundary in two environments": (
        ENVS.replace('["outside"]', '["outside", "inside"]'),
        "junction.environments.1.boundaries",
        "already belongs to environment 'room'",
    ),
    "a boundary in none": (
        ENVS.replace('["inside", "inside_upper"]', '["inside"]'),
        "junction.environments",
        "'inside_upper'",
    ),
    "a boundary listed twice in one environment": (
        ENVS.replace('["outside"]', '["outside", "outside"]'),
        "junction.environments.1.boundaries",
        "'outside' listed more than once",
    ),
    "an unknown boundary": (
        ENVS.replace('["outside"]', '["outsdie"]'),
        "junction.environments.1.boundaries",
        "no boundary is called 'outsdie'",
    ),
    "a radiating boundary": (
        ENVS,
        "junction.environments",
        "radiates",
    ),
}


@pytest.mark.parametrize("what", list(BAD))
def test_bad_environments(tmp_path, capsys, what):
    extra, key, words = BAD[what]
    text = case_text() + extra
    if what == "a radiating boundary":
        text = text.replace("resistance = 0.04", "convection = 20.0\nemissivity = 0.9")
    path = write_case(tmp_path, text)
    out = tmp_path / "out"
    assert main(["run", str(path), "--out", str(out), "--quiet"]) == 2
    lines = capsys.readouterr().err.strip().splitlines()
    assert len(lines) == 1, lines
    assert lines[0].startswith(f"fvheat: error: {path}: {key}: "), lines[0]
    assert words in lines[0]
    assert not (out / "summary.json").exists()


def test_environments_alone_need_no_sides(tmp_path):
    """Without inside / outside the junction gives coupling only (no ψ)."""
    text = case_text().replace('inside = ["inside", "inside_upper"]\noutside = ["outside"]\n', "")
    text = text.split("[[junction.flanking]]")[0]
    s = study(tmp_path, text + ENVS)
    assert s.junction is None and s.coupling is not None
    half = case_text().replace('outside = ["outside"]\n', "")
    path = write_case(tmp_path, half, "half.toml")
    assert main(["run", str(path), "--out", str(tmp_path / "o"), "--quiet"]) == 2
