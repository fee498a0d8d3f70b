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
    "balcony, no thermal break": ("balcony_slab.toml", (), "psi", 1.1420571145898981),
    "balcony, thermal break": (
        "balcony_slab.toml",
        ("regions.3.material=thermal_break",),
        "psi",
        0.3288492521936598,
    ),
    "wall-window jamb": ("wall_window_junction.toml", (), "psi", 0.05974245827313229),
    "aluminium frame": ("window_frame_section.toml", (), "u_f", 2.590603717914364),
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
    """Every case file loads and runs as written (junction evaluation included): finite
    fields, an energy balance that closes, junction results where declared."""
    case = load_case(path)
    s = run_study(case)
    assert np.all(np.isfinite(s.solution.temperature))
    assert s.solution.balance.relative < 1e-8
    if case.junction is not None:
        assert s.junction is not None and np.isfinite(s.junction.psi)
