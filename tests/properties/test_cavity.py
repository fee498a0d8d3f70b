"""Equivalent conductivity of air cavities, checked against hand calculations.

Formulas and constants (ISO 10077-2 cavity method, recalled from memory, see the module
docstring of fvheat.properties.cavity):

    λ_eq = d (h_a + h_r)
    h_a  = max(0.025/d, 0.73 ΔT^(1/3))  horizontal;  max(0.025/d, 1.14 ΔT^(1/3))  upward;
           0.025/d  downward
    h_r  = 4 σ T_m³ / (1/ε1 + 1/ε2 − 2 + 1/F),   F = ½ (1 + √(1 + (d/b)²) − d/b)

Each hand calculation below works the numbers out step by step in plain Python (math module,
no fvheat code), writes the intermediate values it expects beside each step, and only then
compares with the library.
"""

import math

import numpy as np
import pytest

from fvheat.properties import (
    CavityResult,
    cavity_dimensions,
    equivalent_conductivity,
    ventilation_class,
)
from fvheat.properties.cavity import convective_coefficient, view_factor

SIGMA = 5.670374419e-8  # W/(m²·K⁴), Stefan–Boltzmann constant, CODATA 2018
T_M = 283.15  # K, ISO 10077-2 mean cavity temperature 10 °C (from memory)
DT = 10.0  # K, ISO 10077-2 temperature difference across a cavity (from memory)
REL = 1e-9


def test_hand_calculation_5mm_by_20mm_eps09_horizontal():
    # Source: ISO 10077-2 formulas (from memory), numbers worked by hand here.
    d, b, eps = 0.005, 0.020, 0.9
    # h_a = max(0.025/0.005, 0.73·10^(1/3)) = max(5.0, 1.5727373) = 5.0   (conduction wins)
    h_a = max(0.025 / d, 0.73 * 10.0 ** (1 / 3))
    assert h_a == pytest.approx(5.0, rel=REL)
    # d/b = 0.25;  F = ½(1 + √1.0625 − 0.25) = ½(1 + 1.0307764064 − 0.25) = 0.8903882032
    F = 0.5 * (1 + math.sqrt(1 + 0.25**2) - 0.25)
    assert F == pytest.approx(0.8903882032022077, rel=REL)
    # 4σT³ = 4 · 5.670374419e-8 · 283.15³ = 5.1489826
    four_sigma_t3 = 4 * SIGMA * T_M**3
    assert four_sigma_t3 == pytest.approx(5.148982619267826, rel=REL)
    # denominator = 1/0.9 + 1/0.9 − 2 + 1/F = 0.2222222 + 1.1231056 = 1.3453278
    h_r = four_sigma_t3 / (1 / eps + 1 / eps - 2 + 1 / F)
    assert h_r == pytest.approx(3.8273069479199866, rel=REL)
    # λ_eq = d (h_a + h_r) = 0.005 · 8.8273069 = 0.0441365 W/(m·K)
    lam = d * (h_a + h_r)
    assert lam == pytest.approx(0.044136534739599935, rel=REL)

    res = equivalent_conductivity(d, b, emissivity1=eps, emissivity2=eps)
    assert isinstance(res, CavityResult)
    assert res.h_a == pytest.approx(h_a, rel=REL)
    assert res.view_factor == pytest.approx(F, rel=REL)
    assert res.h_r == pytest.approx(h_r, rel=REL)
    assert res.r_s == pytest.approx(1 / (h_a + h_r), rel=REL)
    assert res.lambda_eq == pytest.approx(lam, rel=REL)


def test_hand_calculation_20mm_by_10mm_eps03_horizontal():
    # Source: ISO 10077-2 formulas (from memory); deep narrow cavity, low-emissivity faces.
    d, b, eps = 0.020, 0.010, 0.3
    # h_a = max(0.025/0.020, 0.73·10^(1/3)) = max(1.25, 1.5727373) = 1.5727373 (convection)
    h_a = max(0.025 / d, 0.73 * 10.0 ** (1 / 3))
    assert h_a == pytest.approx(1.5727373237232751, rel=REL)
    # d/b = 2;  F = ½(1 + √5 − 2) = (√5 − 1)/2 = 0.6180339887
    F = 0.5 * (1 + math.sqrt(5) - 2)
    assert F == pytest.approx(0.6180339887498949, rel=REL)
    # denominator = 2/0.3 − 2 + 1/F = 4.6666667 + 1.6180340 = 6.2847007
    denominator = 1 / eps + 1 / eps - 2 + 1 / F
    assert denominator == pytest.approx(6.284700655416562, rel=REL)
    h_r = 4 * SIGMA * T_M**3 / denominator
    assert h_r == pytest.approx(0.8192884437272441, rel=REL)
    # λ_eq = 0.020 · (1.5727373 + 0.8192884) = 0.0478405 W/(m·K)
    lam = d * (h_a + h_r)
    assert lam == pytest.approx(0.04784051534901039, rel=REL)

    res = equivalent_conductivity(d, b, emissivity1=eps, emissivity2=eps)
    assert res.h_a == pytest.approx(h_a, rel=REL)
    assert res.h_r == pytest.approx(h_r, rel=REL)
    assert res.lambda_eq == pytest.approx(lam, rel=REL)


def test_hand_calculation_12mm_by_40mm_eps09_upward():
    # Source: ISO 10077-2 formulas, upward C = 1.14 (from memory).
    d, b, eps = 0.012, 0.040, 0.9
    # h_a = max(0.025/0.012, 1.14·10^(1/3)) = max(2.0833333, 2.4560555) = 2.4560555
    h_a = max(0.025 / d, 1.14 * 10.0 ** (1 / 3))
    assert h_a == pytest.approx(2.4560555466363474, rel=REL)
    # d/b = 0.3;  F = ½(1 + √1.09 − 0.3) = 0.8720153
    F = 0.5 * (1 + math.sqrt(1.09) - 0.3)
    assert F == pytest.approx(0.8720153254455275, rel=REL)
    h_r = 4 * SIGMA * T_M**3 / (2 / eps - 2 + 1 / F)
    assert h_r == pytest.approx(3.7611513875136224, rel=REL)
    # λ_eq = 0.012 · (2.4560555 + 3.7611514) = 0.0746065 W/(m·K)
    lam = d * (h_a + h_r)
    assert lam == pytest.approx(0.07460648320979964, rel=REL)

    res = equivalent_conductivity(d, b, emissivity1=eps, emissivity2=eps, direction="up")
    assert res.h_a == pytest.approx(h_a, rel=REL)
    assert res.lambda_eq == pytest.approx(lam, rel=REL)
    # the same cavity with heat flowing horizontally has conduction-limited h_a = 0.025/d
    horizontal = equivalent_conductivity(d, b, emissivity1=eps, emissivity2=eps)
    assert horizontal.h_a == pytest.approx(0.025 / 0.012, rel=REL)


def test_hand_calculation_view_factor_three_four_five():
    # d/b = 0.75: √(1 + 0.5625) = 1.25 exactly, so F = ½(1 + 1.25 − 0.75) = 0.75.
    assert view_factor(0.030, 0.040) == pytest.approx(0.75, rel=1e-15)


def test_unequal_emissivities_hand_calculation():
    # One coated face (0.9) and one bare aluminium face (0.2); square cavity d = b = 10 mm.
    # F = ½(1 + √2 − 1) = √2/2 = 0.7071068; denominator = 1/0.9 + 1/0.2 − 2 + √2 = 5.5253247
    F = math.sqrt(2) / 2
    denominator = 1 / 0.9 + 1 / 0.2 - 2 + 1 / F
    assert denominator == pytest.approx(5.525324673484206, rel=REL)
    h_r = 4 * SIGMA * T_M**3 / denominator
    res = equivalent_conductivity(0.010, 0.010, emissivity1=0.9, emissivity2=0.2)
    assert res.h_r == pytest.approx(h_r, rel=REL)
    swapped = equivalent_conductivity(0.010, 0.010, emissivity1=0.2, emissivity2=0.9)
    assert swapped.lambda_eq == pytest.approx(res.lambda_eq, rel=1e-14)


def test_view_factor_is_a_reradiating_enclosure_of_two_strips():
    # Incropera & DeWitt §13.1 (crossed strings, two facing strips of width b at distance d):
    #   F12 = √(1 + (d/b)²) − d/b.
    # Incropera & DeWitt §13.3.5 (two surfaces and a re-radiating surface, A1 = A2):
    #   F_eff = F12 + 1/(1/F1R + 1/F2R) = F12 + (1 − F12)/2.
    for d, b in [(0.005, 0.02), (0.02, 0.01), (0.1, 0.001), (0.001, 0.1)]:
        f12 = (2 * math.hypot(d, b) - 2 * d) / (2 * b)  # crossed strings, written out
        f_eff = f12 + 1 / (1 / (1 - f12) + 1 / (1 - f12))
        assert view_factor(d, b) == pytest.approx(f_eff, rel=1e-12)


def test_linearised_radiation_matches_grey_body_exchange():
    # Incropera & DeWitt eq. (13.23)/(13.30) exchange with a re-radiating surface:
    #   q = σ(T1⁴ − T2⁴) / (1/ε1 + 1/ε2 − 2 + 1/F_eff)  per unit face area.
    # With T1, T2 = T_m ± ΔT/2, q/ΔT = σ(4T_m³ + T_m ΔT²)/(...), so h_r differs by ΔT²/(4T_m²).
    d, b, e1, e2 = 0.015, 0.025, 0.9, 0.6
    res = equivalent_conductivity(d, b, emissivity1=e1, emissivity2=e2)
    t1, t2 = T_M + DT / 2, T_M - DT / 2
    q = SIGMA * (t1**4 - t2**4) / (1 / e1 + 1 / e2 - 2 + 1 / res.view_factor)
    assert res.h_r == pytest.approx(q / DT, rel=DT**2 / (4 * T_M**2) * 1.01)
    assert res.h_r != pytest.approx(q / DT, rel=1e-6)  # the linearisation is not exact


def test_radiation_vanishes_as_emissivity_goes_to_zero():
    # Limit of the formula: 1/ε → ∞, h_r → 0; left with conduction, λ_eq → C1 = 0.025, the
    # conductivity of still air (ISO 10456:2007 Table 3, from memory).
    res = equivalent_conductivity(0.004, 0.02, emissivity1=1e-9, emissivity2=1e-9)
    assert res.h_r < 1e-8
    assert res.lambda_eq == pytest.approx(0.025, rel=1e-9)


def test_parallel_plate_limit():
    # Incropera & DeWitt §13.3, eq. (13.24), infinite parallel plates: the exchange factor is
    # 1/(1/ε1 + 1/ε2 − 1); linearised h_r = 4σT³/(2/ε − 1) for equal emissivities. As d/b → 0,
    # F → 1.
    eps = 0.8
    res = equivalent_conductivity(1e-3, 1e3, emissivity1=eps, emissivity2=eps)
    assert res.view_factor == pytest.approx(1.0, abs=1e-6)
    assert res.h_r == pytest.approx(4 * SIGMA * T_M**3 / (2 / eps - 1), rel=1e-6)


def test_convective_branch_switches_at_c1_over_c2_term():
    # Horizontal flow: 0.025/d = 0.73·10^(1/3)  at  d* = 0.025/1.5727373 = 15.896 mm.
    d_star = 0.025 / (0.73 * 10.0 ** (1 / 3))
    assert d_star == pytest.approx(0.015895852169906778, rel=REL)
    below = convective_coefficient(0.99 * d_star)
    above = convective_coefficient(1.01 * d_star)
    assert below == pytest.approx(0.025 / (0.99 * d_star), rel=REL)  # conduction branch
    assert above == pytest.approx(0.73 * 10.0 ** (1 / 3), rel=REL)  # convection branch
    # continuous at the switch
    assert convective_coefficient(d_star) == pytest.approx(0.025 / d_star, rel=REL)
    # in the convection branch h_a scales with ΔT^(1/3): 8× ΔT doubles h_a
    assert convective_coefficient(0.05, delta_t=80.0) == pytest.approx(
        2 * convective_coefficient(0.05, delta_t=10.0), rel=REL
    )
    # upward: switch at 0.025/(1.14·10^(1/3)) = 10.179 mm
    d_up = 0.025 / (1.14 * 10.0 ** (1 / 3))
    assert convective_coefficient(1.01 * d_up, direction="up") == pytest.approx(
        1.14 * 10.0 ** (1 / 3), rel=REL
    )
    assert convective_coefficient(0.99 * d_up, direction="up") == pytest.approx(
        0.025 / (0.99 * d_up), rel=REL
    )


def test_downward_flow_is_conduction_only():
    # Downward heat flow (warm on top) is stably stratified: h_a = 0.025/d at any ΔT.
    for dt in (0.0, 10.0, 40.0):
        assert convective_coefficient(0.05, direction="down", delta_t=dt) == pytest.approx(
            0.5, rel=REL
        )
    down = equivalent_conductivity(0.05, 0.05, direction="down")
    horizontal = equivalent_conductivity(0.05, 0.05, direction="horizontal")
    up = equivalent_conductivity(0.05, 0.05, direction="up")
    assert down.lambda_eq < horizontal.lambda_eq < up.lambda_eq


def test_zero_delta_t_leaves_conduction():
    res = equivalent_conductivity(0.03, 0.03, delta_t=0.0)
    assert res.h_a == pytest.approx(0.025 / 0.03, rel=REL)


def test_slight_ventilation_doubles_lambda_eq():
    # ISO 10077-2 (from memory): slightly ventilated cavity = 2 × unventilated λ_eq.
    closed = equivalent_conductivity(0.008, 0.03, emissivity1=0.9, emissivity2=0.3)
    slight = equivalent_conductivity(
        0.008, 0.03, emissivity1=0.9, emissivity2=0.3, ventilation="slight"
    )
    assert slight.lambda_eq == pytest.approx(2 * closed.lambda_eq, rel=1e-14)
    assert slight.ventilation_factor == 2.0
    assert slight.r_s == closed.r_s  # R_s reported is that of the unventilated cavity


def test_well_ventilated_cavity_is_a_boundary_not_a_material():
    with pytest.raises(ValueError, match="surface boundary"):
        equivalent_conductivity(0.02, 0.02, ventilation="well")


@pytest.mark.parametrize(
    ("width", "expected"),
    [
        (0.0, "none"),
        (0.002, "none"),  # slit ≤ 2 mm: unventilated (ISO 10077-2, from memory)
        (0.0021, "slight"),
        (0.010, "slight"),  # 2 mm < slit ≤ 10 mm: slightly ventilated (from memory)
        (0.0101, "well"),
    ],
)
def test_ventilation_class_from_opening_width(width, expected):
    assert ventilation_class(width) == expected


def test_arrays_broadcast_like_scalars():
    d = np.array([0.004, 0.012, 0.030])
    b = np.array([[0.01], [0.05]])
    res = equivalent_conductivity(d, b, emissivity1=0.9, emissivity2=0.3, direction="up")
    assert res.lambda_eq.shape == (2, 3)
    for i in range(2):
        for j in range(3):
            one = equivalent_conductivity(
                float(d[j]), float(b[i, 0]), emissivity1=0.9, emissivity2=0.3, direction="up"
            )
            assert isinstance(one.lambda_eq, float)
            assert res.lambda_eq[i, j] == pytest.approx(one.lambda_eq, rel=1e-14)


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"d": 0.0, "b": 0.01}, "positive lengths in metres"),
        ({"d": 0.01, "b": -0.01}, "positive lengths in metres"),
        ({"d": float("nan"), "b": 0.01}, "finite"),
        ({"d": "wide", "b": 0.01}, "must be a number"),
        ({"d": 0.01, "b": 0.01, "emissivity1": 0.0}, r"in \(0, 1\]"),
        ({"d": 0.01, "b": 0.01, "emissivity2": 1.2}, r"in \(0, 1\]"),
        ({"d": 0.01, "b": 0.01, "direction": "sideways"}, "'horizontal', 'up', 'down'"),
        ({"d": 0.01, "b": 0.01, "ventilation": "some"}, "'slight'"),
        ({"d": 0.01, "b": 0.01, "delta_t": -1.0}, ">= 0"),
        ({"d": 0.01, "b": 0.01, "mean_temperature": 10.0}, "kelvin"),
    ],
)
def test_invalid_input_says_how_to_fix_it(kwargs, match):
    d = kwargs.pop("d")
    b = kwargs.pop("b")
    with pytest.raises(ValueError, match=match):
        equivalent_conductivity(d, b, **kwargs)


@pytest.mark.parametrize(
    ("args", "kwargs", "expected"),
    [
        ((0.02, 0.01, "x"), {}, (0.02, 0.01, "horizontal")),
        ((0.02, 0.01, "x", -1), {}, (0.02, 0.01, "horizontal")),
        ((0.02, 0.01, "y"), {}, (0.01, 0.02, "up")),  # heat towards +y = upwards
        ((0.02, 0.01, "y", -1), {}, (0.01, 0.02, "down")),
        ((0.02, 0.01, "y", -1), {"vertical_axis": None}, (0.01, 0.02, "horizontal")),
        ((0.02, 0.01, "x", 1), {"vertical_axis": "x"}, (0.02, 0.01, "up")),
    ],
)
def test_cavity_dimensions_maps_extents_to_d_b_direction(args, kwargs, expected):
    assert tuple(cavity_dimensions(*args, **kwargs)) == expected


@pytest.mark.parametrize(
    ("args", "match"),
    [
        ((0.02, 0.01, "z"), "axis must be"),
        ((0.02, 0.01, "x", 0), "sense must be"),
        ((0.0, 0.01, "x"), "positive"),
    ],
)
def test_cavity_dimensions_rejects_bad_input(args, match):
    with pytest.raises(ValueError, match=match):
        cavity_dimensions(*args)


def test_cavity_dimensions_feed_equivalent_conductivity():
    dims = cavity_dimensions(0.040, 0.012, "y", +1)  # 40 mm wide, 12 mm tall, heat upwards
    res = equivalent_conductivity(dims.d, dims.b, direction=dims.direction)
    assert res.lambda_eq == pytest.approx(0.07460648320979964, rel=REL)  # hand calc above
