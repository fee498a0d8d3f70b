"""Discrete adjoint of the steady heat balance the solver solved.

The steady state is R(T, p) = −K(p)·T + Bᵀ·Φ(T, p) = 0: K the conduction matrix of the
interior faces (harmonic-mean conductances G), Φ the heat flow into the body through every
surface face (linear elimination of the face temperature, or its grey-body Newton balance),
B the face-to-cell incidence. Its Jacobian is −A with A = M − diag(∂r/∂T), the matrix the
linear solve factorised (plus, with radiating surfaces, the Newton diagonal at the solution);
A is symmetric. A quantity Q = Σ_f (w_f·Φ_f + v_f·T_s,f) that is linear in the face heat
flows and face temperatures has

    dQ/dp = ∂Q/∂p + aᵀ·∂R/∂p,   A·a = ∂Q/∂T

(one back-substitution per quantity on the factorisation in hand; the adjoint method, e.g.
Giles & Pierce, "An introduction to the adjoint approach to design", 2000, from memory).
The parameters p are the cell conductivities of each material and the surface coefficient h
of each boundary: ∂G/∂k_o = G²·d_o/(A_f·k_o²), ∂g_c/∂k = 1/d, ∂h_f/∂h_b = exchange fraction,
and per surface face, with D = g_c + h + 4εσT_s³ (the derivative of the face balance),
∂T_s/∂g_c = (T_c − T_s)/D, ∂T_s/∂h = (T_a − T_s)/D, Φ = A·g_c·(T_s − T_c).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from fvheat.assembly.boundary import PENALTY
from fvheat.assembly.system import System
from fvheat.constants import STEFAN_BOLTZMANN as SIGMA
from fvheat.constants import ZERO_CELSIUS as KELVIN
from fvheat.solve.linear import DirectSolver, LinearSolver, SolverChoice, make_solver


@dataclass(frozen=True)
class FacePartials:
    """Per surface face of ``system.surface``: face temperature (°C), heat flow (W/m) and
    their derivatives with respect to the cell temperature, g_c and h."""

    ts: np.ndarray
    flux: np.ndarray
    dflux_dtc: np.ndarray
    dts_dtc: np.ndarray
    dflux_dgc: np.ndarray
    dflux_dh: np.ndarray
    dts_dgc: np.ndarray
    dts_dh: np.ndarray


def face_partials(system: System, temp: np.ndarray, t: float = 0.0) -> FacePartials:
    """Face values and their partial derivatives at cell temperatures ``temp`` (°C)."""
    s = system.surface
    ts, flux, dflux = s.surface_state(temp, t)
    ref, _, _ = s.values(t)
    tc = temp[s.cell]
    gc, h, area = s.gc, s.h, s.area
    d = gc + h + 4.0 * s.eps * SIGMA * (ts + KELVIN) ** 3
    fixed = s.fixed
    safe = np.where(fixed, 1.0, d)
    dts_dgc = np.where(fixed, 0.0, (tc - ts) / safe)
    dts_dh = np.where(fixed, 0.0, (ref - ts) / safe)
    dts_dtc = dflux / (area * gc) + 1.0
    dflux_dgc = area * ((ts - tc) + gc * dts_dgc)
    dflux_dh = area * gc * dts_dh
    # the unknown on the surface (box method): T_s = T_c, Φ = A·(h (T_a − T_c) + radiation + q)
    # with no cell-to-face conductance in it (a fixed node keeps its penalty form above)
    node = s.at_node & ~fixed
    if node.any():
        dts_dtc[node], dts_dgc[node], dts_dh[node] = 1.0, 0.0, 0.0
        dflux_dgc[node] = 0.0
        dflux_dh[node] = area[node] * (ref[node] - tc[node])
    return FacePartials(
        ts=ts,
        flux=flux,
        dflux_dtc=dflux,
        dts_dtc=dts_dtc,
        dflux_dgc=dflux_dgc,
        dflux_dh=dflux_dh,
        dts_dgc=dts_dgc,
        dts_dh=dts_dh,
    )


def adjoint_operator(system: System, temp: np.ndarray, t: float = 0.0) -> sp.csr_matrix:
    """A = M − diag(∂r/∂T) at ``temp``: minus the Jacobian of the steady balance, W/(m·K)."""
    if not system.nonlinear:
        return system.matrix
    _, dr = system.heat_in(temp, t)
    return (system.matrix - sp.diags(dr)).tocsr()


def solve_adjoint(
    system: System,
    temp: np.ndarray,
    rhs: np.ndarray,
    factor: LinearSolver | None,
    method: SolverChoice = "auto",
) -> np.ndarray:
    """Solve A·a = ``rhs`` (cells × quantities), on ``factor`` when it factorises A (a linear
    system's own solve), else on a new solver of A at ``temp`` (radiating surfaces)."""
    if factor is None or system.nonlinear:
        factor = make_solver(adjoint_operator(system, temp), method)
    if rhs.shape[1] == 0:
        return rhs.copy()
    if isinstance(factor, DirectSolver):  # SuperLU back-substitutes all columns at once
        return np.asarray(factor.solve(rhs)).reshape(rhs.shape)
    return np.column_stack([factor.solve(rhs[:, j]) for j in range(rhs.shape[1])])


def derivatives(
    system: System,
    temp: np.ndarray,
    weights_flux: np.ndarray,
    weights_ts: np.ndarray,
    material_param: np.ndarray,
    boundary_param: np.ndarray,
    n_params: int,
    factor: LinearSolver | None = None,
    method: SolverChoice = "auto",
) -> tuple[np.ndarray, np.ndarray]:
    """Values (q,) and total derivatives (q, n_params) of the quantities
    Q_j = Σ_f weights_flux[f, j]·Φ_f + weights_ts[f, j]·T_s,f (f: surface faces).

    ``material_param[m]``: parameter index of the conductivity of mesh material m (−1: none);
    ``boundary_param[b]``: parameter index of boundary b's surface coefficient h (−1: none).
    Derivatives are with respect to conductivity (W/(m·K)) and h (W/(m²·K)).
    """
    s = system.surface
    mesh = system.mesh
    n = system.n
    _check_conductance_forms(system)
    fp = face_partials(system, temp)
    q = weights_flux.shape[1]
    values = weights_flux.T @ fp.flux + weights_ts.T @ fp.ts
    # ∂Q/∂T per cell and the adjoint solve
    per_face = weights_flux * fp.dflux_dtc[:, None] + weights_ts * fp.dts_dtc[:, None]
    b = sp.csr_matrix(
        (np.ones(s.cell.size), (s.cell, np.arange(s.cell.size))), shape=(n, s.cell.size)
    )
    rhs = np.asarray(b @ per_face)
    adj = solve_adjoint(system, temp, rhs, factor, method)
    out = np.zeros((q, n_params))
    # surface faces: explicit part + adjoint × heat into the cell
    a_face = adj[s.cell]
    d_gc = weights_flux * fp.dflux_dgc[:, None] + weights_ts * fp.dts_dgc[:, None]
    d_gc += a_face * fp.dflux_dgc[:, None]
    d_h = weights_flux * fp.dflux_dh[:, None] + weights_ts * fp.dts_dh[:, None]
    d_h += a_face * fp.dflux_dh[:, None]
    k = system.k
    pm = material_param[mesh.material]  # parameter of each cell
    face_p = pm[s.cell]
    _scatter(out, face_p, d_gc * (s.gc / k[s.cell])[:, None])  # ∂g_c/∂k = 1/d = g_c/k
    bp = boundary_param[s.bid] if len(boundary_param) else np.zeros(0, dtype=int)
    _scatter(out, bp, d_h * s.exchange[:, None])
    # interior faces: −Σ ∂G/∂p (a_o − a_n)(T_o − T_n)
    o, nb = mesh.owner, mesh.neighbour
    g = system.g
    drop = -(adj[o] - adj[nb]) * (temp[o] - temp[nb])[:, None]
    if mesh.face_weight is not None:  # box method: G = w·k[face material], ∂G/∂k = w
        assert mesh.face_material is not None
        _scatter(out, material_param[mesh.face_material], drop * mesh.face_weight[:, None])
        return values, out
    core = drop * (g * g / mesh.face_area)[:, None]
    _scatter(out, pm[o], core * (mesh.d_owner / k[o] ** 2)[:, None])
    _scatter(out, pm[nb], core * (mesh.d_neighbour / k[nb] ** 2)[:, None])
    return values, out


def _check_conductance_forms(system: System) -> None:
    """The derivatives above assume G = A/(d_o/k_o + d_n/k_n) and g_c = k/d, the forms
    :mod:`fvheat.assembly` uses; fail loudly rather than differentiate another form."""
    mesh, k, s = system.mesh, system.k, system.surface
    if mesh.face_weight is not None:  # box method: G = w·k[face material]
        assert mesh.face_material is not None and system.k_material is not None
        g = mesh.face_weight * system.k_material[mesh.face_material]
        # g_c: k over the face length at surface nodes (times the penalty where fixed)
        length = np.where(s.at_node, mesh.b_area[s.face], mesh.b_dist[s.face])
        gc = k[s.cell] / length * np.where(s.at_node & s.fixed, PENALTY, 1.0)
    else:
        g = mesh.face_area / (mesh.d_owner / k[mesh.owner] + mesh.d_neighbour / k[mesh.neighbour])
        gc = k[s.cell] / mesh.b_dist[s.face]
    if not (np.allclose(system.g, g, rtol=1e-12, atol=0) and np.allclose(s.gc, gc, rtol=1e-12)):
        raise NotImplementedError(
            "the adjoint assumes harmonic-mean face conductances and g_c = k/d; the assembly "
            "uses another form (update fvheat/sensitivity/adjoint.py)"
        )


def _scatter(out: np.ndarray, index: np.ndarray, contrib: np.ndarray) -> None:
    """out[:, p] += Σ over rows r with index[r] = p ≥ 0 of contrib[r, :]."""
    keep = index >= 0
    if not keep.any():
        return
    idx = index[keep]
    c = contrib[keep]
    for j in range(out.shape[0]):  # one pass per quantity, vectorised over faces
        out[j] += np.bincount(idx, weights=c[:, j], minlength=out.shape[1])
