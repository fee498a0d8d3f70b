"""Surface temperatures at face end points, and grid refinement towards re-entrant corners.

Extrapolation: a linear profile along a straight surface is reproduced exactly at every
face end point by linear extrapolation from two faces (a property of linear functions);
across a change of boundary or material the face's own value is kept. Refinement: the
cells next to a re-entrant corner of an exchanging surface are ``corner_cell`` wide
(the mesher's stated rule); corners on adiabatic or heat-flux-only edges are not refined.
All geometries are invented.
"""

from __future__ import annotations

import numpy as np
import pytest

from fvheat.assembly.system import System
from fvheat.errors import CaseError
from fvheat.evaluate.surfaces import surface_points
from fvheat.mesh import build_mesh
from fvheat.simulate import simulate

from .helpers import load

# an L-shaped body: a 0.3 × 0.2 m block with a 0.1 × 0.1 m notch at its top right corner;
# the re-entrant corner is at (0.2, 0.1)
L_SHAPE = """
[mesh]
max_cell = 0.02
min_cell = 0.004
growth = 1.25
{corner}
[materials.block]
conductivity = 1.0
[[regions]]
material = "block"
polygon = [[0.0, 0.0], [0.3, 0.0], [0.3, 0.1], [0.2, 0.1], [0.2, 0.2], [0.0, 0.2]]
[[boundaries]]
name = "notch"
edges = [[[0.3, 0.1], [0.2, 0.1]], [[0.2, 0.1], [0.2, 0.2]]]
{notch}
[[boundaries]]
name = "base"
edges = [[[0.0, 0.0], [0.3, 0.0]]]
air_temperature = -5.0
resistance = 0.04
"""
WARM = "air_temperature = 20.0\nresistance = 0.13"


def _l_shape(tmp_path, corner: str = "", notch: str = WARM):
    return load(tmp_path, L_SHAPE.format(corner=corner, notch=notch))


def test_linear_profile_is_exact_at_face_ends(tmp_path):
    """Face temperatures set to θ = 3 + 40·x + 25·y: every end point of a face whose
    neighbour beyond it is on the same line, boundary and material gets exactly that
    value (to round-off); the face centres keep theirs."""
    pts, ts, moved = _linear_profile(_l_shape(tmp_path))
    np.testing.assert_array_equal(pts.temperature[: ts.size], ts)
    # where the run stops (corners, ends) the face keeps its own value
    np.testing.assert_array_equal(pts.temperature[ts.size :][~moved], np.tile(ts, 2)[~moved])


def _linear_profile(case):
    """Surface points of ``case`` with the face temperatures θ = 3 + 40·x + 25·y, checked:
    every end point but those where a straight run of a boundary stops (at most 8) moved
    to the profile's value there (to round-off). The points, the face values and which
    end points moved."""
    mesh = build_mesh(case)
    s = System.build(case, mesh).surface
    c = mesh.b_centre[s.face]
    ts = 3.0 + 40.0 * c[:, 0] + 25.0 * c[:, 1]
    pts = surface_points(mesh, s, ts)
    exact = 3.0 + 40.0 * pts.at[:, 0] + 25.0 * pts.at[:, 1]
    n = ts.size
    moved = pts.temperature[n:] != np.tile(ts, 2)
    assert moved.sum() >= 2 * n - 8
    np.testing.assert_allclose(pts.temperature[n:][moved], exact[n:][moved], rtol=0, atol=1e-12)
    return pts, ts, moved


# the L-shape 8 times smaller on uniform cells of 1/5120 m: face ends at dyadic
# coordinates such as 0.0009765625 m, half-way between two nanometre steps, where ends
# that round-off puts on either side of the half once failed to meet
SMALL_L = """
[mesh]
max_cell = 0.0001953125
min_cell = 0.0001953125
corner_cell = 0.0001953125
[materials.block]
conductivity = 1.0
[[regions]]
material = "block"
polygon = [[0.0, 0.0], [0.0375, 0.0], [0.0375, 0.0125], [0.025, 0.0125], [0.025, 0.025],
    [0.0, 0.025]]
[[boundaries]]
name = "notch"
edges = [[[0.0375, 0.0125], [0.025, 0.0125]], [[0.025, 0.0125], [0.025, 0.025]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "base"
edges = [[[0.0, 0.0], [0.0375, 0.0]]]
air_temperature = -5.0
resistance = 0.04
"""


def test_linear_profile_is_exact_at_dyadic_face_ends(tmp_path):
    """As above on the small L-shape with uniform dyadic cells: every end point but those
    where a straight run stops gets the linear profile's value (to round-off)."""
    _linear_profile(load(tmp_path, SMALL_L))


def test_corner_minimum_reported_at_the_corner_point(tmp_path):
    """Warm air in the notch: the notch surface is coldest at the re-entrant corner, and
    the reported minimum is at that point, below every face-centre temperature."""
    sol = simulate(_l_shape(tmp_path))
    r = sol.surfaces["notch"]
    assert r.min_at == pytest.approx((0.2, 0.1), abs=1e-12)
    ts, _, _ = sol.system.surface.surface_state(sol.temperature, 0.0)
    notch = sol.system.surface.bid == 0
    assert r.min_temperature < ts[notch].min()


def _cells_at(mesh, x, y) -> np.ndarray:
    """Widths and heights of the grid cells touching the point (x, y)."""
    g = mesh.grid
    i = np.searchsorted(g.x, x)
    j = np.searchsorted(g.y, y)
    return np.array(
        [g.x[i] - g.x[i - 1], g.x[i + 1] - g.x[i], g.y[j] - g.y[j - 1], g.y[j + 1] - g.y[j]]
    )


def _assert_first_cells(sizes: np.ndarray, size: float) -> None:
    """The grader fits whole cells: first cells within 10 % below the asked size."""
    assert np.all(sizes <= size * (1 + 1e-9)) and np.all(sizes >= 0.9 * size), sizes


def test_refined_towards_reentrant_corner(tmp_path):
    """Default corner cell: the smaller of min_cell/2 and 1 mm (here 1 mm); given: as given;
    corner_cell = min_cell: no extra refinement."""
    _assert_first_cells(_cells_at(build_mesh(_l_shape(tmp_path)), 0.2, 0.1), 0.001)
    case = _l_shape(tmp_path, "corner_cell = 0.0005")
    _assert_first_cells(_cells_at(build_mesh(case), 0.2, 0.1), 0.0005)
    case = _l_shape(tmp_path, "corner_cell = 0.004")
    _assert_first_cells(_cells_at(build_mesh(case), 0.2, 0.1), 0.004)


def test_flux_only_corner_not_refined(tmp_path):
    """A corner whose edges carry only an imposed heat flux ties no surface temperature:
    cells there keep min_cell."""
    case = _l_shape(tmp_path, notch="heat_flux = 5.0")
    _assert_first_cells(_cells_at(build_mesh(case), 0.2, 0.1), 0.004)


def test_corner_cell_above_min_cell_rejected(tmp_path):
    with pytest.raises(CaseError, match=r"mesh\.corner_cell: .*must not exceed min_cell"):
        _l_shape(tmp_path, "corner_cell = 0.01")
