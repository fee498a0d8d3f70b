"""The demo cases in ``cases/``: every file runs, and one number per junction demo is pinned.

The pins are regression pins, not validations: they hold the value the tool produced when
the case was written (relative 1e-6), so that an unintended change in meshing, assembly,
solving or evaluation shows up. When a deliberate change moves one, check the new value
and update the pin (and the README's "Demo junctions" table).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from fvheat.case.load import load_case
from fvheat.study import run_study

CASES = Path(__file__).resolve().parents[2] / "cases"

# name: (case file, --set overrides, junction quantity, pinned value: ψ W/(m·K), U_f W/(m²·K))
PINS = {
    "balcony, no thermal break": ("balcony_slab.toml", (), "psi", 1.1436463350200128),
    "balcony, thermal break": (
        "balcony_slab.toml",
        ("regions.3.material=thermal_break",),
        "psi",
        0.3289955140015821,
    ),
    "wall-window jamb": ("wall_window_junction.toml", (), "psi", 0.06004484051649461),
    "aluminium frame": ("window_frame_section.toml", (), "u_f", 2.5906785719232865),
    "undercroft slab edge (from a drawing), grid": (
        "undercroft_slab_edge.toml",
        ("mesh.kind=rectilinear",),
        "psi",
        0.2081536782984872,
    ),
    # its curved outlines take the triangle mesh by default: 4 107 nodes; the refined
    # meshes of both kinds converge to 0.2084 (grid 101 198 cells 0.20839, triangles
    # 31 037 nodes 0.20850)
    # sloped: the triangle mesh (2 130 nodes); 0.04228 on 32 198 nodes, while the grid gives
    # 0.0459 on its 3 359 cells and 0.0429 on 12 677 (the stepped slope)
    "eaves of a pitched roof": ("eaves_pitched_roof.toml", (), "psi", 0.04242188356637344),
    "undercroft slab edge (from a drawing), triangles": (
        "undercroft_slab_edge.toml",
        (),
        "psi",
        0.2089872890486989,
    ),
    "ground-floor edge, slab on ground (psi_g)": (
        "ground_floor_edge.toml",
        (),
        "psi",
        0.08480061277876239,
    ),
}


@pytest.mark.parametrize("name", list(PINS))
def test_demo_pin(name):
    """One pinned number per junction demo (regression pin, rel 1e-6)."""
    file, overrides, quantity, pinned = PINS[name]
    j = run_study(load_case(CASES / file, overrides), check_grid=False).junction
    assert j is not None
    assert getattr(j, quantity) == pytest.approx(pinned, rel=1e-6)


@pytest.mark.parametrize("path", sorted(CASES.glob("*.toml")), ids=lambda p: p.name)
def test_every_case_runs(path):
    """Every case file loads and runs (junction evaluation included): finite fields, an
    energy balance that closes, junction results where declared. Transient cases run their
    first six steps here; the full runs are pinned below."""
    case = load_case(path)
    if case.time is not None:
        six = 6 * case.time.step
        case = load_case(path, (f"time.duration={six}", f"time.save_every={case.time.step}"))
    s = run_study(case)
    assert np.all(np.isfinite(s.solution.temperature))
    assert s.solution.balance.relative < 1e-8
    if case.junction is not None:
        assert s.junction is not None and np.isfinite(s.junction.psi)


@pytest.mark.slow
def test_frost_demo_pin():
    """Frost demo, full 12-day run: frost depth in open ground at the end of the cold spell
    (regression pin, rel 1e-6) and the thaw front after it; energy balance closes."""
    s = run_study(load_case(CASES / "frost_slab_edge.toml")).solution
    h = s.history
    at_day_10 = h.times.index(10 * 86400.0 - 21600.0)
    assert h.phase[at_day_10]["front_open_ground"] == pytest.approx(0.4831874610765, rel=1e-6)
    # after the thaw starts the surface layer is unfrozen: a thaw front above the frost depth
    assert 0 < h.phase[-1]["front_open_ground"] < h.phase[-1]["front_far_open_ground"]
    assert s.balance.relative < 1e-9


@pytest.mark.slow
def test_pcm_demo_pin():
    """Phase-change lining, periodic day: room-side heat-flow amplitude (regression pin,
    rel 1e-4: the periodic tolerance is 1e-3 K) is larger than without latent heat."""
    with_pcm = run_study(load_case(CASES / "pcm_wall.toml")).solution.periodic.as_dict()
    room = with_pcm["boundaries"]["room"]
    assert room["amplitude"] == pytest.approx(12.140938059414966, rel=1e-4)
    plain = run_study(
        load_case(CASES / "pcm_wall.toml", ("materials.pcm_board.latent_heat=0",))
    ).solution.periodic.as_dict()
    assert plain["boundaries"]["room"]["amplitude"] < 0.5 * room["amplitude"]
