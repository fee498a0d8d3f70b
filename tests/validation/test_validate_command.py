"""``fvheat validate``: the reference cases shipped in fvheat/validation pass on this
installation and fail when the solver is perturbed. Their reference formulas are the ones
the validation tests here import, each checked there against published values
(test_wall_1d, test_rectangle_fourier, test_transient); the stored scikit-fem numbers are
recomputed by test_skfem_composite."""

from __future__ import annotations

import dataclasses

import fvheat.assembly.system as system_module
from fvheat.cli.main import main
from fvheat.validation import run_validation
from fvheat.validation.check import Check


def test_validate_passes_and_prints_the_table(capsys):
    assert main(["validate"]) == 0
    out = capsys.readouterr().out
    for word in ("case", "quantity", "reference", "computed", "tolerance", "pass"):
        assert word in out.splitlines()[2]
    assert "ISO 10211 case 1" in out and "Sources of the references:" in out
    assert "checks passed." in out and " NO" not in out


def test_validate_fails_when_a_conductivity_is_perturbed(monkeypatch, capsys):
    """Every cell conductivity 3 % high (an installation computing wrong): exit 1."""
    original = system_module.conductivity
    monkeypatch.setattr(
        system_module, "conductivity", lambda case, mesh: 1.03 * original(case, mesh)
    )
    assert main(["validate"]) == 1
    out = capsys.readouterr().out
    assert "FAILED" in out and " NO" in out
    failed = {c.case for c in run_validation() if not c.passed}
    assert {"1-D wall", "semi-infinite solid", "balcony slab 2-D"} <= failed
    # one conductivity everywhere and fixed temperatures: the field does not depend on it
    assert "ISO 10211 case 1" not in failed


def test_every_check_names_its_source_and_can_fail():
    checks = run_validation()
    assert len(checks) >= 5
    for c in checks:
        assert c.source and c.tolerance > 0 and c.passed
        off = c.tolerance * (abs(c.reference) if c.relative else 1.0)
        assert not dataclasses.replace(c, computed=c.reference + 1.01 * off).passed
    assert not Check("x", "q", "K", 1.0, float("nan"), 1.0, "s").passed
