"""Surface conditions on the boundary faces: linear terms and grey-body radiation.

Each boundary face couples its cell (temperature T_c, conductance g_c = k/d per unit area
from the cell centre to the face) to the surroundings. The face temperature T_s satisfies
the surface balance (per unit area, heat into the body positive)

    g_c (T_s − T_c) = h (T_a − T_s) + ε σ (T_r⁴ − T_s⁴) + q

with h the surface coefficient (1/resistance), T_a the air temperature, ε the emissivity,
T_r the radiant temperature (kelvin in the fourth powers) and q an imposed flux. A fixed
surface temperature is the limit h → ∞. Without radiation T_s is eliminated exactly:
flux into the cell = a (T_a − T_c) + φ q with a = g_c h/(g_c + h), φ = g_c/(g_c + h).
With radiation T_s is found per face by a vectorised Newton iteration.

On a vertex-centred mesh (the box method, ``b_dist`` = 0) the unknown sits on the surface:
g_c is infinite, T_s = T_c, and the flux into the body is h (T_a − T_c) + ε σ (T_r⁴ − T_c⁴)
+ q exactly. A fixed temperature there is imposed through the conductance
:data:`PENALTY`·k/(face length): the node then sits within about 1e-4 of the cell's
temperature drop of the fixed value (1e-6 of the heat flow in
tests/validation/test_cylinder_shell.py), while the heat flow through the face stays the
one the solver balanced. (A larger factor multiplies the linear solvers' residuals into
that heat flow: 1e5 left 1.5e-8 of the energy balance open in a freezing run.)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fvheat.case.model import Boundary
from fvheat.case.signals import Constant, Signal
from fvheat.constants import STEFAN_BOLTZMANN as SIGMA
from fvheat.constants import ZERO_CELSIUS as KELVIN
from fvheat.errors import ConvergenceError
from fvheat.mesh.mesh import Mesh

_KIND = {"surface": 0, "temperature": 1, "flux": 2}
_ZERO = Constant(0.0)
#: fixed temperatures on vertex-centred meshes: conductance k/(face length) times this
PENALTY = 1e4


@dataclass(frozen=True)
class SurfaceTerms:
    """Per-face coefficients of every face that belongs to a boundary (adiabatic ones omitted).

    Arrays are indexed by "surface face" s; ``face`` maps s to the mesh's boundary-face
    index, ``cell`` to the cell, ``bid`` to the boundary. Coefficients are per unit face
    area and already scaled by the face's exchange fraction.
    """

    boundaries: tuple[Boundary, ...]
    face: np.ndarray
    cell: np.ndarray
    bid: np.ndarray
    area: np.ndarray  # m
    gc: np.ndarray  # W/(m²·K), cell centre to face
    h: np.ndarray  # W/(m²·K), surface coefficient (0 for flux/temperature faces)
    eps: np.ndarray  # emissivity × exchange fraction (0 where no radiation)
    exchange: np.ndarray  # fraction of the face area exchanging heat
    fixed: np.ndarray  # bool, fixed surface temperature
    radiative: np.ndarray  # bool
    a: np.ndarray  # W/(m²·K), linear conductance from the cell to the reference temperature
    phi: np.ndarray  # fraction of an imposed surface flux that enters the cell (linear faces)
    at_node: np.ndarray  # bool, the unknown sits on the face (vertex-centred mesh, b_dist = 0)

    @classmethod
    def build(
        cls, mesh: Mesh, boundaries: tuple[Boundary, ...], k_cell: np.ndarray
    ) -> SurfaceTerms:
        """Collect the coefficients of every boundary face; ``k_cell`` in W/(m·K)."""
        face = np.flatnonzero(mesh.b_boundary >= 0)
        bid = mesh.b_boundary[face]
        cell = mesh.b_cell[face]
        kind = np.array([_KIND[b.kind] for b in boundaries], dtype=int)[bid] if face.size else bid
        h_b = np.array([b.convection if b.kind == "surface" else 0.0 for b in boundaries])
        e_b = np.array([b.emissivity if b.kind == "surface" else 0.0 for b in boundaries])
        f = mesh.b_exchange[face]
        fixed = kind == _KIND["temperature"]
        dist = mesh.b_dist[face]
        at_node = dist <= 0.0
        nominal = k_cell[cell] / np.where(at_node, mesh.b_area[face], dist)
        gc = np.where(at_node & fixed, PENALTY * nominal, nominal)
        h = h_b[bid] * f
        radiative = e_b[bid] > 0.0
        lin = np.where(fixed, gc, np.where(at_node, h, gc * h / (gc + h)))
        return cls(
            boundaries=boundaries,
            face=face,
            cell=cell,
            bid=bid,
            area=mesh.b_area[face],
            gc=gc,
            h=h,
            eps=e_b[bid] * f,
            exchange=f,
            fixed=fixed,
            radiative=radiative,
            a=np.where(radiative, 0.0, lin),
            phi=np.where(fixed | radiative, 0.0, np.where(at_node, 1.0, gc / (gc + h))),
            at_node=at_node,
        )

    @property
    def conductance_scale(self) -> np.ndarray:
        """Per face, W/(m²·K): the conductance from the cell to the face (k/d, or k over the
        face length where the unknown sits on the face), the scale of the heat flows."""
        return np.where(self.at_node & self.fixed, self.gc / PENALTY, self.gc)

    # ---- boundary values at time t -------------------------------------------------
    def values(self, t: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Per-face reference temperature (air or fixed, °C), radiant temperature (°C) and
        imposed flux (W/m² of face, exchange fraction applied) at time ``t`` (s)."""
        ref, rad, q = [], [], []
        for b in self.boundaries:
            ref_sig: Signal = b.reference_temperature or _ZERO
            ref.append(ref_sig.at(t))
            rad.append((b.radiant_temperature or ref_sig).at(t))
            q.append((b.heat_flux or _ZERO).at(t))
        ix = self.bid
        return np.asarray(ref)[ix], np.asarray(rad)[ix], np.asarray(q)[ix] * self.exchange

    # ---- linear part ---------------------------------------------------------------
    def diagonal(self, n_cells: int) -> np.ndarray:
        """Constant diagonal (W/(m·K)) the linear faces add to the system matrix."""
        return np.bincount(self.cell, weights=self.area * self.a, minlength=n_cells)

    def rhs(self, t: float, n_cells: int) -> np.ndarray:
        """Constant part of the heat into each cell from linear faces at time ``t``, W/m."""
        ref, _, q = self.values(t)
        lin = self.area * (self.a * ref + self.phi * q)
        return np.bincount(self.cell, weights=lin, minlength=n_cells)

    # ---- full face solution -----------------------------------------------------------
    def surface_state(
        self, temp: np.ndarray, t: float
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Face temperature (°C), heat flow into the body (W/m) and its derivative with
        respect to the cell temperature (W/(m·K)) for every surface face, given cell
        temperatures ``temp`` (°C) at time ``t`` (s)."""
        ref, rad, q = self.values(t)
        tc = temp[self.cell]
        gc, h = self.gc, self.h
        lin = ~self.radiative
        ts = tc.astype(float)
        dts = np.ones_like(ts)
        # linear faces: exact elimination
        fx = self.fixed & lin
        ts[fx], dts[fx] = ref[fx], 0.0
        sf = lin & ~self.fixed
        den = gc[sf] + h[sf]
        ts[sf] = (gc[sf] * tc[sf] + h[sf] * ref[sf] + q[sf]) / den
        dts[sf] = gc[sf] / den
        if (self.radiative & ~self.at_node).any():
            r = self.radiative & ~self.at_node
            ts[r], dts[r] = _radiating_surface(
                tc[r], gc[r], h[r], self.eps[r], ref[r], rad[r], q[r]
            )
        flux = self.area * gc * (ts - tc)
        dflux = self.area * gc * (dts - 1.0)
        node = self.at_node & ~self.fixed
        if node.any():  # the surface is the node: T_s = T_c, flux from the surface balance
            tn = tc[node]
            ts[node] = tn
            rk = (tn + KELVIN) ** 3
            e = self.eps[node]
            flux[node] = self.area[node] * (
                h[node] * (ref[node] - tn)
                + e * SIGMA * ((rad[node] + KELVIN) ** 4 - rk * (tn + KELVIN))
                + q[node]
            )
            dflux[node] = -self.area[node] * (h[node] + 4.0 * e * SIGMA * rk)
        return ts, flux, dflux

    def radiative_terms(
        self, temp: np.ndarray, t: float, n_cells: int
    ) -> tuple[np.ndarray, np.ndarray]:
        """Heat into each cell from radiating faces (W/m) and its derivative d/dT_cell
        (W/(m·K), ≤ 0), accumulated per cell."""
        r = np.flatnonzero(self.radiative)
        if r.size == 0:
            return np.zeros(n_cells), np.zeros(n_cells)
        _, flux, dflux = self.surface_state(temp, t)
        cells = self.cell[r]
        return (
            np.bincount(cells, weights=flux[r], minlength=n_cells),
            np.bincount(cells, weights=dflux[r], minlength=n_cells),
        )


def _radiating_surface(
    tc: np.ndarray,
    gc: np.ndarray,
    h: np.ndarray,
    eps: np.ndarray,
    ta: np.ndarray,
    tr: np.ndarray,
    q: np.ndarray,
) -> tuple[np.ndarray, np.ndarray]:
    """Solve g_c(T_c − T_s) + h(T_a − T_s) + εσ(T_r⁴ − T_s⁴) + q = 0 for T_s (°C).

    The left side is concave and decreasing in T_s, so Newton started to the right of the
    root converges monotonically. Returns T_s and dT_s/dT_c.
    """
    trk4 = (tr + KELVIN) ** 4
    start = np.maximum(np.maximum(tc, ta), tr) + np.maximum(q, 0.0) / (gc + h)
    ts = start
    for _ in range(60):
        tk = ts + KELVIN
        f = gc * (tc - ts) + h * (ta - ts) + eps * SIGMA * (trk4 - tk**4) + q
        df = gc + h + 4.0 * eps * SIGMA * tk**3
        step = f / df
        ts = ts + step
        if np.max(np.abs(step)) <= 1e-13 * max(1.0, float(np.max(np.abs(ts)))):
            break
    else:
        raise ConvergenceError("surface radiation balance did not converge in 60 iterations")
    tk = ts + KELVIN
    return ts, gc / (gc + h + 4.0 * eps * SIGMA * tk**3)
