"""Temperature factor f_Rsi, the two-resistance run, dew point and surface humidity.

1. For a plane wall, θ_si = θ_i − U·R_si·(θ_i − θ_e), so f_Rsi = 1 − U·R_si. Source:
   ISO 13788 definition of f_Rsi with the 1-D layer sum of ISO 6946. Tolerance 1e-9
   (finite volumes are exact for 1-D layers; round-off only). f_Rsi comes from a
   surface-temperature solve with R_si = 0.25 (ISO 13788's value for opaque surfaces,
   from memory) unless the case sets another condensation resistance, or "heat_loss".
2. With ``condensation_resistance = 0.25`` f_Rsi comes from a second solve with
   R_si = 0.25: f_Rsi = 1 − U'·0.25 with U' = 1/(0.25 + Σd/λ + R_se), while L2D and ψ
   come from the heat-loss solve with the case's own R_si (0.13). Same source and
   tolerance.
3. Dew point by the Magnus formula over water, p_sat = 611.2·exp(17.62·θ/(243.12 + θ)) Pa
   (coefficients of the WMO Guide to Meteorological Instruments, 2008, Annex 4.B, from
   memory). Hand value for 20 °C and 50 % RH: γ = ln 0.5 + 17.62·20/263.12
   = −0.693147 + 1.339313 = 0.646166; θ_d = 243.12·0.646166/(17.62 − 0.646166)
   = 157.0958/16.973834 = 9.2552 °C; tolerance 2e-4 K (hand rounding). Psychrometric
   tables give 9.3 °C (common practice), checked within 0.1 K. Surface RH at θ_si is
   φ·p_sat(θ_i)/p_sat(θ_si) (same formula), checked to 1e-12 against a re-computation,
   and is 100 % at the dew point.
"""

from __future__ import annotations

import math

import pytest

from fvheat.evaluate.humidity import dew_point, surface_relative_humidity

from .helpers import (
    iso6946_u,
    materials_toml,
    num,
    regions_toml,
    seg,
    study,
    surface_toml,
    write_case,
)

T_IN, T_OUT = 20.0, -5.0
R_SI, R_SE, R_COND = 0.13, 0.04, 0.25
HEIGHT = 2.0

# solid 215 mm brick wall, unplastered: poor enough to condense at 50 % RH
BRICK = [("brick", 0.215, 0.77)]
# the same with 100 mm of mineral wool outside and render
INSULATED = [("brick", 0.215, 0.77), ("wool", 0.10, 0.035), ("render", 0.02, 1.0)]


def wall_toml(layers, junction_extra: str = "") -> str:
    regions, x = [], 0.0
    for name, d, _ in layers:
        regions.append((name, (x, 0.0, x + d, HEIGHT)))
        x += d
    return f"""
title = "plane wall: surface temperatures"
[mesh]
max_cell = 0.05
min_cell = 0.005
{materials_toml({n: k for n, _, k in layers})}
{regions_toml(regions)}
{surface_toml("inside", [((0.0, 0.0), (0.0, HEIGHT))], T_IN, R_SI)}
{surface_toml("outside", [((x, 0.0), (x, HEIGHT))], T_OUT, R_SE)}
[junction]
inside = ["inside"]
outside = ["outside"]
centre = [0.0, 0.0]
{junction_extra}
[[junction.flanking]]
name = "wall"
length = {num(HEIGHT)}
cut = {seg(((0.0, 0.5), (x, 0.5)))}
"""


def _dl(layers):
    return [(d, k) for _, d, k in layers]


@pytest.mark.parametrize("layers", [BRICK, INSULATED], ids=["brick", "insulated"])
def test_f_rsi_default_uses_condensation_resistance(tmp_path, layers):
    """Without condensation_resistance: f_Rsi = 1 − U_c·0.25 with U_c = 1/(0.25 + Σd/λ +
    R_se) (1e-9), from a separate surface-temperature solve, and the basis says so; ψ and
    L2D still from the heat-loss solve (R_si = 0.13)."""
    s = study(tmp_path, wall_toml(layers))
    j = s.junction
    u = iso6946_u(_dl(layers), R_SI, R_SE)
    u_cond = iso6946_u(_dl(layers), R_COND, R_SE)
    assert j.f_rsi == pytest.approx(1.0 - u_cond * R_COND, rel=1e-9)
    assert j.theta_si_min == pytest.approx(T_IN - u_cond * R_COND * (T_IN - T_OUT), rel=1e-9)
    assert j.l2d == pytest.approx(u * HEIGHT, rel=1e-9)
    assert s.surface_solution is not None
    assert "0.25" in j.f_rsi_from and "default" in j.f_rsi_from and "ISO 13788" in j.f_rsi_from
    d = j.as_dict()
    assert d["f_Rsi_resistance_default"] is True
    assert d["f_Rsi_surface_resistances"] == {"inside": R_COND}


@pytest.mark.parametrize("r_si", [0.2, 0.17])
def test_f_rsi_with_given_resistance(tmp_path, r_si):
    """condensation_resistance = R: f_Rsi = 1 − U_c·R with U_c = 1/(R + Σd/λ + R_se)."""
    j = study(tmp_path, wall_toml(INSULATED, f"condensation_resistance = {r_si}")).junction
    u_cond = iso6946_u(_dl(INSULATED), r_si, R_SE)
    assert j.f_rsi == pytest.approx(1.0 - u_cond * r_si, rel=1e-9)
    assert j.as_dict()["f_Rsi_resistance_default"] is False


def test_f_rsi_from_heat_loss_only_when_asked(tmp_path):
    """condensation_resistance = "heat_loss": f_Rsi = 1 − U·R_si with the heat-loss
    R_si = 0.13, no second solve; the same without a second solve when the asked value
    equals the boundary's own resistance."""
    s = study(tmp_path, wall_toml(BRICK, 'condensation_resistance = "heat_loss"'))
    u = iso6946_u(_dl(BRICK), R_SI, R_SE)
    assert s.junction.f_rsi == pytest.approx(1.0 - u * R_SI, rel=1e-9)
    assert s.surface_solution is None
    assert "heat-loss" in s.junction.f_rsi_from and "heat_loss" in s.junction.f_rsi_from
    s = study(tmp_path, wall_toml(BRICK, f"condensation_resistance = {R_SI}"))
    assert s.junction.f_rsi == pytest.approx(1.0 - u * R_SI, rel=1e-9)
    assert s.surface_solution is None


def _fixed_inside(text: str) -> str:
    """The wall with its inside surface held at T_IN (no surface resistance)."""
    old = f"air_temperature = {num(T_IN)}\nresistance = {num(R_SI)}"
    assert old in text
    return text.replace(old, f"temperature = {num(T_IN)}")


@pytest.mark.parametrize("layers", [BRICK, INSULATED], ids=["brick", "insulated"])
def test_f_rsi_on_a_fixed_inside_surface(tmp_path, layers):
    """An inside surface given a fixed temperature still gets R_si = 0.25 in the
    surface-temperature solve: f_Rsi = 1 − U_c·0.25 with U_c = 1/(0.25 + Σd/λ + R_se)
    (ISO 13788 definition, ISO 6946 layer sum; 1e-9), not 1 (the surface at θ_i); L2D
    from the heat-loss solve, U = 1/(Σd/λ + R_se) without R_si (1e-9)."""
    s = study(tmp_path, _fixed_inside(wall_toml(layers)))
    j = s.junction
    u_cond = iso6946_u(_dl(layers), R_COND, R_SE)
    assert j.f_rsi == pytest.approx(1.0 - u_cond * R_COND, rel=1e-9)
    assert j.theta_si_min == pytest.approx(T_IN - u_cond * R_COND * (T_IN - T_OUT), rel=1e-9)
    assert j.l2d == pytest.approx(iso6946_u(_dl(layers), 0.0, R_SE) * HEIGHT, rel=1e-9)


def test_f_rsi_from_heat_loss_on_a_fixed_surface_refused(tmp_path, capsys):
    """ "heat_loss" f_Rsi on a fixed inside surface would be 1 by construction: exit 2, one
    line naming the file and the key (case-file contract)."""
    from fvheat.cli.main import main

    text = _fixed_inside(wall_toml(BRICK, 'condensation_resistance = "heat_loss"'))
    path = write_case(tmp_path, text)
    assert main(["run", str(path), "--out", str(tmp_path / "out"), "--quiet"]) == 2
    lines = capsys.readouterr().err.strip().splitlines()
    assert len(lines) == 1
    assert lines[0].startswith(f"fvheat: error: {path}: junction.condensation_resistance: ")
    assert not (tmp_path / "out" / "summary.json").exists()


@pytest.mark.parametrize("layers", [BRICK, INSULATED], ids=["brick", "insulated"])
def test_two_resistance_run(tmp_path, layers):
    """f_Rsi from the R_si = 0.25 solve (1 − U'·0.25), ψ and L2D from the R_si = 0.13 one."""
    s = study(tmp_path, wall_toml(layers, f"condensation_resistance = {R_COND}"))
    j = s.junction
    u = iso6946_u(_dl(layers), R_SI, R_SE)
    u_cond = iso6946_u(_dl(layers), R_COND, R_SE)
    assert j.f_rsi == pytest.approx(1.0 - u_cond * R_COND, rel=1e-9)
    assert "0.25" in j.f_rsi_from
    # heat loss from the 0.13 solve: L2D = U·l, ψ = 0, the flanking U read with R_si 0.13
    assert j.l2d == pytest.approx(u * HEIGHT, rel=1e-9)
    assert j.flanking[0].u_value == pytest.approx(u, rel=1e-12)
    assert abs(j.psi) < 1e-9
    # the surface solve itself carries U'·l·Δθ
    q_cond = s.surface_solution.surfaces["inside"].heat_flow
    assert q_cond == pytest.approx(u_cond * HEIGHT * (T_IN - T_OUT), rel=1e-9)
    assert s.solution.surfaces["inside"].heat_flow == pytest.approx(j.heat_flow, rel=1e-15)


def _magnus(theta: float) -> float:
    """Saturation pressure over water, Pa (WMO 2008 Magnus coefficients, from memory)."""
    return 611.2 * math.exp(17.62 * theta / (243.12 + theta))


def test_dew_point_hand_value():
    """Magnus dew point of 20 °C / 50 % RH: hand value 9.2552 °C; tables 9.3 °C."""
    td = dew_point(20.0, 0.5)
    assert td == pytest.approx(9.2552, abs=2e-4)
    assert td == pytest.approx(9.3, abs=0.1)
    assert surface_relative_humidity(20.0, 0.5, td) == pytest.approx(1.0, rel=1e-12)
    assert surface_relative_humidity(20.0, 0.5, 20.0) == pytest.approx(0.5, rel=1e-15)


@pytest.mark.parametrize(
    ("layers", "condenses", "mould"),
    [(BRICK, True, True), (INSULATED, False, False)],
    ids=["brick", "insulated"],
)
def test_junction_humidity_check(tmp_path, layers, condenses, mould):
    """Dew point and surface RH of a junction at 50 % RH: the solid brick wall at
    R_si = 0.25 has θ_si = 9.0 °C, below the 9.26 °C dew point (condensation, RH > 80 %);
    the insulated one stays far above it."""
    extra = f"condensation_resistance = {R_COND}\nindoor_humidity = 50\nf_rsi_limit = 0.75"
    j = study(tmp_path, wall_toml(layers, extra)).junction
    assert j.dew_point == pytest.approx(9.2552, abs=2e-4)
    rh = 0.5 * _magnus(T_IN) / _magnus(j.theta_si_min)
    assert j.surface_rh == pytest.approx(rh, rel=1e-12)
    d = j.as_dict()
    assert d["condensation_at_theta_si_min"] is condenses
    assert d["mould_risk_rh_80"] is mould
    assert d["f_Rsi_pass"] is (not condenses)
    assert d["surface_rh_at_theta_si_min"] == j.surface_rh


def test_inside_colder_than_outside_warned(tmp_path):
    """With θ_i < θ_e (a cooled room in summer) f_Rsi, taken at the coldest inside point,
    is not the temperature factor of ISO 13788 (defined for heat flowing out): a warning
    says so. For the plane wall the value is still 1 − U_c·0.25, the surface being
    uniform (ISO 13788 / ISO 6946 as above, 1e-9); the heating case has no such warning."""
    summer = wall_toml(BRICK).replace(f"air_temperature = {num(T_OUT)}", "air_temperature = 30.0")
    j = study(tmp_path, summer).junction
    u_cond = iso6946_u(_dl(BRICK), R_COND, R_SE)
    assert j.f_rsi == pytest.approx(1.0 - u_cond * R_COND, rel=1e-9)
    assert any("colder than the outside" in w and "f_Rsi" in w for w in j.warnings)
    winter = study(tmp_path, wall_toml(BRICK), name="winter.toml").junction
    assert not any("colder than the outside" in w for w in winter.warnings)


@pytest.mark.parametrize("flux", [60.0, -40.0])
def test_imposed_flux_left_out_of_junction_results(tmp_path, flux):
    """Solar gain absorbed on the outside surface (heat_flux) changes the heat flows but
    not L2D, ψ or f_Rsi, which ISO 10211 / ISO 13788 define from the two environments'
    temperatures alone (from memory): L2D = U·l, ψ = 0 and f_Rsi = 1 − U_c·0.25 for the
    plane wall (ISO 6946 layer sum, 1e-9), a warning saying the fluxes were left out. The
    gain itself reaches the heat flows: the inside one is U·l·Δθ − flux·l·R_out/R_total
    (1-D superposition, 1e-9). Before, ψ took that share (ψ = −0.058 at 60 W/m²)."""
    text = wall_toml(INSULATED).replace(
        f"air_temperature = {num(T_OUT)}", f"air_temperature = {num(T_OUT)}\nheat_flux = {flux}"
    )
    s = study(tmp_path, text)
    j = s.junction
    u = iso6946_u(_dl(INSULATED), R_SI, R_SE)
    u_cond = iso6946_u(_dl(INSULATED), R_COND, R_SE)
    assert j.l2d == pytest.approx(u * HEIGHT, rel=1e-9)
    assert abs(j.psi) < 1e-9
    assert j.f_rsi == pytest.approx(1.0 - u_cond * R_COND, rel=1e-9)
    assert any("heat fluxes are left out" in w for w in j.warnings)
    # the inside surface receives the share R_se·U of the absorbed gain (a resistance divider)
    q_in = u * HEIGHT * (T_IN - T_OUT) - flux * HEIGHT * R_SE * u
    assert s.solution.surfaces["inside"].heat_flow == pytest.approx(q_in, rel=1e-9)


def test_sensitivities_with_imposed_flux_refused(tmp_path):
    """The adjoint works on the run's own solve, the junction on one without the fluxes:
    refused in one line (exit 2) rather than mixed."""
    from fvheat.cli.main import main

    text = wall_toml(BRICK).replace(
        f"air_temperature = {num(T_OUT)}", f"air_temperature = {num(T_OUT)}\nheat_flux = 50.0"
    )
    path = write_case(tmp_path, text)
    assert main(["run", str(path), "--out", str(tmp_path / "o"), "--quiet", "--sensitivities"]) == 2


@pytest.mark.parametrize("radiant", [T_IN, T_IN + 5.0])
def test_a_room_radiating_at_another_temperature_is_warned_of(tmp_path, radiant):
    """An inside surface exchanging by convection with air at θ_i and by radiation with
    surfaces at another temperature: the heat flow carries both drives while L2D divides it
    by the air temperatures' difference (ISO 10211 takes one temperature per environment),
    so the junction says so; with the radiant temperature equal to the air's it does not."""
    text = wall_toml(BRICK)
    inside = f"air_temperature = {num(T_IN)}\nresistance = {num(R_SI)}\n"
    assert text.count(inside) == 1
    exchange = f"convection = 2.5\nemissivity = 0.9\nradiant_temperature = {num(radiant)}\n"
    text = text.replace(inside, f"air_temperature = {num(T_IN)}\n{exchange}")
    cut = text[text.index("cut = ") :].splitlines()[0]
    text = text.replace(cut, "u_value = 2.0")  # a radiating surface gives a cut no U
    j = study(tmp_path, text).junction
    warned = [w for w in j.warnings if "radiates to" in w]
    assert len(warned) == (radiant != T_IN)
    if warned:
        assert "'inside'" in warned[0] and "ISO 10211" in warned[0]
