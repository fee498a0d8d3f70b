"""Cell properties from the materials: conductivity and heat capacity."""

from __future__ import annotations

import numpy as np

from fvheat.case.model import Case
from fvheat.mesh.mesh import Mesh


def heat_capacity(case: Case, mesh: Mesh) -> np.ndarray:
    """Sensible heat capacity of each cell, J/(m·K) per metre depth: Σ ρ·c·V over the
    cell's pieces of one material (the whole cell on a cell-centred mesh)."""
    rc = np.array([case.materials[m].volumetric_heat_capacity or 0.0 for m in mesh.material_names])
    cell, material, volume = mesh.pieces()
    return np.bincount(cell, weights=rc[material] * volume, minlength=mesh.n_cells)


def conductivity(case: Case, mesh: Mesh) -> np.ndarray:
    """Conductivity of each cell, W/(m·K)."""
    k = np.array([case.materials[m].conductivity for m in mesh.material_names])
    return k[mesh.material]


def material_conductivity(case: Case, mesh: Mesh) -> np.ndarray:
    """Conductivity of each of the mesh's materials, W/(m·K)."""
    return np.array([case.materials[m].conductivity for m in mesh.material_names])
