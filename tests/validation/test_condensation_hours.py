"""Condensation-risk hours counted on a 1-D wall with a known steady surface temperature.

The wall is in steady state throughout (constant air temperatures, initial field steady),
so its inside surface sits at θ_si = θ_i − U·R_si·(θ_i − θ_e) (ISO 6946 layer sum, exact in
the finite-volume model). The hours are counted at the condensation surface resistance:
R_si = 0.25 m²·K/W by default (ISO 13788 for opaque surfaces, from memory), the heat-loss
0.13 only with ``surface_resistance = "heat_loss"``; the heat flows stay those of 0.13.
The room humidity steps between three levels; the expected hours
are counted here independently from the step ends, with the Magnus saturation pressure
(WMO 2008 coefficients, from memory) and the 80 % mould threshold (ISO 13788, common
practice).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from fvheat.case.load import load_case
from fvheat.evaluate.humidity import SATURATION_BASIS
from fvheat.simulate import simulate

THETA_I, THETA_E = 20.0, -10.0
R_SI, R_SE, D, K = 0.13, 0.04, 0.2, 1.0
STEP = 600.0
DURATION = 24 * 3600.0
# humidity (%): 35 until 3 h, 45 until 9 h, 60 until 15 h, 35 after; 1-s ramps between levels
LEVELS = [(0.0, 35.0), (3, 45.0), (9, 60.0), (15, 35.0)]


def psat(theta: float) -> float:
    """Magnus over water, Pa (WMO 2008, from memory)."""
    return 611.2 * np.exp(17.62 * theta / (243.12 + theta))


def humidity_csv(path: Path) -> None:
    rows = ["time_s,rh"]
    t_prev_level = LEVELS[0][1]
    rows.append(f"0,{t_prev_level}")
    for hours, level in LEVELS[1:]:
        t = hours * 3600.0
        rows.append(f"{t},{t_prev_level}")
        rows.append(f"{t + 1},{level}")
        t_prev_level = level
    rows.append(f"{DURATION + 3600},{t_prev_level}")
    path.write_text("\n".join(rows) + "\n")


def rh_at(t: float) -> float:
    level = LEVELS[0][1]
    for hours, lv in LEVELS[1:]:
        if t > hours * 3600.0:
            level = lv
    return level


@pytest.mark.parametrize(
    ("setting", "r_si", "dew_hours", "mould_hours"),
    [("", 0.25, 12.0, 24.0), ('surface_resistance = "heat_loss"', R_SI, 6.0, 12.0)],
    ids=["default_0.25", "heat_loss_0.13"],
)
def test_hours_counted_exactly(tmp_path: Path, setting, r_si, dew_hours, mould_hours):
    humidity_csv(tmp_path / "room.csv")
    (tmp_path / "wall.toml").write_text(
        f"""
[mesh]
max_cell = 0.02
[materials.wall]
conductivity = {K}
density = 2000
specific_heat = 1000
[[regions]]
material = "wall"
box = [0.0, 0.0, {D}, 0.1]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.1]]]
air_temperature = {THETA_I}
resistance = {R_SI}
[[boundaries]]
name = "outside"
edges = [[[{D}, 0.0], [{D}, 0.1]]]
air_temperature = {THETA_E}
resistance = {R_SE}
[condensation]
boundaries = ["inside"]
relative_humidity = {{ file = "room.csv", column = "rh" }}
{setting}
[time]
duration = {DURATION}
step = {STEP}
initial_temperature = "steady"
"""
    )
    s = simulate(load_case(tmp_path / "wall.toml"))
    # the heat-loss surface temperature is reported with R_si = 0.13 ...
    u = 1.0 / (R_SI + D / K + R_SE)
    assert abs(s.surfaces["inside"].min_temperature - (THETA_I - u * R_SI * 30.0)) < 1e-9
    # ... and the hours are counted at the condensation resistance
    u = 1.0 / (r_si + D / K + R_SE)
    theta_si = THETA_I - u * r_si * (THETA_I - THETA_E)
    ends = STEP * np.arange(1, round(DURATION / STEP) + 1)
    surface_rh = np.array([rh_at(t) / 100 * psat(THETA_I) / psat(theta_si) for t in ends])
    expected_dew = STEP / 3600 * np.sum(surface_rh >= 1.0)
    expected_mould = STEP / 3600 * np.sum(surface_rh >= 0.8)
    # the levels do what they are for: both resistances give distinct counts
    assert (expected_dew, expected_mould) == (dew_hours, mould_hours)
    c = s.condensation.as_dict()
    assert c["hours_below_dew_point"] == expected_dew
    assert c["hours_surface_rh_above_threshold"] == expected_mould
    assert c["hours_counted"] == DURATION / 3600
    assert c["dew_point_basis"] == SATURATION_BASIS
