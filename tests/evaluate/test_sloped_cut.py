"""U-values from sloped layer cuts (a pitched roof's flanking element).

Source: ISO 6946 layer sum, U = 1/(R_si + Σ d/λ + R_se), on the invented eaves demo: its
roof cut, perpendicular to the 35° slope, crosses 0.24 m of mineral wool (λ = 0.04)
between the ceiling (R_si = 0.10) and the roof surface (R_se = 0.04). Exact (1e-12): the
cut is read on the drawn geometry, whichever mesh solves the case.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from casefiles import load

from fvheat.case.load import load_case
from fvheat.errors import CaseError
from fvheat.study import run_study

DEMO = Path(__file__).resolve().parents[2] / "cases" / "eaves_pitched_roof.toml"


@pytest.mark.parametrize("kind", ["triangles", "rectilinear"])
def test_roof_u_from_a_sloped_cut(kind):
    j = run_study(load_case(DEMO, [f"mesh.kind={kind}"]), check_grid=False).junction
    roof = j.flanking[1]
    assert roof.cut is not None
    assert [m for m, _, _ in roof.cut.layers] == ["roof_wool"]
    assert roof.cut.layers[0][1] == pytest.approx(0.24, rel=1e-12)
    assert (roof.cut.r_start, roof.cut.r_end) == pytest.approx((0.10, 0.04), rel=1e-12)
    assert roof.u_value == pytest.approx(1.0 / (0.10 + 0.24 / 0.04 + 0.04), rel=1e-12)


def test_slanted_cut_refused_in_one_line(tmp_path):
    """A cut ending on the roof top but not perpendicular to it does not measure the layer
    thickness: refused."""
    t = math.tan(math.radians(35.0))
    top = 0.2 + t * 0.6 + 0.24 / math.cos(math.radians(35.0))  # roof top at x = −0.6
    text = DEMO.read_text(encoding="utf-8").replace(
        "[-0.6623416552757491, 0.9567625211971258]", f"[-0.6, {top!r}]"
    )
    with pytest.raises(CaseError, match=r"junction\.flanking\.1\.cut.*perpendicular"):
        run_study(load(tmp_path, text), check_grid=False)
