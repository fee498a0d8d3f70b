"""Heat-flux fields of a transient run's saved states use the conductivities of that
state's phases, not those of the end state (frozen soil conducts better than thawed)."""

from __future__ import annotations

import numpy as np
import pytest

from fvheat.case.load import load_case
from fvheat.output.memory import SolvedFields
from fvheat.simulate import simulate

K_THAWED, K_FROZEN = 1.4, 2.8  # W/(m·K), the case's values (invented, of the right order)
H = 0.01  # m, uniform cells

CASE = f"""title = "silt wall freezing and thawing in a two-day cycle (invented)"
[mesh]
max_cell = {H}
min_cell = {H}
[materials.silt]
conductivity = {K_THAWED}
density = 1900
specific_heat = 1300
latent_heat = 44000
phase_change = [-0.6, 0.0]
frozen = {{ conductivity = {K_FROZEN}, specific_heat = 950 }}
[[regions]]
material = "silt"
box = [0.0, 0.0, 0.2, 0.05]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.05]]]
air_temperature = 5.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.2, 0.0], [0.2, 0.05]]]
air_temperature = {{ mean = 0.0, amplitude = 20.0, period = 172800 }}
resistance = 0.04
[time]
duration = 172800
step = 1800
initial_temperature = 5.0
save_every = 21600
"""


def _run(tmp_path_factory, kind: str):
    path = tmp_path_factory.mktemp("frost") / "wall.toml"
    path.write_text(CASE.replace("[mesh]", f'[mesh]\nkind = "{kind}"'), encoding="utf-8")
    sol = simulate(load_case(path))
    return sol, SolvedFields(sol)


@pytest.fixture(scope="module")
def runs(tmp_path_factory):
    """Both meshes' runs, each solved once for the module."""
    return {kind: _run(tmp_path_factory, kind) for kind in ("rectilinear", "triangles")}


@pytest.fixture(scope="module")
def run(runs):
    return runs["rectilinear"]


@pytest.fixture(scope="module", params=["rectilinear", "triangles"])
def either(request, runs):
    return runs[request.param]


def test_the_run_freezes_and_thaws_again(run):
    """The premise: some saved states hold fully frozen cells, the end state none."""
    sol, _ = run
    frozen = [int(np.sum(f < -0.6)) for f in sol.history.fields]
    assert max(frozen) >= 10 and frozen[-1] == 0


def test_surface_heat_flux_of_every_saved_state_closes_with_the_reported_flow(either):
    """The field's outside-surface heat flux, integrated over the boundary, equals the
    heat flow of timeseries.csv at the same saved time (both from the solver's surface
    balance at that state's phases) to round-off, on either mesh."""
    sol, fields = either
    for k, flows in enumerate(sol.history.flows):
        view = fields.field(k)
        on = view.face_boundary == list(view.boundary_names).index("outside")
        ends = view.face_ends[on]
        length = np.hypot(*(ends[:, 1] - ends[:, 0]).T)
        flow = float(np.sum(view.face_flux[on] * length))
        assert flow == pytest.approx(flows[1], rel=1e-9, abs=1e-9), k


def test_flux_in_frozen_cells_follows_fouriers_law_with_the_frozen_conductivity(run):
    """In a cell whose neighbours are frozen too, q = −k_frozen (T_e − T_w) / (2h) on the
    uniform grid (Fourier's law, central difference: the mean of its two face fluxes)."""
    sol, fields = run
    c = sol.mesh.centres
    row = np.flatnonzero(np.isclose(c[:, 1], H / 2))
    row = row[np.argsort(c[row, 0])]
    checked = 0
    for k in range(len(sol.history.times) - 1):
        view = fields.field(k)
        t = view.temperature[row]
        inner = np.flatnonzero((t[:-2] < -0.7) & (t[1:-1] < -0.7) & (t[2:] < -0.7)) + 1
        expected = -K_FROZEN * (t[inner + 1] - t[inner - 1]) / (2 * H)
        assert view.flux[row[inner], 0] == pytest.approx(expected, rel=1e-9, abs=1e-9), k
        checked += inner.size
    assert checked >= 10


def test_triangle_flux_in_frozen_triangles_uses_the_frozen_conductivity(runs):
    """Triangle mesh: in a triangle whose three nodes are frozen, q = −k_frozen ∇T with ∇T
    the gradient of the linear interpolant through its nodes (solved here from the node
    coordinates, independently of the package's gradient)."""
    sol, fields = runs["triangles"]
    mesh = sol.mesh
    tri = mesh.triangles
    p = mesh.centres[tri]  # (t, 3, 2) node positions
    edges = p[:, 1:] - p[:, :1]  # (t, 2, 2): rows are the two edge vectors
    checked = 0
    for k in range(len(sol.history.times) - 1):
        view = fields.field(k)
        t = view.temperature[tri]
        frozen = np.all(t < -0.7, axis=1)
        rise = (t[:, 1:] - t[:, :1])[frozen]  # (f, 2): temperature rise along each edge
        grad = np.linalg.solve(edges[frozen], rise[..., None])[..., 0]
        assert view.flux[frozen] == pytest.approx(-K_FROZEN * grad, rel=1e-9, abs=1e-9), k
        checked += int(frozen.sum())
    assert checked >= 10
