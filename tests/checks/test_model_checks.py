"""Modelling checks: each slip that would give a plausible wrong answer is refused (one
line, naming the boundary or region) or reported as a warning, by ``check`` and ``run``
alike. The geometries are invented; the expected areas and fractions are plain geometry.
"""

from __future__ import annotations

import subprocess
import sys

import numpy as np
import pytest
from casefiles import write_case

from fvheat.case.load import load_case
from fvheat.checks import check_model
from fvheat.errors import CaseError
from fvheat.mesh import build_mesh
from fvheat.study import run_study

HEAD = """
[mesh]
max_cell = 0.02
min_cell = 0.004
[materials.brick]
conductivity = 0.8
density = 1800
specific_heat = 900
[materials.foil]
conductivity = 0.2
"""
WALL = """
[[regions]]
name = "wall"
material = "brick"
box = [0.0, 0.0, 0.2, 1.0]
"""


def surface(name: str, edges: str, air: float, r: float = 0.13) -> str:
    return f"""
[[boundaries]]
name = "{name}"
edges = {edges}
air_temperature = {air}
resistance = {r}
"""


INSIDE = surface("inside", "[[[0.0, 0.0], [0.0, 1.0]]]", 20.0)
OUTSIDE = surface("outside", "[[[0.2, 0.0], [0.2, 1.0]]]", -5.0, 0.04)


def checked(tmp_path, text: str, overrides=()):
    case = load_case(write_case(tmp_path, HEAD + text), overrides)
    mesh = build_mesh(case)
    return case, mesh, check_model(case, mesh)


def fvheat(*args) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "fvheat", *map(str, args)], capture_output=True, text=True
    )


def test_plain_wall_has_no_warning(tmp_path):
    _, _, warnings = checked(tmp_path, WALL + INSIDE + OUTSIDE)
    assert warnings == []


def test_segment_partly_off_the_body(tmp_path):
    """The inside segment runs 1 m past the top of the 1 m wall: on the body for 50 %."""
    text = WALL + surface("inside", "[[[0.0, 0.0], [0.0, 2.0]]]", 20.0) + OUTSIDE
    _, _, warnings = checked(tmp_path, text)
    (w,) = warnings
    assert "boundary 'inside' (boundaries.0.edges.0)" in w and "for 50 % of its 2 m" in w


def test_segment_end_off_the_body_does_not_change_the_mesh(tmp_path):
    """A 3 mm layer of foil at x = 0.2..0.203; a segment end 0.1 mm beyond it at x = 0.2031
    once merged grid lines and deleted the layer. The mesh must be the same as without it."""
    layer = '\n[[regions]]\nmaterial = "foil"\nbox = [0.2, 0.0, 0.203, 1.0]\n'
    out = surface("outside", "[[[0.203, 0.0], [0.203, 1.0]]]", -5.0, 0.04)
    base = WALL + layer + INSIDE + out
    stray = base + surface("stray", "[[[0.2031, 1.0], [0.5, 1.0]]]", -5.0, 0.04)
    _, mesh0, _ = checked(tmp_path, base)
    with pytest.raises(CaseError, match="lies on no exterior edge"):
        checked(tmp_path, stray)
    # the same stray end on a segment that is partly on the body (along the top edge); the
    # mesh is that of the segment ending on the body's corner (the top meeting the inside
    # surface, at another temperature, refines the grid there either way)
    top = surface("top", "[[[0.0, 1.0], [0.203, 1.0]]]", -5.0, 0.04)
    _, mesh0, _ = checked(tmp_path, base + top)
    for end, warned in ((0.2031, False), (0.25, True)):
        stray = base + surface("top", f"[[[0.0, 1.0], [{end}, 1.0]]]", -5.0, 0.04)
        _, mesh1, warnings = checked(tmp_path, stray)
        np.testing.assert_array_equal(mesh1.grid.x, mesh0.grid.x)
        foil = mesh1.material_names.index("foil")
        assert np.sum(mesh1.volumes[mesh1.material == foil]) == pytest.approx(0.003, rel=1e-9)
        # 0.1 mm past the body is 99.95 % on it; 47 mm past is 81 %
        assert any("boundary 'top'" in w and "81 %" in w for w in warnings) is warned


def test_two_boundaries_on_one_face_refused(tmp_path):
    text = WALL + INSIDE + OUTSIDE + surface("also_in", "[[[0.0, 0.5], [0.0, 0.8]]]", 21.0)
    with pytest.raises(CaseError) as info:
        checked(tmp_path, text)
    msg = str(info.value)
    assert "boundaries.2.edges.0" in msg and "'also_in' and boundary 'inside' both claim" in msg
    r = fvheat("check", tmp_path / "case.toml")
    assert r.returncode == 2 and "Traceback" not in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1


ISLAND = """
[[regions]]
name = "loose_block"
material = "brick"
box = [0.5, 0.0, 0.6, 0.1]
"""


def test_island_without_temperature_refused_in_steady_run(tmp_path):
    text = WALL + ISLAND + INSIDE + OUTSIDE
    with pytest.raises(CaseError, match=r"around \(.*\) m \(loose_block\) touches no"):
        checked(tmp_path, text)
    r = fvheat("run", tmp_path / "case.toml", "--out", tmp_path / "out", "-q")
    assert r.returncode == 2 and "loose_block" in r.stderr and "Traceback" not in r.stderr
    assert not (tmp_path / "out").exists()


def test_island_in_transient_run_from_a_given_temperature_is_a_warning(tmp_path):
    text = (
        WALL
        + ISLAND
        + INSIDE
        + OUTSIDE
        + ("\n[time]\nduration = 3600\nstep = 600\ninitial_temperature = 10\nsave_every = 3600\n")
    )
    _, _, warnings = checked(tmp_path, text)
    assert any("loose_block" in w and "undefined in a steady state" in w for w in warnings)
    assert any("falls into 2 separate parts" in w for w in warnings)


def test_separate_bodies_each_with_a_temperature_warned(tmp_path):
    text = (
        WALL
        + ISLAND
        + INSIDE
        + OUTSIDE
        + surface("block_side", "[[[0.6, 0.0], [0.6, 0.1]]]", -5.0, 0.04)
    )
    _, _, warnings = checked(tmp_path, text)
    (w,) = warnings
    assert "falls into 2 separate parts" in w and "loose_block" in w


def test_thin_sloped_layer_reported(tmp_path):
    """A 2 mm layer of foil sloped at about 45° across the wall, on 4 mm cells of the grid:
    the cells whose centres fall in it paint far from its drawn area (0.002 × length)."""
    foil = """
[[regions]]
name = "tilted_foil"
material = "foil"
polygon = [[0.05, 0.3], [0.0514, 0.2986], [0.1514, 0.3986], [0.15, 0.4]]
"""
    _, _, warnings = checked(tmp_path, WALL + foil + INSIDE + OUTSIDE, ["mesh.kind=rectilinear"])
    (w,) = [w for w in warnings if "tilted_foil" in w]
    assert "region 'tilted_foil' (regions.1) (foil)" in w and "mesh.min_cell (now 0.004 m)" in w
    # the triangle mesh (the default for a sloped layer) follows the foil exactly
    _, mesh, warnings = checked(tmp_path, WALL + foil + INSIDE + OUTSIDE)
    assert mesh.kind == "triangles" and not [w for w in warnings if "tilted_foil" in w]


def test_region_painted_over_entirely_reported(tmp_path):
    under = '\n[[regions]]\nmaterial = "foil"\nbox = [0.05, 0.2, 0.1, 0.3]\n'
    _, _, warnings = checked(tmp_path, under + WALL + INSIDE + OUTSIDE)
    (w,) = warnings
    assert w.startswith("regions.0 (foil) is painted over entirely by later regions")


def test_region_area_exact_for_boxes_and_fine_polygons(tmp_path):
    """Boxes paint exactly; a 45° chamfer polygon of 0.02 m² paints within the 5 % tolerance
    on 4 mm cells (no warning), and 7 % too much on the 20 mm cells the grid grows to
    inside it by default (a warning, +7 %). On the triangle mesh (the default for a sloped
    outline) the areas are exact: no warning."""
    chamfer = '\n[[regions]]\nmaterial = "foil"\npolygon = [[0.0, 0.6], [0.2, 0.6], [0.0, 0.8]]\n'
    grid = ["mesh.kind=rectilinear"]
    text = WALL + chamfer + INSIDE + OUTSIDE
    _, _, warnings = checked(tmp_path, text, ["mesh.max_cell=0.004", *grid])
    assert warnings == []
    _, mesh, warnings = checked(tmp_path, text)
    assert mesh.kind == "triangles" and warnings == []
    _, _, warnings = checked(tmp_path, text, grid)
    (w,) = warnings
    assert w.startswith("regions.1 (foil): the grid paints 0.0214 m² of its drawn 0.02 m² (+7 %)")


def test_adiabatic_gap_between_inside_surfaces_warned(tmp_path):
    """The inside surface typed as two segments with 0.1 m missing between them."""
    inside = surface("inside", "[[[0.0, 0.0], [0.0, 0.4]], [[0.0, 0.5], [0.0, 1.0]]]", 20.0)
    _, _, warnings = checked(tmp_path, WALL + inside + OUTSIDE)
    (w,) = warnings
    assert w.startswith("100 mm of exterior edge between 'inside'")
    assert "(0, 0.4) to (0, 0.5) m" in w


@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
def test_adiabatic_gap_round_the_corner_measured_whole(tmp_path, kind):
    """A 315 mm wall whose inside surface runs on over the top edge from x = 0.1 to 0.2 m:
    the 100 mm between the corner and that segment are left out, one warning with the
    whole gap (plain geometry). The top edge beyond 0.2 m reaches the outside surface: a
    cut-off plane, no warning. On the triangle mesh bisected edge ends (0.0953515625 m and
    the like) once split such runs by round-off into pieces, each judged alone: a gap
    reported as 4.6 mm of its 100, and pieces of the cut-off plane reported as gaps."""
    wall = WALL.replace("0.2, 1.0]", "0.315, 1.0]")
    inside = surface("inside", "[[[0.0, 0.0], [0.0, 1.0]], [[0.1, 1.0], [0.2, 1.0]]]", 20.0)
    outside = surface("outside", "[[[0.315, 0.0], [0.315, 1.0]]]", -5.0, 0.04)
    _, _, warnings = checked(tmp_path, wall + inside + outside, [f'mesh.kind="{kind}"'])
    (w,) = warnings
    assert w.startswith("100 mm of exterior edge between 'inside'"), w
    assert "(0, 1) to (0.1, 1) m" in w


def test_cut_off_planes_are_not_gaps(tmp_path):
    """The top and bottom edges of the wall lie on the model's extent: cut-off planes."""
    _, _, warnings = checked(tmp_path, WALL + INSIDE + OUTSIDE)
    assert warnings == []


JUNCTION = """
[junction]
inside = ["inside"]
outside = ["outside"]
[[junction.flanking]]
name = "wall"
length = 1.0
cut = [[0.0, 0.5], [0.15, 0.5]]
"""
TIME = "\n[time]\nduration = 864000\nstep = 600\ninitial_temperature = 10\nsave_every = 3600\n"


def test_check_finds_what_run_would_refuse_after_a_transient(tmp_path):
    """A flanking cut ending inside the body fails the junction evaluation; on a 10-day
    transient run it used to fail only after the run. Now check and run both refuse it at
    once with the same line."""
    path = write_case(tmp_path, HEAD + WALL + INSIDE + OUTSIDE + JUNCTION + TIME)
    r_check = fvheat("check", path)
    r_run = fvheat("run", path, "--out", tmp_path / "out", "-q")
    assert r_check.returncode == r_run.returncode == 2
    assert r_check.stderr == r_run.stderr
    assert "junction.flanking.0.cut" in r_check.stderr
    assert not (tmp_path / "out").exists()


def test_warnings_in_summary_and_on_the_console(tmp_path):
    text = WALL + INSIDE + OUTSIDE + surface("top", "[[[0.0, 1.0], [0.4, 1.0]]]", -5.0, 0.04)
    path = write_case(tmp_path, HEAD + text)
    r = fvheat("check", path)
    assert r.returncode == 0 and "fvheat: warning: boundary 'top'" in r.stderr
    study = run_study(load_case(path))
    assert any("'top'" in w and "50 %" in w for w in study.all_warnings)


def test_default_save_every_bounds_the_saved_states(tmp_path):
    """Without save_every a 10-day run of 60-s steps saves at most 100 states (+ t = 0),
    not 14 400; asking for every step warns."""
    run = "\n[time]\nduration = 864000\nstep = 60\ninitial_temperature = 10\n"
    case, _, warnings = checked(tmp_path, WALL + INSIDE + OUTSIDE + run)
    assert case.time.save_every == 8640.0 and warnings == []
    _, _, warnings = checked(tmp_path, WALL + INSIDE + OUTSIDE + run + "save_every = 60\n")
    (w,) = warnings
    assert w.startswith("time.save_every = 60 s saves 14401 states (14401 VTU files")
