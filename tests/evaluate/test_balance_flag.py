"""The energy-balance verdict: judged against the largest flow, and "isothermal" when no
heat flows at all (a body whose every surface sees one temperature is uniform at it:
steady conduction with a single reference temperature, common practice)."""

from __future__ import annotations

import pytest

from fvheat.evaluate.balance import EnergyBalance
from fvheat.simulate import simulate

from .helpers import load

CASE = """
[mesh]
max_cell = 0.02
[materials.brick]
conductivity = 0.8
density = 1800
specific_heat = 900
[[regions]]
material = "brick"
box = [0.0, 0.0, 0.2, 0.5]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.5]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.2, 0.0], [0.2, 0.5]]]
air_temperature = {outside}
resistance = 0.04
"""


@pytest.mark.parametrize("transient", [False, True])
def test_isothermal_body_is_not_flagged(tmp_path, transient):
    text = CASE.format(outside=20.0)
    if transient:
        text += "\n[time]\nduration = 7200\nstep = 600\ninitial_temperature = 20\n"
    b = simulate(load(tmp_path, text)).balance
    assert b.scale / (7200.0 if transient else 1.0) < 1e-9  # round-off flows only, W/m
    assert b.isothermal and b.closes
    assert b.as_dict()["isothermal"] is True
    assert b.describe().startswith("isothermal")


def test_flowing_body_closes_to_round_off(tmp_path):
    b = simulate(load(tmp_path, CASE.format(outside=-5.0))).balance
    assert not b.isothermal and b.closes and b.relative < 1e-12
    assert "closes to round-off" in b.describe()


def test_residual_judged_against_the_largest_flow():
    """1 W/m in and out with a 1e-6 W/m residual does not close; with 0 noise a zero
    residual does."""
    b = EnergyBalance({"a": 1.0, "b": -1.0 + 1e-6}, 0.0, noise=1e-12)
    assert not b.isothermal and not b.closes
    assert b.relative == pytest.approx(1e-6, rel=1e-9)
    assert EnergyBalance({"a": 1.0, "b": -1.0}, 0.0).closes
