"""Air cavities in a case: the region's material carries the ISO 10077-2 equivalent
conductivity for its own dimensions and heat-flow direction.

Source: ISO 10077-2 method as implemented (and tested against the standard's formulas) in
:func:`fvheat.properties.cavity.equivalent_conductivity`; what is checked here is that the
case loader hands it the right d (along the heat flow), b (across it) and direction
(horizontal / up / down) for every ``heat_flow`` and ``section``, and that the solver uses
that value. Tolerance: exact (1e-15 relative), the same function of the same numbers.
"""

from __future__ import annotations

import numpy as np
import pytest

from fvheat.assembly.properties import conductivity
from fvheat.mesh.rectilinear import build_mesh
from fvheat.properties.cavity import equivalent_conductivity

from .helpers import iso6946_u, load, study

WIDTH, HEIGHT = 0.02, 0.05  # m, cavity x and y extents


def cavity_toml(heat_flow: str, section: str, extra: str = "") -> str:
    """A 20 × 50 mm cavity inside an aluminium-walled box, with its 2 mm walls."""
    return f"""
title = "one cavity"
[mesh]
max_cell = 0.005
min_cell = 0.001
[materials.alu]
library = "aluminium"
[[regions]]
material = "alu"
box = [-0.002, -0.002, {WIDTH + 0.002}, {HEIGHT + 0.002}]
[[regions]]
cavity = {{ heat_flow = "{heat_flow}", section = "{section}", emissivity = 0.9{extra} }}
box = [0.0, 0.0, {WIDTH}, {HEIGHT}]
[[boundaries]]
name = "a"
edges = [[[-0.002, -0.002], [-0.002, {HEIGHT + 0.002}]]]
air_temperature = 20.0
resistance = 0.13
"""


# (heat_flow, section) -> (d, b, direction) expected from the geometry
CASES = {
    ("+x", "vertical"): (WIDTH, HEIGHT, "horizontal"),
    ("-x", "vertical"): (WIDTH, HEIGHT, "horizontal"),
    ("+y", "vertical"): (HEIGHT, WIDTH, "up"),
    ("-y", "vertical"): (HEIGHT, WIDTH, "down"),
    ("+y", "plan"): (HEIGHT, WIDTH, "horizontal"),
    ("-x", "plan"): (WIDTH, HEIGHT, "horizontal"),
}


@pytest.mark.parametrize(("heat_flow", "section"), list(CASES), ids=lambda v: str(v))
def test_cavity_region_conductivity(tmp_path, heat_flow, section):
    """Material and per-cell conductivity = equivalent_conductivity(d, b, direction)."""
    d, b, direction = CASES[(heat_flow, section)]
    case = load(tmp_path, cavity_toml(heat_flow, section))
    expected = float(
        equivalent_conductivity(
            d, b, emissivity1=0.9, emissivity2=0.9, direction=direction
        ).lambda_eq
    )
    material = case.materials[case.regions[1].material]
    assert material.conductivity == pytest.approx(expected, rel=1e-15)
    mesh = build_mesh(case)
    k = conductivity(case, mesh)
    in_cavity = mesh.material == mesh.material_names.index(material.name)
    assert in_cavity.any()
    assert np.all(k[in_cavity] == material.conductivity)


def test_up_down_horizontal_differ(tmp_path):
    """The three directions give three different values for the same box (upward flow
    convects most, downward only conducts), so the mapping is not vacuous."""
    lam = {
        hf: load(tmp_path, cavity_toml(hf, "vertical"), name=f"c{hf[0] == '+'}{hf[1]}.toml")
        for hf in ("+y", "-y")
    }
    up = lam["+y"].materials[lam["+y"].regions[1].material].conductivity
    down = lam["-y"].materials[lam["-y"].regions[1].material].conductivity
    horizontal = float(equivalent_conductivity(HEIGHT, WIDTH, direction="horizontal").lambda_eq)
    assert up > horizontal > down


def test_slightly_ventilated_cavity_doubles(tmp_path):
    """ISO 10077-2 (from memory): a slightly ventilated cavity takes twice the value."""
    closed = load(tmp_path, cavity_toml("+x", "vertical"), name="closed.toml")
    slight = load(
        tmp_path, cavity_toml("+x", "vertical", ', ventilation = "slight"'), name="slight.toml"
    )
    k0 = closed.materials[closed.regions[1].material].conductivity
    k1 = slight.materials[slight.regions[1].material].conductivity
    assert k1 == pytest.approx(2.0 * k0, rel=1e-15)


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_cavity_layer_in_a_wall_u(tmp_path, kind):
    """A 40 mm unventilated cavity layer across a wall (horizontal heat flow): the junction's
    layer cut reads λ_eq of a cavity with d = 0.04 m, b = 2 m, and the plane-wall ψ is 0,
    on both meshes (the triangles' cut read on the case's grid). ISO 6946 layer sum with
    the cavity as a layer of d/λ_eq."""
    text = """
    title = "cavity wall"
    [mesh]
    max_cell = 0.05
    min_cell = 0.005
    [materials.brick]
    conductivity = 0.77
    [[regions]]
    material = "brick"
    box = [0.0, 0.0, 0.24, 2.0]
    [[regions]]
    cavity = { heat_flow = "+x", emissivity = 0.9 }
    box = [0.10, 0.0, 0.14, 2.0]
    [[boundaries]]
    name = "inside"
    edges = [[[0.0, 0.0], [0.0, 2.0]]]
    air_temperature = 20.0
    resistance = 0.13
    [[boundaries]]
    name = "outside"
    edges = [[[0.24, 0.0], [0.24, 2.0]]]
    air_temperature = -5.0
    resistance = 0.04
    [junction]
    inside = ["inside"]
    outside = ["outside"]
    centre = [0.0, 0.0]
    [[junction.flanking]]
    name = "wall"
    length = 2.0
    cut = [[0.0, 1.3], [0.24, 1.3]]
    """
    result = study(tmp_path, text, [f"mesh.kind={kind}"])
    assert result.solution.mesh.kind == kind
    j = result.junction
    lam = float(equivalent_conductivity(0.04, 2.0, direction="horizontal").lambda_eq)
    layers = j.flanking[0].cut.layers
    assert [m for m, _, _ in layers] == ["brick", "regions.1.cavity", "brick"]
    assert layers[1][2] == pytest.approx(lam, rel=1e-15)
    expected = iso6946_u([(0.10, 0.77), (0.04, lam), (0.10, 0.77)], 0.13, 0.04)
    assert j.flanking[0].u_value == pytest.approx(expected, rel=1e-12)
    assert abs(j.psi) < 1e-3
