"""ISO 10211 checks around a junction: the grid check and the cut-off plane distance.

Grid check. Source: ISO 10211 (from memory): the sum of the absolute heat flows through
all boundaries must change by less than 1 % when the number of subdivisions is doubled;
fvheat halves every cell size. The demo balcony case must pass it (limit 1 %).

Cut-off planes. Source: ISO 10211 (from memory): adiabatic cut-off planes at least the
larger of 1 m and three times the flanking element's thickness from the central element.
The warning must appear when ``junction.centre`` is nearer than that to an adiabatic
face and not otherwise (exact geometry, no tolerance).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from fvheat.case.load import load_case
from fvheat.mesh.rectilinear import build_mesh
from fvheat.study import GRID_CHECK_LIMIT, GRID_CHECK_REFINE, GridCheck, run_study

from .helpers import study

CASES = Path(__file__).resolve().parents[2] / "cases"


def test_grid_check_on_demo_balcony():
    """Fields of the grid-check result, and a change below 1 % on the demo balcony."""
    s = run_study(load_case(CASES / "balcony_slab.toml"), check_grid=True)
    g = s.grid
    d = g.as_dict()
    assert set(d) == {
        "cells",
        "cells_refined",
        "sum_abs_heat_flow",
        "sum_abs_heat_flow_refined",
        "change",
        "limit",
        "pass",
        "junction",
    }
    assert d["cells"] == s.solution.mesh.n_cells
    assert d["cells_refined"] >= 2 * d["cells"]  # at least doubled
    total = sum(abs(r.heat_flow) for r in s.solution.surfaces.values())
    assert d["sum_abs_heat_flow"] == pytest.approx(total, rel=1e-15)
    assert d["change"] == pytest.approx(
        abs(d["sum_abs_heat_flow_refined"] - total) / d["sum_abs_heat_flow_refined"], rel=1e-12
    )
    assert d["limit"] == GRID_CHECK_LIMIT == 0.01
    assert d["change"] < 0.01
    assert d["pass"] is True
    # the junction quantities on both grids: the coarse ones are the run's own, the refined
    # ones those of a whole study on the refined mesh (the same evaluation, run separately)
    q = d["junction"]
    assert set(q) == {"L2D", "psi", "f_Rsi"}  # no frame width: no U_f
    assert q["psi"]["value"] == s.junction.psi
    assert q["f_Rsi"]["value"] == s.junction.f_rsi
    case = load_case(CASES / "balcony_slab.toml")
    fine = run_study(case, mesh=build_mesh(case, refine=GRID_CHECK_REFINE), check_grid=False)
    assert q["psi"]["refined"] == pytest.approx(fine.junction.psi, rel=1e-9)
    assert q["f_Rsi"]["refined"] == pytest.approx(fine.junction.f_rsi, rel=1e-9)
    assert q["psi"]["change"] == q["psi"]["refined"] - q["psi"]["value"]
    # a grid that passes Σ|Φ| changes ψ by far less than the 0.01 W/(m·K) ψ is quoted to
    assert abs(q["psi"]["change"]) < 0.01


def test_grid_check_follows_the_case_switch(tmp_path):
    """``junction.grid_check = true`` asks for it; ``check_grid=False`` overrides it."""
    text = (CASES / "balcony_slab.toml").read_text() + "\n"
    assert 'dimensions = "internal"' in text
    text = text.replace('dimensions = "internal"', 'dimensions = "internal"\ngrid_check = true')
    path = tmp_path / "b.toml"
    path.write_text(text)
    assert run_study(load_case(path)).grid is not None
    assert run_study(load_case(path), check_grid=False).grid is None


def plane_wall_toml(centre: str, thickness: float = 0.3) -> str:
    """A plane wall 2 m high (y 0..2) of ``thickness`` (m): its top and bottom faces are
    adiabatic cut-off planes; ``centre`` is the TOML line placing the junction centre."""
    t = thickness
    return f"""
title = "cut-off distances"
[mesh]
max_cell = 0.1
min_cell = 0.02
[materials.m]
conductivity = 1.0
[[regions]]
material = "m"
box = [0.0, 0.0, {t}, 2.0]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 2.0]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[{t}, 0.0], [{t}, 2.0]]]
air_temperature = 0.0
resistance = 0.04
[junction]
inside = ["inside"]
outside = ["outside"]
{centre}
[[junction.flanking]]
name = "wall"
length = 2.0
cut = [[0.0, 0.5], [{t}, 0.5]]
"""


def _cutoff(warnings: list[str]) -> list[str]:
    return [w for w in warnings if "cut-off plane" in w]


def test_cutoff_warning_when_too_near(tmp_path):
    """Centre 0.6 m from the bottom cut-off plane (< 1 m): one warning naming 1.00 m."""
    j = study(tmp_path, plane_wall_toml("centre = [0.0, 0.6]")).junction
    w = _cutoff(j.warnings)
    assert len(w) == 1
    assert "adiabatic cut-off plane" in w[0] and "1.00 m ISO 10211" in w[0]
    assert "0.60 m from the junction centre" in w[0]


def test_no_cutoff_warning_when_far_enough(tmp_path):
    """Centre 1.0 m from both cut-off planes (the wall is 0.3 m thick: 3 × 0.3 < 1 m)."""
    j = study(tmp_path, plane_wall_toml("centre = [0.0, 1.0]")).junction
    assert j.warnings == []


def test_cutoff_distance_three_thicknesses(tmp_path):
    """A 0.4 m thick flanking element needs 1.2 m: a centre 1.0 m away is warned about."""
    j = study(tmp_path, plane_wall_toml("centre = [0.0, 1.0]", thickness=0.4)).junction
    w = _cutoff(j.warnings)
    assert len(w) == 1 and "1.20 m ISO 10211" in w[0]


def test_cutoff_not_checked_without_centre(tmp_path):
    """No centre: the check cannot run, and says so."""
    j = study(tmp_path, plane_wall_toml("")).junction
    assert any("not checked" in w and "junction.centre" in w for w in j.warnings)


def test_grid_check_names_a_junction_quantity_that_moves():
    """Σ|Φ| may pass the 1 % rule (ISO 10211, from memory) while ψ, a small difference of
    large flows, moves by more than the step it is quoted to: the check says so.
    Thresholds: more than 1 % of the value and more than 0.005 (half the 0.01 step ψ, U_f
    and f_Rsi are usually quoted to: common practice)."""
    g = GridCheck(
        cells=100,
        cells_refined=400,
        total=100.0,
        total_refined=100.5,  # 0.5 %: passes
        quantities={"psi": (0.100, 0.110), "L2D": (1.000, 1.004), "f_Rsi": (0.700, 0.7049)},
    )
    assert g.passed
    (w,) = g.warnings  # L2D moves 0.4 %, f_Rsi 0.0049: neither named
    assert w.startswith("grid check: psi changes from 0.1 to 0.11 ") and "passes" in w
    # 0.004 on ψ = 0.1 is 4 % but below the quoted step: not named
    assert GridCheck(1, 4, 1.0, 1.0, {"psi": (0.100, 0.104)}).warnings == []
    # 0.02 on U_f = 3 is above the step but only 0.7 %: not named
    assert GridCheck(1, 4, 1.0, 1.0, {"U_f": (3.00, 3.02)}).warnings == []


def test_grid_check_warnings_reach_the_study():
    """A study lists the grid check's warnings with the others; the demo balcony has none."""
    s = run_study(load_case(CASES / "balcony_slab.toml"), check_grid=True)
    assert s.grid is not None and s.grid.warnings == []
    assert not any(w.startswith("grid check:") for w in s.all_warnings)
    s.grid = GridCheck(1, 4, 1.0, 1.0, {"psi": (0.100, 0.110)})
    assert s.grid.warnings[0] in s.all_warnings
