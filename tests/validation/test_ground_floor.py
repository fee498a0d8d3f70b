"""Ground-floor junctions: the soil block, the ISO 13370 floor U and ψ_g.

1. ψ_g of an uninsulated slab-on-ground edge (concrete slab on the soil, a solid wall
   standing in it) against an independent finite-element solve of the same soil block
   (scikit-fem P2, the boxes and boundaries of the loaded case, heat flows by the
   functional ∫(θ_air − θ)/R ds): within 1 %. ψ_g = L2D − Σ U·l with the same U·l on both
   sides, so the check is on L2D to about 1e-4. Source: independent library.
2. The soil block's extent: 0.5·B' inside the floor edge, 2.5·B' outside it and 2.5·B'
   below ground level (ISO 10211's 2-D ground model, from memory): exact.
3. R_f read from the floor layers equals the ISO 6946 layer sum Σ d/λ (1e-12 relative).
4. The floor U against ISO 13370's slab-on-ground formulas (from memory), written out here
   for both branches: d_t < B' (uninsulated) and d_t ≥ B' (well insulated); 1e-12.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from fem_reference import solve_boxes

from fvheat.cli.main import main
from fvheat.study import run_study

from .helpers import load, report, write_case

B = 4.0  # m, B'
SLAB = """
title = "uninsulated slab on ground"
[mesh]
max_cell = 0.25
min_cell = 0.01
growth = {growth}
[materials.concrete]
conductivity = 2.0
[materials.masonry]
conductivity = 0.8
[[regions]]
material = "concrete"
box = [-2.0, 0.0, 0.0, 0.15]
[[regions]]
material = "masonry"
box = [0.0, -0.6, 0.3, 2.5]
[[boundaries]]
name = "wall_inside"
edges = [[[0.0, 0.15], [0.0, 2.5]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "floor"
edges = [[[-2.0, 0.15], [0.0, 0.15]]]
air_temperature = 20.0
resistance = 0.17
[[boundaries]]
name = "outside"
edges = [[[0.3, 0.0], [0.3, 2.5]]]
air_temperature = 0.0
resistance = 0.04
[ground]
width = 4.0
floor_edge = 0.0
ground_level = 0.0
wall_outside = 0.3
boundary = "outside"
floor_boundary = "floor"
[junction]
inside = ["wall_inside", "floor"]
outside = ["outside"]
centre = [0.0, 0.0]
[[junction.flanking]]
name = "wall"
cut = [[0.0, 2.0], [0.3, 2.0]]
length = 2.35
"""


def iso13370_u(b: float, lam: float, w: float, r_si: float, r_f: float, r_se: float) -> float:
    """ISO 13370 slab-on-ground U (from memory), written out independently of fvheat."""
    dt = w + lam * (r_si + r_f + r_se)
    if dt < b:
        return 2 * lam / (math.pi * b + dt) * math.log(math.pi * b / dt + 1)
    return lam / (0.457 * b + dt)


def test_soil_block_floor_u_and_r_f(tmp_path):
    case = load(tmp_path, SLAB.format(growth=1.3))
    soil = case.regions[0]
    assert soil.name == "ground_soil" and soil.material == "ground_soil"
    assert soil.bounds == (-0.5 * B, -2.5 * B, 2.5 * B, 0.0)  # ISO 10211 (from memory)
    assert case.materials["ground_soil"].conductivity == 2.0  # ISO 13370 (from memory)
    outside = case.boundary("outside")
    assert ((0.3, 0.0), (2.5 * B, 0.0)) in outside.edges
    j = run_study(case).junction
    g = j.ground
    assert g.r_f == pytest.approx(0.15 / 2.0, rel=1e-12)  # ISO 6946 Σ d/λ
    assert g.r_si == pytest.approx(0.17) and g.r_se == pytest.approx(0.04)
    assert g.u_value == pytest.approx(iso13370_u(B, 2.0, 0.3, 0.17, 0.075, 0.04), rel=1e-12)
    assert g.d_t < B  # the uninsulated branch
    floor = j.flanking[-1]
    assert (floor.name, floor.length, floor.u_value) == ("ground_floor", 0.5 * B, g.u_value)
    assert floor.lengths["external"] == pytest.approx(0.5 * B + 0.3)
    assert j.psi == pytest.approx(j.l2d - sum(f.u_value * f.length for f in j.flanking))


def test_well_insulated_branch(tmp_path):
    """A given R_f of 5 m²·K/W: d_t ≥ B', the well-insulated formula."""
    case = load(tmp_path, SLAB.format(growth=1.3), ["ground.floor_resistance=5.0"])
    g = run_study(case).junction.ground
    assert g.d_t >= B
    assert g.u_value == pytest.approx(iso13370_u(B, 2.0, 0.3, 0.17, 5.0, 0.04), rel=1e-12)
    assert "given" in g.r_f_from


@pytest.mark.slow
@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_psi_g_against_scikit_fem(tmp_path, kind):
    """ψ_g within 1 % of the finite-element solve of the same soil block (growth 1.05: the
    finite-volume error here comes from the cell-size growth in the soil), on both meshes
    (the triangles' floor layers read on the case's grid)."""
    case = load(tmp_path, SLAB.format(growth=1.05), [f"mesh.kind={kind}"])
    study = run_study(case)
    assert study.solution.mesh.kind == kind
    j = study.junction
    flanks = sum(f.u_value * f.length for f in j.flanking)
    fem = solve_boxes(case, h=0.3, h0=2e-3, ratio=1.3)
    coarse = solve_boxes(case, h=0.6, h0=4e-3, ratio=1.4)
    l2d = (fem.heat_flow("wall_inside") + fem.heat_flow("floor")) / 20.0
    l2d_coarse = (coarse.heat_flow("wall_inside") + coarse.heat_flow("floor")) / 20.0
    psi_fem = l2d - flanks
    report(
        f"slab on ground vs scikit-fem, {kind}",
        psi_fvheat=j.psi,
        psi_fem=psi_fem,
        rel_difference=j.psi / psi_fem - 1.0,
        fem_l2d_change_coarse=abs(l2d_coarse / l2d - 1.0),
    )
    assert abs(l2d_coarse - l2d) < 0.1 * 0.01 * abs(psi_fem)  # the reference is converged
    assert j.psi == pytest.approx(psi_fem, rel=0.01)


BAD = {
    "floor short of the symmetry plane": (
        ["ground.width=5.0"],
        "ground.floor_boundary",
        "must reach the floor's symmetry plane",
    ),
    "unknown boundary": (["ground.boundary=outsdie"], "ground.boundary", "no boundary"),
    "unknown soil": (["ground.soil=peat"], "ground.soil", "no material 'peat'"),
    "no wall": (["ground.wall_outside=0.0"], "ground.wall_outside", "must differ"),
}


@pytest.mark.parametrize("what", list(BAD))
def test_bad_ground(tmp_path, capsys, what):
    overrides, key, words = BAD[what]
    path = write_case(tmp_path, SLAB.format(growth=1.3))
    args = ["run", str(path), "--out", str(tmp_path / "o"), "--quiet"]
    for o in overrides:
        args += ["--set", o]
    assert main(args) == 2
    lines = capsys.readouterr().err.strip().splitlines()
    assert len(lines) == 1, lines
    assert lines[0].startswith(f"fvheat: error: {path}: {key}"), lines[0]
    assert words in lines[0]
    assert not Path(tmp_path / "o" / "summary.json").exists()
