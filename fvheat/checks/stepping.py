"""Time steps Crank–Nicolson cannot carry through a sudden change.

Crank–Nicolson multiplies a mode of decay rate λ (1/s) by r = (1 − λΔt/2)/(1 + λΔt/2) per
step: for λΔt ≫ 1, r → −1, so the fastest modes, those of the smallest cells next to a
surface, are hardly damped and change sign every step (the scheme is A-stable but not
L-stable; any numerical-analysis text on θ-schemes). A run that starts from a given
temperature out of balance with its boundary conditions excites exactly those modes: the
cell temperatures next to a surface and the surface heat flows then oscillate for many
steps (on a concrete block heated by a 20 K step, 0.5 mm cells, 600 s steps: 2 862 W/m at
6 h where the exact value is 8.4 W/m), while the energy balance still closes. Backward
Euler damps them (r → 0).

The largest rate is at least max_i M_ii/C_i (the Rayleigh quotient of the i-th unit
vector in C^{-1}M, M the conduction matrix, C the cell capacities), which is what is
computed here from the interior face conductances alone (a lower bound still).
"""

from __future__ import annotations

import numpy as np

from fvheat.assembly.conduction import face_conductance
from fvheat.assembly.properties import conductivity, heat_capacity, material_conductivity
from fvheat.case.model import Case
from fvheat.mesh.mesh import Mesh

#: λΔt above which a Crank–Nicolson start out of balance is warned about (|r| ≥ 0.82:
#: after ten steps still 14 % of the jump's fastest part, alternating in sign)
STIFF = 20.0


def fastest_rate(case: Case, mesh: Mesh) -> float:
    """A lower bound (1/s) of the largest decay rate of the semi-discrete conduction
    problem: max over cells of Σ G (interior faces, W/(m·K)) / C (J/(m·K))."""
    g = face_conductance(mesh, conductivity(case, mesh), material_conductivity(case, mesh))
    n = mesh.n_cells
    diag = np.bincount(mesh.owner, weights=g, minlength=n)
    diag += np.bincount(mesh.neighbour, weights=g, minlength=n)
    cap = heat_capacity(case, mesh)
    rate = np.divide(diag, cap, out=np.zeros(n), where=cap > 0)
    return float(rate.max()) if n else 0.0


def stepping_warnings(case: Case, mesh: Mesh) -> list[str]:
    """A warning when a Crank–Nicolson run starts out of balance with steps far longer than
    its finest cells' response time."""
    t = case.time
    if t is None or t.scheme != "crank_nicolson" or t.initial_temperature == "steady":
        return []
    z = fastest_rate(case, mesh) * t.step
    if z < STIFF:
        return []
    r = (1.0 - z / 2.0) / (1.0 + z / 2.0)
    short = 2.0 * t.step / z  # λΔt = 2: r = 0, the fastest mode gone in one step
    return [
        f"time.scheme = 'crank_nicolson' with steps of {t.step:g} s keeps "
        f"{100 * abs(r):.3g} % of the fastest modes of the finest cells per step, alternating "
        "in sign: the jump "
        "from time.initial_temperature to the boundary conditions makes the temperatures "
        "next to a surface and the surface heat flows oscillate for many steps (heat flows "
        "can be off by orders of magnitude; the energy balance still closes); use "
        f"'backward_euler', initial_temperature = 'steady', or steps of at most {short:.3g} s"
    ]
