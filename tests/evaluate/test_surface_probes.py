"""Grid probes on or near a surface report the surface's temperature, not the cell's.

Reference: the 1-D layered wall (series resistances, ISO 6946 form, by hand): the
temperature is linear through the layer from the surface temperature θ_i − R_si·q. The
grid's solution of a 1-D linear problem is exact at the cell centres and its surface
balance exact at the faces, so probes on the inside surface, within the half cell next to
it, and in the middle all read the analytic profile to round-off; before, the first two
read the first cell's temperature (1.2 K off here).
"""

from __future__ import annotations

import numpy as np
import pytest
from casefiles import load

from fvheat.evaluate.surfaces import surface_results
from fvheat.simulate import simulate

K, D, H = 0.04, 0.2, 0.02  # W/(m·K), m thick, m cells
T_IN, T_OUT, R_SI, R_SE = 20.0, -5.0, 0.13, 0.04
DEPTHS = {"on_surface": 0.0, "near_surface": 0.3 * H, "mid": D / 2, "outer_face": D}

WALL = f"""
title = "insulation layer"
[mesh]
max_cell = {H}
min_cell = {H}
[materials.wool]
conductivity = {K}
density = 30
specific_heat = 1000
[[regions]]
material = "wool"
box = [0.0, 0.0, {D}, 0.2]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.2]]]
air_temperature = {T_IN}
resistance = {R_SI}
[[boundaries]]
name = "outside"
edges = [[[{D}, 0.0], [{D}, 0.2]]]
air_temperature = {T_OUT}
resistance = {R_SE}
""" + "".join(f'[[probes]]\nname = "{name}"\nat = [{x!r}, 0.1]\n' for name, x in DEPTHS.items())


def _profile(x: float) -> float:
    """The 1-D steady temperature (°C) at depth x (m) from the inside surface."""
    q = (T_IN - T_OUT) / (R_SI + D / K + R_SE)  # W/m²
    return T_IN - q * (R_SI + x / K)


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_probes_read_the_wall_profile_up_to_the_surfaces(tmp_path, kind):
    sol = simulate(load(tmp_path, WALL, [f'mesh.kind="{kind}"']))
    for name, x in DEPTHS.items():
        assert sol.probes[name] == pytest.approx(_profile(x), abs=1e-9), name
    surface = sol.surfaces["inside"]
    assert sol.probes["on_surface"] == pytest.approx(surface.min_temperature, abs=1e-9)


def test_transient_probe_history_is_the_surface_temperature(tmp_path):
    """Over a transient run too: the probe on the inside surface equals the inside
    surface's temperature at every saved time (the wall is uniform along the surface)."""
    text = WALL + "[time]\nduration = 7200\nstep = 600\ninitial_temperature = 5.0\n"
    sol = simulate(load(tmp_path, text))
    on = list(DEPTHS).index("on_surface")
    probe = np.array(sol.history.probes)[:, on]
    h = sol.history
    surface = [
        surface_results(sol.system, field, t)["inside"].min_temperature
        for t, field in zip(h.times, h.fields, strict=True)
    ]
    np.testing.assert_allclose(probe, surface, rtol=0, atol=1e-9)
    assert np.all(np.diff(probe) > 0)  # warming from 5 °C towards the steady profile
