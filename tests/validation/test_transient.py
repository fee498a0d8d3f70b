"""Transient conduction against textbook series / closed-form solutions.

(a) Semi-infinite solid, initially at θi, whose surface meets air at θ∞ through a surface
    coefficient h from t = 0. Source: Carslaw & Jaeger §2.7; Incropera & DeWitt eq. 5.60:

        (θ − θi)/(θ∞ − θi) = erfc(ξ) − exp(hx/k + h²αt/k²)·erfc(ξ + h√(αt)/k),  ξ = x/(2√(αt))

(b) Plane wall of thickness 2L, initially at θi, both faces meeting air at θ∞ through h.
    Source: Incropera & DeWitt §5.5 (eqs. 5.39–5.39c; Carslaw & Jaeger §3.11):

        (θ − θ∞)/(θi − θ∞) = Σ C_n exp(−ζ_n² Fo) cos(ζ_n x*),  C_n = 4 sin ζ_n/(2ζ_n + sin 2ζ_n),
        ζ_n tan ζ_n = Bi = hL/k,  Fo = αt/L²,  x* = distance from the mid-plane / L.

Materials, sizes and temperatures are invented. Every case is a 1-D strip one cell high.
Case (a) and its formula are those of ``fvheat validate`` (fvheat/validation/semi_infinite.py),
the formula checked here against tabulated values.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from scipy.linalg import expm
from scipy.optimize import brentq

from fvheat.validation import semi_infinite as semi

from .helpers import observed_order, report, run

# --- (a) semi-infinite solid: the case and formula of ``fvheat validate`` ------------------

K_A, H_A = semi.K, semi.H_SURF  # W/(m·K), W/(m²·K)
ALPHA_A = semi.ALPHA  # m²/s
TI_A, TINF_A = semi.T_INIT, semi.T_AIR  # °C
DEPTH_A = semi.DEPTH  # m of solid modelled
DEPTHS = [0.01, 0.03, 0.06, 0.10]  # m, probe depths
TIMES_A = [3600.0, 3 * 3600.0, semi.DURATION]  # s
semi_infinite = semi.exact  # Incropera eq. 5.60, °C


def semi_infinite_case(max_cell: float, min_cell: float, step: float) -> str:
    probes = {f"d{i}": d for i, d in enumerate(DEPTHS)}
    return semi.case_text(max_cell, min_cell, step, save_every=3600.0, probes=probes)


def test_semi_infinite_formula_against_tables():
    """The reference formula from outside, with erf values of a printed table (Incropera &
    DeWitt App. B.2; Abramowitz & Stegun table 7.1; from memory: erf 0.5 = 0.52050,
    erf 1.0 = 0.84270).

    - h → ∞ (surface held at θ∞): (θ − θi)/(θ∞ − θi) = erfc(ξ); at ξ = 0.5: 1 − 0.52050.
    - The surface (x = 0) with h√(αt)/k = 1: 1 − e¹·erfc(1) = 1 − 2.718282·(1 − 0.84270)
      = 0.572414.
    """
    t = 3600.0
    x_half = 2.0 * np.sqrt(ALPHA_A * t) * 0.5  # ξ = 0.5
    held = semi.exact(x_half, t, h=1e12)
    assert (held - TI_A) / (TINF_A - TI_A) == pytest.approx(1.0 - 0.52050, abs=2e-5)
    h_one = K_A / np.sqrt(ALPHA_A * t)  # h√(αt)/k = 1
    surface = semi.exact(0.0, t, h=h_one)
    assert (surface - TI_A) / (TINF_A - TI_A) == pytest.approx(0.572414, abs=2e-5)


def semi_infinite_errors(
    tmp_path, max_cell: float, min_cell: float, step: float, kind: str = "rectilinear"
):
    """Max |θ_fv − θ_exact| (K) over the probe depths and times, and the max relative error
    of the surface heat flow h(θ∞ − θ(0, t)) at those times."""
    sol = run(tmp_path, semi_infinite_case(max_cell, min_cell, step), [f"mesh.kind={kind}"])
    assert sol.mesh.kind == kind
    hist = sol.history
    err_t, err_q = 0.0, 0.0
    for t in TIMES_A:
        k = int(np.argmin(np.abs(np.array(hist.times) - t)))
        assert abs(hist.times[k] - t) < 1e-6
        exact = semi_infinite(np.array(DEPTHS), t)
        err_t = max(err_t, float(np.max(np.abs(hist.probes[k] - exact))))
        q_exact = H_A * (TINF_A - float(semi_infinite(0.0, t))) * min_cell  # W/m
        q_fv = float(hist.flows[k][0])
        err_q = max(err_q, abs(q_fv / q_exact - 1.0))
    err_s = abs(sol.surfaces["surface"].min_temperature - float(semi_infinite(0.0, TIMES_A[-1])))
    return err_t, err_q, err_s


def test_semi_infinite_model_is_deep_enough():
    """The 1 m slab acts as semi-infinite: the exact rise at its back face after 6 h is < 1e-6 K."""
    assert semi_infinite(DEPTH_A, TIMES_A[-1]) - TI_A < 1e-6


@pytest.mark.slow
@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_semi_infinite_convective_surface(tmp_path, kind):
    """Temperatures at 10, 30, 60, 100 mm after 1, 3, 6 h (20 K step in air temperature).

    Coarse: cells 2 mm at the surface growing to 20 mm, backward Euler, step 60 s:
    tolerance 0.05 K (0.25 % of the step) and 1 % on the surface heat flow.
    Fine: cells 0.5 → 5 mm, step 15 s: tolerance 0.01 K, and less than half the coarse error.
    """
    coarse = semi_infinite_errors(tmp_path, 0.02, 0.002, 60.0, kind)
    fine = semi_infinite_errors(tmp_path, 0.005, 0.0005, 15.0, kind)
    report(
        f"semi-infinite solid (Incropera 5.60), {kind}",
        coarse_max_err_K=coarse[0],
        coarse_flow_rel_err=coarse[1],
        coarse_surface_err_K=coarse[2],
        fine_max_err_K=fine[0],
        fine_flow_rel_err=fine[1],
        fine_surface_err_K=fine[2],
    )
    assert coarse[0] <= 0.05 and coarse[1] <= 0.01 and coarse[2] <= 0.05
    assert fine[0] <= 0.01 and fine[1] <= 0.01 and fine[2] <= 0.01
    assert fine[0] < 0.5 * coarse[0]


# --- (b) plane wall with convection on both faces -----------------------------------------

K_B, RHO_B, C_B = 1.0, 2000.0, 1000.0  # W/(m·K), kg/m³, J/(kg·K)
ALPHA_B = K_B / (RHO_B * C_B)
L_B = 0.1  # m, half thickness
H_B = 10.0  # W/(m²·K)
BI = H_B * L_B / K_B  # Biot number, 1.0
TI_B, TINF_B = 20.0, 0.0  # °C
T_END = 10000.0  # s, Fo = 0.5


def _eigenvalues(n_terms: int = 60) -> np.ndarray:
    """Roots of ζ tan ζ = Bi, one in each (nπ, nπ + π/2), by brentq on ζ sin ζ − Bi cos ζ."""
    return np.array(
        [
            brentq(
                lambda z: z * np.sin(z) - BI * np.cos(z),
                n * np.pi,
                n * np.pi + 0.5 * np.pi,
                xtol=1e-15,
            )
            for n in range(n_terms)
        ]
    )


ZETA = _eigenvalues()
C_N = 4.0 * np.sin(ZETA) / (2.0 * ZETA + np.sin(2.0 * ZETA))


def plane_wall(x: np.ndarray, t: float) -> np.ndarray:
    """Incropera §5.5 series (°C) at distance x from the left face, 60 terms."""
    xs = (np.asarray(x, dtype=float) - L_B) / L_B
    fo = ALPHA_B * t / L_B**2
    terms = C_N[:, None] * np.exp(-(ZETA[:, None] ** 2) * fo) * np.cos(ZETA[:, None] * xs[None, :])
    return TINF_B + (TI_B - TINF_B) * terms.sum(axis=0)


def plane_wall_case(dx: float, step: float, scheme: str) -> str:
    """Uniform cells of dx across the wall; both faces convective."""
    return f"""
title = "plane wall, both faces cooled"
[mesh]
max_cell = {dx}
min_cell = {dx}

[materials.wall]
conductivity = {K_B}
density = {RHO_B}
specific_heat = {C_B}

[[regions]]
material = "wall"
box = [0.0, 0.0, {2 * L_B}, {dx}]

[[boundaries]]
name = "left"
edges = [[[0.0, 0.0], [0.0, {dx}]]]
air_temperature = {TINF_B}
resistance = {1.0 / H_B}

[[boundaries]]
name = "right"
edges = [[[{2 * L_B}, 0.0], [{2 * L_B}, {dx}]]]
air_temperature = {TINF_B}
resistance = {1.0 / H_B}

[time]
duration = {T_END}
step = {step}
initial_temperature = {TI_B}
save_every = {T_END}
scheme = "{scheme}"
"""


def test_series_is_converged():
    """The reference: 60 and 30 terms agree to 1e-12 K at t = 100 s (Fo = 0.005), and the
    eigenvalues satisfy ζ tan ζ = Bi."""
    x = np.linspace(0.0, 2 * L_B, 41)
    fo_small = 100.0
    xs = (x - L_B) / L_B
    fo = ALPHA_B * fo_small / L_B**2
    part = (
        C_N[:30, None] * np.exp(-(ZETA[:30, None] ** 2) * fo) * np.cos(ZETA[:30, None] * xs)
    ).sum(0)
    full = (plane_wall(x, fo_small) - TINF_B) / (TI_B - TINF_B)
    assert np.max(np.abs(full - part)) * (TI_B - TINF_B) <= 1e-12
    assert np.max(np.abs(ZETA * np.tan(ZETA) - BI)) <= 1e-9


def test_plane_wall_space_order(tmp_path):
    """Space: Crank–Nicolson with a small step (10 s) on uniform grids of 10, 20, 40 and 80
    cells; error = max over cell centres at Fo = 0.5. Tolerance: 1e-3 K on the finest grid,
    errors must fall on every refinement, observed order 1.7–2.3."""
    hs = [0.02, 0.01, 0.005, 0.0025]
    errs = []
    for dx in hs:
        sol = run(tmp_path, plane_wall_case(dx, 10.0, "crank_nicolson"))
        exact = plane_wall(sol.mesh.centres[:, 0], sol.time)
        errs.append(float(np.max(np.abs(sol.temperature - exact))))
    order = observed_order(hs, errs)
    report("plane wall, space", dx_m=hs, max_error_K=errs, observed_order=order)
    assert errs[-1] <= 1e-3
    assert all(e2 < e1 for e1, e2 in itertools.pairwise(errs))
    assert 1.7 <= order <= 2.3


def test_plane_wall_time_order_backward_euler(tmp_path):
    """Time, backward Euler, against the series on a fine grid (200 cells, whose spatial
    error is ~5e-5 K): steps 1000, 500, 250, 125 s; observed order 0.8–1.2; tolerance
    0.02 K at the smallest step."""
    steps = [1000.0, 500.0, 250.0, 125.0]
    errs = []
    for dt in steps:
        sol = run(tmp_path, plane_wall_case(0.001, dt, "backward_euler"))
        exact = plane_wall(sol.mesh.centres[:, 0], sol.time)
        errs.append(float(np.max(np.abs(sol.temperature - exact))))
    order = observed_order(steps, errs)
    report("plane wall, time, backward Euler", step_s=steps, max_error_K=errs, observed_order=order)
    assert errs[-1] <= 0.02
    assert 0.8 <= order <= 1.2


def _time_exact(sol) -> np.ndarray:
    """Exact time integration of the same semi-discrete system C dθ/dt = b − M θ from the
    uniform initial field: θ(t) = θs + expm(−C⁻¹M t)(θ0 − θs), θs = M⁻¹ b (independent
    library: scipy.linalg.expm)."""
    m = sol.system.matrix.toarray()
    c = sol.system.capacity
    b = sol.system.sources(0.0)
    steady = np.linalg.solve(m, b)
    return steady + expm(-(m / c[:, None]) * sol.time) @ (np.full(c.size, TI_B) - steady)


@pytest.mark.parametrize(
    ("scheme", "low", "high"), [("backward_euler", 0.8, 1.2), ("crank_nicolson", 1.7, 2.3)]
)
def test_plane_wall_time_order_against_exact_time_integration(tmp_path, scheme, low, high):
    """Time order isolated from the spatial error: 40 cells, steps 250 … 31.25 s, error
    against the time-exact solution of the same semi-discrete system (scipy expm).

    Against the series the Crank–Nicolson time error (~1e-5 K) would hide below the
    spatial error of this grid (1.2e-3 K); on finer grids the stiff modes excited by the
    step change at t = 0, which Crank–Nicolson damps only weakly, need smaller steps still
    before the asymptotic order shows. The grid's own spatial error against the series is
    checked too (≤ 2e-3 K)."""
    steps = [250.0, 125.0, 62.5, 31.25]
    errs = []
    for dt in steps:
        sol = run(tmp_path, plane_wall_case(0.005, dt, scheme))
        errs.append(float(np.max(np.abs(sol.temperature - _time_exact(sol)))))
    space = float(np.max(np.abs(_time_exact(sol) - plane_wall(sol.mesh.centres[:, 0], sol.time))))
    order = observed_order(steps, errs)
    report(
        f"plane wall, time, {scheme} vs exact time integration",
        step_s=steps,
        max_error_K=errs,
        observed_order=order,
        spatial_error_K=space,
    )
    assert space <= 2e-3
    assert all(e2 < e1 for e1, e2 in itertools.pairwise(errs))
    assert low <= order <= high
