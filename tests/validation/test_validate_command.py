"""``fvheat validate``: the reference cases shipped in fvheat/validation pass on this
installation, fail when the solver is perturbed, and use the same reference formulas as
the validation tests here."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

import fvheat.assembly.system as system_module
from fvheat.cli.main import main
from fvheat.validation import composite, rectangle, run_validation, semi_infinite
from fvheat.validation.check import Check

from . import test_rectangle_fourier, test_skfem_composite, test_transient


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


def test_package_references_are_the_tested_formulas():
    """The shipped references agree with the ones the validation tests use (to round-off)."""
    pts = np.array(rectangle.POINTS)
    assert rectangle.POINTS == test_rectangle_fourier.POINTS
    np.testing.assert_allclose(
        rectangle.fourier(pts[:, 0], pts[:, 1]),
        test_rectangle_fourier.fourier(pts[:, 0], pts[:, 1]),
        rtol=0,
        atol=1e-12,
    )
    assert (semi_infinite.K, semi_infinite.H_SURF) == (test_transient.K_A, test_transient.H_A)
    for depth in (0.0, 0.03, 0.1):
        assert semi_infinite.exact(depth, 3600.0) == pytest.approx(
            float(test_transient.semi_infinite(depth, 3600.0)), abs=1e-12
        )


def test_stored_scikit_fem_references_are_recomputed():
    """The composite junction shipped in fvheat/validation is the one of
    test_skfem_composite.py, and its stored references are what scikit-fem gives (P2, 10 mm
    mesh) to the 5 or more digits stored."""
    t = test_skfem_composite
    assert composite.CONDUCTIVITY == t.CONDUCTIVITY
    assert list(composite.REGIONS) == t.REGIONS
    assert list(composite.INSIDE) == t.INSIDE and list(composite.OUTSIDE) == t.OUTSIDE
    assert (composite.T_IN, composite.R_IN, composite.T_OUT, composite.R_OUT) == (
        t.T_IN,
        t.R_IN,
        t.T_OUT,
        t.R_OUT,
    )
    assert composite.POINT == t.POINTS["slab_in_wall"]
    q_in, _, temps = t.skfem_solution(0.01)
    assert composite.HEAT_FLOW_REF == pytest.approx(q_in, rel=1e-6)
    assert composite.THETA_REF == pytest.approx(temps["slab_in_wall"], abs=1e-5)
