"""An independent reference for a section with a sloped interface and a sloped exterior
surface (scikit-fem, quadratic elements on its own mapped structured mesh).

Source: independent library. scikit-fem solves ∇·(λ∇θ) = 0 with Robin conditions
−λ∂θ/∂n = (θ − θ_air)/R on the inside face x = 0 and on the sloped outside face, adiabatic
top and bottom. Its mesh is a tensor grid in (ξ, y), ξ ∈ [0, 1] mapped onto the first
material (0 ≤ x ≤ s(y)) and ξ ∈ [1, 2] onto the second (s(y) ≤ x ≤ r(y)); s and r are
linear in y, so the interface and the sloped surface are straight lines of the mesh (the
geometry is exact), independently of the `triangle` library fvheat uses. The solve is the
shared one of ``tests/fem_reference.py`` (P2, Robin surfaces).
"""

from __future__ import annotations

import numpy as np
from fem_reference import Surface, solve_robin
from skfem import MeshTri

# invented section: a dense layer and an insulation layer, both wedge-shaped, m and W/(m·K)
HEIGHT = 0.6
S0, S1 = 0.10, 0.16  # interface x at y = 0 and y = HEIGHT
R0, R1 = 0.25, 0.40  # sloped outside surface x at y = 0 and y = HEIGHT
K_DENSE, K_INSULATION = 1.0, 0.05
T_IN, R_IN, T_OUT, R_OUT = 20.0, 0.13, -10.0, 0.04


def _s(y):
    return S0 + (S1 - S0) * y / HEIGHT


def _r(y):
    return R0 + (R1 - R0) * y / HEIGHT


def solve(n: int, points: np.ndarray | None = None) -> tuple[dict[str, float], np.ndarray]:
    """Heat flows into the body (W/m) through "inside" and "outside", with n elements
    across each material and 4n up the height, and the temperatures (°C) at ``points``
    ((k, 2) m)."""
    xi = np.concatenate([np.linspace(0.0, 1.0, n + 1), np.linspace(1.0, 2.0, n + 1)[1:]])
    mesh = MeshTri.init_tensor(xi, np.linspace(0.0, HEIGHT, 4 * n + 1))
    q, y = mesh.p
    x = np.where(q <= 1.0, q * _s(y), _s(y) + (q - 1.0) * (_r(y) - _s(y)))
    mesh = MeshTri(np.vstack([x, y]), mesh.t)
    lam = np.where(q[mesh.t].mean(axis=0) < 1.0, K_DENSE, K_INSULATION)
    tol = 1e-9
    sides = [
        Surface("inside", mesh.facets_satisfying(lambda p: np.abs(p[0]) < tol), T_IN, R_IN),
        Surface(
            "outside",
            mesh.facets_satisfying(lambda p: np.abs(p[0] - _r(p[1])) < tol),
            T_OUT,
            R_OUT,
        ),
    ]
    fem = solve_robin(mesh, lam, sides)
    flows = {s.name: fem.heat_flow(s.name) for s in sides}
    at = np.zeros(0) if points is None else fem.at(np.asarray(points, float).T)
    return flows, at


def case_toml(max_cell: float, min_cell: float, kind: str = "triangles") -> str:
    """The same section as an fvheat case file."""
    return f"""
title = "sloped wedge"
[mesh]
max_cell = {max_cell!r}
min_cell = {min_cell!r}
kind = "{kind}"
[materials.dense]
conductivity = {K_DENSE!r}
[materials.insulation]
conductivity = {K_INSULATION!r}
[[regions]]
material = "dense"
polygon = [[0.0, 0.0], [{S0!r}, 0.0], [{S1!r}, {HEIGHT!r}], [0.0, {HEIGHT!r}]]
[[regions]]
material = "insulation"
polygon = [[{S0!r}, 0.0], [{R0!r}, 0.0], [{R1!r}, {HEIGHT!r}], [{S1!r}, {HEIGHT!r}]]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, {HEIGHT!r}]]]
air_temperature = {T_IN!r}
resistance = {R_IN!r}
[[boundaries]]
name = "outside"
edges = [[[{R0!r}, 0.0], [{R1!r}, {HEIGHT!r}]]]
air_temperature = {T_OUT!r}
resistance = {R_OUT!r}
"""
