"""ψ in several dimension systems from one run.

An external wall corner: an L of two walls of thickness d. With internal dimensions each
wall is l_i long (to the inside corner), with external dimensions l_e = l_i + d (to the
outside corner). Source: geometry of an L-shaped corner (exact) with ISO 10211's
ψ = L2D − Σ U·l: since L2D does not depend on the dimension system,
ψ_e = ψ_i − 2·U·d. Tolerance 1e-12 W/(m·K) (round-off). Overall internal dimensions differ
from internal ones only at intermediate floors and internal walls (ISO 13789 / ISO 14683
terms, from memory), so for a corner of two external walls they are equal: exact.
That an external corner's ψ_e is negative for a homogeneous wall is common practice (the
external lengths count the corner square twice).
"""

from __future__ import annotations

import json

import pytest

from fvheat.cli.main import main

from .helpers import materials_toml, num, regions_toml, study, surface_toml, write_case

D = 0.3  # m, wall thickness
H = 1.5  # m, each leg from the outside corner to its cut-off plane
LAMBDA = 0.8  # W/(m·K)
R_SI, R_SE = 0.13, 0.04


def corner_toml(length: str) -> str:
    """The corner with both flanking walls taken from layer cuts; ``length`` is the TOML
    value of each wall's ``length`` (``{l_i}`` and ``{l_e}`` are filled in)."""
    li, le = H - D, H
    inside = [((D, D), (D, H)), ((D, D), (H, D))]
    outside = [((0.0, 0.0), (0.0, H)), ((0.0, 0.0), (H, 0.0))]
    return f"""
title = "external wall corner"
[mesh]
max_cell = 0.05
min_cell = 0.005
{materials_toml({"masonry": LAMBDA})}
{regions_toml([("masonry", (0.0, 0.0, D, H)), ("masonry", (0.0, 0.0, H, D))])}
{surface_toml("inside", inside, 20.0, R_SI)}
{surface_toml("outside", outside, -5.0, R_SE)}
[junction]
inside = ["inside"]
outside = ["outside"]
[[junction.flanking]]
name = "wall_x"
cut = [[0.0, {num(H - 0.1)}], [{num(D)}, {num(H - 0.1)}]]
length = {length.format(l_i=num(li), l_e=num(le))}
[[junction.flanking]]
name = "wall_y"
cut = [[{num(H - 0.1)}, 0.0], [{num(H - 0.1)}, {num(D)}]]
length = {length.format(l_i=num(li), l_e=num(le))}
"""


ALL = "{{ internal = {l_i}, overall_internal = {l_i}, external = {l_e} }}"


def test_external_corner_psi_by_dimension_system(tmp_path):
    """ψ_e = ψ_i − 2·U·d (exact geometry relation), ψ_oi = ψ_i, one run."""
    j = study(tmp_path, corner_toml(ALL)).junction
    assert j is not None
    u = j.flanking[0].u_value
    assert u == pytest.approx(1.0 / (R_SI + D / LAMBDA + R_SE), rel=1e-12)  # ISO 6946
    by = j.psi_by_dimensions
    assert list(by) == ["internal", "overall_internal", "external"]
    assert by["internal"] == j.psi
    assert by["overall_internal"] == by["internal"]
    assert by["external"] == pytest.approx(by["internal"] - 2.0 * u * D, abs=1e-12)
    assert by["external"] < 0.0 < by["internal"]  # common practice for external corners
    assert j.psi_note is None


def test_primary_system_is_the_declared_one(tmp_path):
    """junction.dimensions = "external" makes ψ the external one; the others are listed."""
    j = study(tmp_path, corner_toml(ALL) + "", ["junction.dimensions=external"]).junction
    assert j is not None
    assert j.psi == j.psi_by_dimensions["external"]
    assert next(iter(j.psi_by_dimensions)) == "external"


def test_one_system_is_said(tmp_path):
    """Lengths in one system only: ψ in that system, said in the summary."""
    path = write_case(tmp_path, corner_toml("{l_i}"))
    out = tmp_path / "out"
    assert main(["run", str(path), "--out", str(out), "--quiet", "--no-plots"]) == 0
    j = json.loads((out / "summary.json").read_text())["junction"]
    assert list(j["psi_by_dimensions"]) == ["internal"]
    assert j["psi_by_dimensions"]["internal"] == j["psi"]
    assert "internal dimensions only" in j["psi_dimensions_note"]
    report = (out / "report.md").read_text()
    assert "internal dimensions only" in report


def test_summary_and_report_show_every_system(tmp_path):
    path = write_case(tmp_path, corner_toml(ALL))
    out = tmp_path / "out"
    assert main(["run", str(path), "--out", str(out), "--quiet", "--no-plots"]) == 0
    j = json.loads((out / "summary.json").read_text())["junction"]
    assert set(j["psi_by_dimensions"]) == {"internal", "overall_internal", "external"}
    assert "psi_dimensions_note" not in j
    assert j["flanking"][0]["lengths"]["external"] == pytest.approx(H)
    report = (out / "report.md").read_text()
    for words in ("internal dimensions", "overall internal dimensions", "external dimensions"):
        assert words in report


@pytest.mark.parametrize(
    ("override", "key", "words"),
    [
        ("junction.flanking.0.length={external=1.5}", "junction.flanking.0.length", "no internal"),
        ("junction.flanking.0.length={inner=1.5}", "junction.flanking.0.length", "inner"),
        ("junction.flanking.0.length={}", "junction.flanking.0.length", "expected a length"),
        (
            "junction.flanking.1.length={internal=1.2,external=-1}",
            "junction.flanking.1.length.external",
            "greater than 0",
        ),
    ],
)
def test_bad_lengths(tmp_path, capsys, override, key, words):
    """One line naming the file and the key, exit 2."""
    path = write_case(tmp_path, corner_toml(ALL))
    assert main(["run", str(path), "--set", override, "--quiet", "--out", str(tmp_path / "o")]) == 2
    lines = capsys.readouterr().err.strip().splitlines()
    assert len(lines) == 1
    assert lines[0].startswith(f"fvheat: error: {path}: {key}"), lines[0]
    assert words in lines[0]
