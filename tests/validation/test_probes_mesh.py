"""Probe interpolation and the rectilinear mesher.

Probes: bilinear interpolation between cell centres is exact for a field that is linear
between the bracketing centres and for a uniform field (a property of linear
interpolation). The reference fields are analytic: the steady field of a 1-D layered wall
is linear within each layer (ISO 6946 resistance method, as in test_wall_1d), and a body
whose every surface sees the same temperature is uniform at that temperature.

Mesh: the design rules of the grid (region corners on grid lines, cell size ≤ max_cell,
neighbour size ratio ≤ growth) and geometry (plane areas and lengths, exact formulas).
All geometries are invented.
"""

from __future__ import annotations

import numpy as np
import pytest

from fvheat.mesh import build_mesh

from .helpers import load, probes_toml, report, run, toml_list

# --- probes ------------------------------------------------------------------------------------

LAYERS = [("lime_plaster", 0.02, 0.8), ("clay_block", 0.30, 0.25), ("wood_fibre", 0.08, 0.045)]
X = np.concatenate([[0.0], np.cumsum([d for _, d, _ in LAYERS])])
ROW = 0.01  # m, height of the one-row wall strip (≤ min_cell: a single row of cells)


def test_probe_exact_on_piecewise_linear_field(tmp_path):
    """1-D wall, 20 °C / 0 °C air: probes inside a layer, bracketed by two centres of that
    layer, equal the analytic value to 1e-12 K (the round-off of the linear solve on
    ~60 cells)."""
    mats = "".join(f"\n[materials.{n}]\nconductivity = {lam}\n" for n, _, lam in LAYERS)
    regions = "".join(
        f'\n[[regions]]\nmaterial = "{n}"\nbox = {toml_list([X[i], 0.0, X[i + 1], ROW])}\n'
        for i, (n, _, _) in enumerate(LAYERS)
    )
    points = {
        "p0": (0.013, 0.004),
        "p1": (0.1234, 0.007),
        "p2": (0.25, 0.005),
        "p3": (0.377, 0.002),
    }
    text = f"""
[mesh]
kind = "rectilinear"
max_cell = 0.03
min_cell = {ROW}
{mats}
{regions}
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, {ROW}]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[{toml_list([X[-1], 0.0])}, {toml_list([X[-1], ROW])}]]
air_temperature = 0.0
resistance = 0.04
""" + probes_toml(points)
    sol = run(tmp_path, text)
    r = np.array([d / lam for _, d, lam in LAYERS])
    q = 20.0 / (0.13 + r.sum() + 0.04)
    lam = np.array([lam for _, _, lam in LAYERS])

    def exact(x: float) -> float:
        i = int(np.searchsorted(X, x) - 1)
        return 20.0 - q * (0.13 + r[:i].sum() + (x - X[i]) / lam[i])

    grid, mat = sol.mesh.grid, sol.mesh.material
    errors = {}
    for name, (x, _) in points.items():
        # precondition: the two centres bracketing x lie in the probe's layer
        hi = int(np.searchsorted(grid.xc, x))
        layer = int(np.searchsorted(X, x) - 1)
        cells = grid.cell_index[0, [hi - 1, hi]]
        assert hi > 0 and hi < grid.xc.size
        assert all(sol.mesh.material_names[mat[c]] == LAYERS[layer][0] for c in cells)
        errors[name] = abs(sol.probes[name] - exact(x))
    report("probes on a piecewise linear field", cells=sol.mesh.n_cells, errors_K=errors)
    assert max(errors.values()) <= 1e-12


def test_probe_exact_on_uniform_field(tmp_path):
    """An L-shaped composite whose surfaces all see 7.25 °C (different resistances, one fixed
    temperature): the field is uniform, and every probe reads 7.25 °C to 1e-12 K, including
    probes beyond the outermost centres (held values) and at the re-entrant corner (where
    some bracketing centres lie outside the body and the weights are renormalised)."""
    theta = 7.25
    points = {
        "interior": (0.31, 0.47),
        "interface": (0.2, 0.33),
        "outer_corner": (0.0, 0.0),
        "reentrant_corner": (0.4, 0.3),
        "near_reentrant": (0.399, 0.301),
        "edge": (0.6, 0.3),
    }
    text = f"""
[mesh]
kind = "rectilinear"
max_cell = 0.05
min_cell = 0.01
[materials.concrete]
conductivity = 2.3
[materials.cork]
conductivity = 0.045
[[regions]]
material = "concrete"
polygon = [[0.0, 0.0], [0.6, 0.0], [0.6, 0.3], [0.4, 0.3], [0.4, 0.8], [0.0, 0.8]]
[[regions]]
material = "cork"
box = [0.2, 0.0, 0.4, 0.8]
[[boundaries]]
name = "a"
edges = [[[0.0, 0.0], [0.6, 0.0]], [[0.6, 0.0], [0.6, 0.3]]]
air_temperature = {theta}
resistance = 0.04
[[boundaries]]
name = "b"
edges = [[[0.6, 0.3], [0.4, 0.3]], [[0.4, 0.3], [0.4, 0.8]]]
air_temperature = {theta}
resistance = 0.13
[[boundaries]]
name = "c"
edges = [[[0.0, 0.8], [0.4, 0.8]]]
temperature = {theta}
""" + probes_toml(points)
    sol = run(tmp_path, text)
    errors = {name: abs(v - theta) for name, v in sol.probes.items()}
    report("probes on a uniform field", errors_K=errors)
    assert max(errors.values()) <= 1e-12


# --- mesh rules ----------------------------------------------------------------------------------

MESH_CASE = """
[mesh]
kind = "rectilinear"
max_cell = 0.05
min_cell = 0.004
growth = 1.25
[materials.brick]
conductivity = 0.6
[materials.membrane]
conductivity = 0.2
[materials.steel]
conductivity = 50.0
[materials.foam]
conductivity = 0.03
[[regions]]
material = "brick"
box = [0.0, 0.0, 0.8, 0.6]
[[regions]]
material = "membrane"
box = [0.2, 0.0, 0.203, 0.6]
[[regions]]
material = "steel"
box = [0.5, 0.3, 0.8, 0.311]
[[regions]]
material = "foam"
polygon = [[0.31, 0.12], [0.45, 0.12], [0.31, 0.45]]
[[boundaries]]
name = "warm"
edges = [[[0.0, 0.0], [0.0, 0.6]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "cold"
edges = [[[0.8, 0.0], [0.8, 0.6]]]
air_temperature = -10.0
resistance = 0.04
"""


def _thin(lines: np.ndarray, keys: np.ndarray, min_cell: float) -> np.ndarray:
    """Whether each cell lies between two key lines closer than min_cell (a forced thin
    layer, meshed as one cell whatever its size)."""
    centres = 0.5 * (lines[1:] + lines[:-1])
    k = np.searchsorted(keys, centres) - 1
    return np.diff(keys)[k] <= min_cell * (1 + 1e-9)


def _worst_ratio(case, mesh) -> float:
    """Largest neighbour size ratio over both axes, leaving out forced thin layers."""
    pts = _key_points(case)
    worst = 1.0
    for lines, axis in ((mesh.grid.x, 0), (mesh.grid.y, 1)):
        h = np.diff(lines)
        thin = _thin(lines, np.unique(pts[:, axis]), case.mesh.min_cell)
        r = np.maximum(h[1:] / h[:-1], h[:-1] / h[1:])
        keep = ~(thin[1:] | thin[:-1])
        if keep.any():
            worst = max(worst, float(r[keep].max()))
    return worst


def _key_points(case) -> np.ndarray:
    """Region corners and boundary-segment ends, (n, 2) m."""
    return np.concatenate(
        [r.vertices for r in case.regions]
        + [np.asarray(e, float) for b in case.boundaries for e in b.edges]
    )


def test_grid_rules(tmp_path):
    """Every region corner and boundary end lies on a grid line (1e-12 m); no cell edge
    exceeds max_cell; neighbouring cells differ by at most growth·(1 + 1e-6) except where a
    cell is a forced thin layer."""
    case = load(tmp_path, MESH_CASE)
    mesh = build_mesh(case)
    grid = mesh.grid
    pts = _key_points(case)
    miss_x = max(float(np.min(np.abs(grid.x - px))) for px in pts[:, 0])
    miss_y = max(float(np.min(np.abs(grid.y - py))) for py in pts[:, 1])
    largest = float(max(np.diff(grid.x).max(), np.diff(grid.y).max()))
    worst = _worst_ratio(case, mesh)
    report(
        "mesh rules",
        corner_miss_m=max(miss_x, miss_y),
        largest_cell_m=largest,
        max_ratio=worst,
        growth=case.mesh.growth,
    )
    assert miss_x <= 1e-12 and miss_y <= 1e-12
    assert largest <= case.mesh.max_cell * (1 + 1e-9)
    assert worst <= case.mesh.growth * (1 + 1e-6)


def test_grid_growth_exact(tmp_path):
    """Neighbour ratio ≤ growth·(1 + 1e-6) away from forced thin layers."""
    case = load(tmp_path, MESH_CASE)
    assert _worst_ratio(case, build_mesh(case)) <= case.mesh.growth * (1 + 1e-6)


def test_grid_growth_after_thin_layer(tmp_path):
    """A 2 mm membrane 48 mm before a material change: the cells graded away from the
    membrane must keep growing by ≤ growth across the next key line (x = 0.35 m)."""
    text = """
[mesh]
kind = "rectilinear"
max_cell = 0.1
min_cell = 0.02
growth = 1.2
[materials.a]
conductivity = 1.0
[materials.b]
conductivity = 0.2
[materials.c]
conductivity = 0.04
[[regions]]
material = "a"
box = [0.0, 0.0, 0.35, 0.02]
[[regions]]
material = "b"
box = [0.3, 0.0, 0.302, 0.02]
[[regions]]
material = "c"
box = [0.35, 0.0, 1.0, 0.02]
[[boundaries]]
name = "left"
edges = [[[0.0, 0.0], [0.0, 0.02]]]
temperature = 0.0
"""
    case = load(tmp_path, text)
    worst = _worst_ratio(case, build_mesh(case))
    report("mesh growth after a thin layer", max_ratio=worst, growth=case.mesh.growth)
    assert worst <= case.mesh.growth * (1 + 1e-6)


# --- sloped geometry ---------------------------------------------------------------------------

TAN30 = float(np.tan(np.radians(30.0)))


def wedge_case(h: float) -> str:
    """A 1 m × tan 30° timber box with a 30° wedge of insulation painted over it (the box
    stays the body, the wedge only changes the material); uniform cells of h."""
    return f"""
[mesh]
kind = "rectilinear"
max_cell = {h}
min_cell = {h}
[materials.timber]
conductivity = 0.13
[materials.insulation]
conductivity = 0.04
[[regions]]
material = "timber"
box = [0.0, 0.0, 1.0, {TAN30!r}]
[[regions]]
material = "insulation"
polygon = [[0.0, 0.0], [1.0, 0.0], [1.0, {TAN30!r}]]
[[boundaries]]
name = "base"
edges = [[[0.0, 0.0], [1.0, 0.0]]]
temperature = 0.0
"""


@pytest.mark.parametrize("h", [0.1, 0.05, 0.025, 0.0125, 0.00625])
def test_sloped_region_area(tmp_path, h):
    """Σ cell volumes of the 30° wedge material vs its exact area tan30°/2: the error is at
    most the area of the cells the sloped edge crosses, Δx·dy + Δy·dx + dx·dy (a bound that
    shrinks like h), and below 0.5 % once h ≤ 0.0125 m; the whole body is exact (1e-12)."""
    mesh = build_mesh(load(tmp_path, wedge_case(h)))
    names = mesh.material_names
    area = {n: float(mesh.volumes[mesh.material == names.index(n)].sum()) for n in names}
    exact = 0.5 * TAN30
    dx = float(np.diff(mesh.grid.x).max())
    dy = float(np.diff(mesh.grid.y).max())
    bound = 1.0 * dy + TAN30 * dx + dx * dy
    err = abs(area["insulation"] - exact)
    report("sloped region area", h=h, rel_error=err / exact, bound_rel=bound / exact)
    assert err <= bound
    assert abs(sum(area.values()) - TAN30) <= 1e-12
    if h <= 0.0125:
        assert err / exact <= 5e-3


def trapezoid_case(maxc: float, minc: float, order: list[str]) -> str:
    """A trapezoid with a sloped top edge; every edge is a named fixed-temperature boundary,
    listed in ``order``."""
    edges = {
        "base": ((0.0, 0.0), (1.0, 0.0)),
        "right": ((1.0, 0.0), (1.0, 1.0)),
        "slope": ((1.0, 1.0), (0.0, 0.5)),
        "left": ((0.0, 0.5), (0.0, 0.0)),
    }
    entries = "".join(
        f'\n[[boundaries]]\nname = "{n}"\nedges = [[{toml_list(edges[n][0])}, '
        f"{toml_list(edges[n][1])}]]\ntemperature = {float(i)}\n"
        for i, n in enumerate(order)
    )
    return f"""
[mesh]
kind = "rectilinear"
max_cell = {maxc}
min_cell = {minc}
[materials.m]
conductivity = 1.0
[[regions]]
material = "m"
polygon = [[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 0.5]]
{entries}"""


TRAPEZOID_LENGTHS = {"base": 1.0, "right": 1.0, "slope": float(np.hypot(1.0, 0.5)), "left": 0.5}


@pytest.mark.parametrize(("maxc", "minc"), [(0.1, 0.01), (0.05, 0.05), (0.033, 0.033)])
def test_stepped_edge_exchange_length(tmp_path, maxc, minc):
    """The stepped faces of a sloped edge, weighted by their projection on the edge normal,
    add up to the true edge length √1.25 m (1e-12 m), and the straight edges keep theirs."""
    sol = run(tmp_path, trapezoid_case(maxc, minc, ["slope", "base", "right", "left"]))
    errors = {n: abs(sol.surfaces[n].length - v) for n, v in TRAPEZOID_LENGTHS.items()}
    report("stepped edge length (trapezoid)", max_cell=maxc, errors_m=errors)
    assert max(errors.values()) <= 1e-12


def test_sloped_edge_leaves_neighbouring_edges_alone(tmp_path):
    """Same trapezoid, the sloped boundary listed last: the lengths must not change."""
    sol = run(tmp_path, trapezoid_case(0.1, 0.1, ["base", "right", "left", "slope"]))
    errors = {n: abs(sol.surfaces[n].length - v) for n, v in TRAPEZOID_LENGTHS.items()}
    report("stepped edge listed last", errors_m=errors)
    assert max(errors.values()) <= 1e-12


def wedge_body_case(h: float) -> str:
    """A 30° wedge as the body itself; its sloped edge exchanges heat with air."""
    return f"""
[mesh]
kind = "rectilinear"
max_cell = {h}
min_cell = {h}
[materials.m]
conductivity = 1.0
[[regions]]
material = "m"
polygon = [[0.0, 0.0], [1.0, 0.0], [1.0, {TAN30!r}]]
[[boundaries]]
name = "slope"
edges = [[[0.0, 0.0], [1.0, {TAN30!r}]]]
air_temperature = 0.0
resistance = 0.1
[[boundaries]]
name = "side"
edges = [[[1.0, 0.0], [1.0, {TAN30!r}]]]
temperature = 20.0
"""


def test_wedge_exchange_length_exact(tmp_path):
    """The Mesh contract: stepped faces sum to the true edge length (1e-9 m) on every grid."""
    exact = 1.0 / np.cos(np.radians(30.0))
    for h in (0.1, 0.05, 0.025):
        sol = run(tmp_path, wedge_body_case(h))
        assert abs(sol.surfaces["slope"].length - exact) <= 1e-9
