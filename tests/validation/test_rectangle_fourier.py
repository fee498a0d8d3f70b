"""2-D steady conduction in a rectangle against the Fourier-series solution.

Source: Carslaw & Jaeger, steady temperature in a rectangle; Incropera & DeWitt §4.2,
eq. 4.19: with θ = θ1 on the edge y = H and θ = 0 on the other three edges,

    θ/θ1 = (2/π) Σ_n ((−1)^(n+1) + 1)/n · sin(nπx/W) · sinh(nπy/W)/sinh(nπH/W).

Acceptance form: ISO 10211 validation case 1 compares 28 points of such a field and allows
at most 0.1 K deviation (from memory). The rectangle (1 m × 2 m), θ1 = 20 °C and the
lattice of 4 × 7 interior points are chosen here. The series, the points and the case are
those of ``fvheat validate`` (fvheat/validation/rectangle.py); the series itself is checked
here against values known independently of it.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from fvheat.validation.rectangle import POINTS, THETA1, case_text, fourier

from .helpers import observed_order, report, run


def max_error(tmp_path, h: float, kind: str = "rectilinear") -> float:
    sol = run(tmp_path, case_text(h), [f"mesh.kind={kind}"])
    assert sol.mesh.kind == kind
    pts = np.array(POINTS)
    exact = fourier(pts[:, 0], pts[:, 1])
    got = np.array([sol.probes[f"p{k}"] for k in range(len(POINTS))])
    return float(np.max(np.abs(got - exact)))


def test_series_against_known_values():
    """The reference formula from outside: on a square with one edge at θ1 and three at 0,
    the centre is at θ1/4 exactly (superposition of the four rotations of the problem gives
    θ1 everywhere; a textbook exercise, e.g. Incropera & DeWitt ch. 4 problems, from
    memory); on the edges the series gives the boundary values (θ1 on y = H away from the
    corners, 0 on x = 0 and x = W)."""
    centre = fourier(np.array([0.5]), np.array([0.5]), width=1.0, height=1.0, theta1=THETA1)
    assert centre[0] == pytest.approx(THETA1 / 4, abs=1e-9)
    edge = fourier(np.array([0.0, 1.0]), np.array([1.0, 1.0]))
    np.testing.assert_allclose(edge, 0.0, atol=1e-12)
    warm = fourier(np.array([0.3, 0.5]), np.array([2.0, 2.0]), terms=20000)
    np.testing.assert_allclose(warm, THETA1, atol=2e-3 * THETA1)


def test_series_is_converged():
    """The reference itself: 400 and 200 terms agree to 1e-12 K at the lattice."""
    pts = np.array(POINTS)
    diff = np.max(np.abs(fourier(pts[:, 0], pts[:, 1]) - fourier(pts[:, 0], pts[:, 1], 200)))
    assert diff <= 1e-12


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_28_points_within_0p1_kelvin(tmp_path, kind):
    """ISO 10211 case-1 acceptance form: max |θ_fv − θ_series| ≤ 0.1 K at the 28 points, on
    a uniform grid of 0.05 m cells (20 × 40 cells), and on the triangle mesh of the same
    settings (edges of about 0.05 m; the probes are mesh vertices there)."""
    err = max_error(tmp_path, 0.05, kind)
    report(f"rectangle 28 points, h = 0.05 m, {kind}", max_error_K=err, tolerance_K=0.1)
    assert err <= 0.1


@pytest.mark.slow
def test_second_order_convergence(tmp_path):
    """Observed order of the max point error over four uniform grids (h = 0.05 … 0.00625 m,
    up to 160 × 320 cells): slope of log(err) vs log(h) in 1.7–2.3 (a cell-centred scheme
    with linear interpolation to the points is second order)."""
    hs = [0.05, 0.025, 0.0125, 0.00625]
    errs = [max_error(tmp_path, h) for h in hs]
    order = observed_order(hs, errs)
    report("rectangle convergence", h_m=hs, max_error_K=errs, observed_order=order)
    assert all(e2 < e1 for e1, e2 in itertools.pairwise(errs))
    assert 1.7 <= order <= 2.3
