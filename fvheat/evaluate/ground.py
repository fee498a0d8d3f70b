"""ψ_g of a slab-on-ground edge: the floor's U-value by ISO 13370 for the flanking floor.

ISO 10211 (from memory): for a ground-floor junction modelled in 2-D with the soil block
of :mod:`fvheat.case.ground`, ψ_g = L2D − 0.5·B'·U_fl − Σ U_j·l_j (the other flanking
elements, e.g. the wall above), with U_fl the floor's U-value by ISO 13370 for the same B'.

ISO 13370, slab-on-ground floor (formulas from memory):

* total equivalent thickness d_t = w + λ_g·(R_si + R_f + R_se) (m), with w the full
  thickness of the walls, λ_g the soil conductivity, R_f the floor construction's thermal
  resistance (slab, insulation, screed; no surface resistances) and R_si, R_se the surface
  resistances (ISO 13370 uses 0.17 and 0.04 m²·K/W; here the model's own floor and ground
  surface resistances, so that ψ_g holds only the edge effect);
* uninsulated and moderately insulated floors, d_t < B':
  U = 2·λ_g / (π·B' + d_t) · ln(π·B'/d_t + 1);
* well-insulated floors, d_t ≥ B': U = λ_g / (0.457·B' + d_t).

The flanking floor's length is 0.5·B' from the floor edge (the inside face of the wall) in
internal and overall internal dimensions, 0.5·B' + w in external ones.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from fvheat.assembly.properties import conductivity
from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.mesh.mesh import Mesh

#: ISO 13370 (from memory): surface resistances of its floor U formula, m²·K/W
ISO13370_RSI, ISO13370_RSE = 0.17, 0.04


@dataclass(frozen=True)
class GroundFloor:
    """The ISO 13370 floor U-value (W/(m²·K)) and what went into it (m, W/(m·K), m²·K/W)."""

    width: float
    soil_conductivity: float
    wall_thickness: float
    r_si: float
    r_f: float
    r_se: float
    r_f_from: str
    d_t: float
    u_value: float
    formula: str

    @property
    def length(self) -> float:
        """0.5·B': the flanking floor's internal length, m."""
        return 0.5 * self.width

    def lengths(self) -> dict[str, float]:
        """The flanking floor's length in each dimension system, m."""
        half = self.length
        return {
            "internal": half,
            "overall_internal": half,
            "external": half + self.wall_thickness,
        }

    def as_dict(self) -> dict[str, Any]:
        """The ground-floor result as a JSON-ready dict (B' m, λ W/(m·K), ψ_g W/(m·K))."""
        return {
            "B_prime": self.width,
            "soil_conductivity": self.soil_conductivity,
            "wall_thickness": self.wall_thickness,
            "R_si": self.r_si,
            "R_f": self.r_f,
            "R_f_from": self.r_f_from,
            "R_se": self.r_se,
            "d_t": self.d_t,
            "U_floor": self.u_value,
            "U_floor_formula": self.formula,
            "floor_length": self.length,
            "source": (
                "ISO 13370 slab-on-ground U and ISO 10211 ground model dimensions (0.5·B' "
                "inside, 2.5·B' outside and below ground), both from memory"
            ),
        }


def slab_on_ground_u(
    width: float, soil: float, wall: float, r_si: float, r_f: float, r_se: float
) -> tuple[float, float, str]:
    """ISO 13370 slab-on-ground U-value (W/(m²·K)) for B' = ``width`` (m), soil λ ``soil``
    (W/(m·K)), wall thickness ``wall`` (m) and resistances (m²·K/W); with d_t (m) and the
    formula used. From memory; see the module notes."""
    d_t = wall + soil * (r_si + r_f + r_se)
    if d_t < width:
        u = 2.0 * soil / (math.pi * width + d_t) * math.log(math.pi * width / d_t + 1.0)
        return u, d_t, "d_t < B': U = 2λ/(πB' + d_t)·ln(πB'/d_t + 1)"
    return soil / (0.457 * width + d_t), d_t, "d_t ≥ B': U = λ/(0.457B' + d_t)"


def ground_floor(case: Case, mesh: Mesh) -> GroundFloor:
    """The ISO 13370 floor U of the case's ``[ground]``, R_f read from the floor layers at
    the symmetry plane (on the rectilinear grid, the case's own when ``mesh`` has none)
    unless given; :class:`CaseError` when the floor does not reach it."""
    g = case.ground
    assert g is not None
    file = str(case.source)
    if mesh.grid is None:
        # the floor layers are the case's geometry: read them on the case's rectilinear grid
        from fvheat.mesh.rectilinear import build_mesh

        mesh = build_mesh(case)
    grid = mesh.grid
    assert grid is not None
    tol = 1e-9 * max(float(np.ptp(grid.x)), 1.0)
    hit = np.flatnonzero(np.abs(grid.x - g.symmetry_x) <= tol)
    column = -1 if hit.size == 0 else int(hit[0]) - (1 if g.interior > 0 else 0)
    if not 0 <= column < grid.x.size - 1:
        raise CaseError(
            f"the symmetry plane x = {g.symmetry_x:g} m is not an edge of the model",
            file=file,
            key="ground.width",
        )
    idx = grid.cell_index[:, column]
    active = idx >= 0
    cells, dy = idx[active], np.diff(grid.y)[active]
    soil_id = mesh.material_names.index(g.soil)
    is_floor = mesh.material[cells] != soil_id
    floor = cells[is_floor]
    top = cells[np.argmax(mesh.centres[cells, 1])] if cells.size else -1
    on_floor = (mesh.b_cell == top) & (mesh.b_normal[:, 1] > 0.5)
    floor_index = [b.name for b in case.boundaries].index(g.floor_boundary)
    if floor.size == 0 or not np.any(mesh.b_boundary[on_floor] == floor_index):
        raise CaseError(
            f"the floor construction and its boundary {g.floor_boundary!r} must reach the "
            f"floor's symmetry plane at x = {g.symmetry_x:g} m (0.5·B' from the floor edge)",
            file=file,
            key="ground.floor_boundary",
        )
    if g.floor_resistance is not None:
        r_f, r_from = g.floor_resistance, "given (ground.floor_resistance)"
    else:
        r_f = float(np.sum(dy[is_floor] / conductivity(case, mesh)[floor]))
        r_from = f"the model's floor layers at x = {g.symmetry_x:g} m (Σ d/λ)"
    r_si = 1.0 / case.boundary(g.floor_boundary).convection
    r_se = 1.0 / case.boundary(g.boundary).convection
    soil = case.materials[g.soil].conductivity
    u, d_t, formula = slab_on_ground_u(g.width, soil, g.thickness, r_si, r_f, r_se)
    return GroundFloor(g.width, soil, g.thickness, r_si, r_f, r_se, r_from, d_t, u, formula)
