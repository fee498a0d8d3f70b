"""Time stepping with latent heat: enthalpy as the conserved variable.

Each step solves  (H(T¹) − H(T⁰))/Δt = θ F(T¹, t¹) + (1 − θ) F(T⁰, t⁰)  per cell, with
H the cell enthalpy of :class:`~fvheat.assembly.enthalpy.EnthalpyModel`. The iteration is
the apparent-capacity linearisation with enthalpy correction: with C_k = dH/dT at T_k,

    (C_k/Δt + θ M_k) T* = H⁰/Δt − (H_k − C_k T_k)/Δt + θ b(t¹) + (1 − θ) F⁰ (+ radiation)
    H_{k+1} = H_k + C_k (T* − T_k),   T_{k+1} = T(H_{k+1})

which conserves energy at every iterate and cannot stall at the front: a cell whose
linearised update overshoots the phase-change range is put back on the enthalpy curve.
M_k uses the conductivities at T_k (frozen/unfrozen). As the matrix changes only near the
front, the last factorisation preconditions conjugate gradients on the current matrix and
is renewed only when CG needs more than a few iterations. A step that does not converge is
split in halves (down to 1/64); with a tolerance, steps are also split where step doubling
shows a larger error. Results still come at the requested times.
"""

from __future__ import annotations

import logging
from collections.abc import Iterator

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from fvheat.assembly.enthalpy import EnthalpyModel
from fvheat.assembly.system import System
from fvheat.errors import ConvergenceError
from fvheat.solve.linear import LinearSolver, SolverChoice, make_solver
from fvheat.solve.transient import START, Step

log = logging.getLogger(__name__)

MAX_SPLITS = 6
#: preconditioned CG on a changed matrix: relative residual and iterations before refactorising
PCG_RTOL = 1e-13
PCG_MAX_ITER = 12


class EnthalpyStepper:
    """Advances (T, H) by one step; keeps the last factorisation and conductivities."""

    def __init__(
        self,
        system: System,
        model: EnthalpyModel,
        theta: float,
        *,
        method: SolverChoice = "auto",
        tol: float = 1e-10,
        max_iter: int = 200,
    ):
        self.base = system
        self.system = system
        self.model = model
        self.theta = theta
        self.method: SolverChoice = method
        self.tol = tol
        self.max_iter = max_iter
        self._solver: LinearSolver | None = None
        self.factorisations = 0

    def _system_at(self, temp: np.ndarray) -> System:
        if self.model.variable_conductivity:
            k = self.model.conductivity(temp)
            if not np.array_equal(k, self.system.k):
                self.system = self.base.with_conductivity(k)
        return self.system

    def _solve(
        self, cap: np.ndarray, dr: np.ndarray, dt: float, b: np.ndarray, x0: np.ndarray
    ) -> np.ndarray:
        """Solve (C/Δt − θ·diag(dr) + θM)·x = b.

        The matrix changes only in the few cells at the front, so the last factorisation is
        kept as a preconditioner for conjugate gradients; it is refactorised when CG needs
        more than ``PCG_MAX_ITER`` iterations (or on the first call).
        """
        a = (sp.diags(cap / dt - self.theta * dr) + self.theta * self.system.matrix).tocsr()
        if self._solver is not None:
            lu = self._solver
            m = spla.LinearOperator(a.shape, matvec=lu.solve, dtype=float)
            x, info = spla.cg(a, b, x0=x0, rtol=PCG_RTOL, atol=0.0, maxiter=PCG_MAX_ITER, M=m)
            if info == 0:
                return x
        self._solver = make_solver(a, self.method, repeated=True)
        self.factorisations += 1
        return self._solver.solve(b)

    def advance(
        self, temp: np.ndarray, h: np.ndarray, t: float, dt: float
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """One step of ``dt`` s from time ``t``: new T (°C), H (J/m) and the heat that entered
        through each boundary (J/m). Raises :class:`ConvergenceError` if it does not converge."""
        th = self.theta
        sys0 = self._system_at(temp)
        f_old, _ = sys0.heat_in(temp, t)
        q_old = sys0.boundary_flows(temp, t)
        t1 = t + dt
        const = h / dt + (1.0 - th) * f_old
        tk, hk = temp.copy(), h.copy()
        for _ in range(self.max_iter):
            sysk = self._system_at(tk)
            cap = self.model.capacity(tk)
            r, dr = sysk.surface.radiative_terms(tk, t1, sysk.n)
            b = const - (hk - cap * tk) / dt + th * (sysk.sources(t1) + r - dr * tk)
            t_star = self._solve(cap, dr, dt, b, tk)
            h_new = hk + cap * (t_star - tk)
            t_new = self.model.temperature(h_new)
            change = float(np.max(np.abs(t_new - tk)))
            tk, hk = t_new, h_new
            if change <= self.tol:
                sys1 = self._system_at(tk)
                q_new = sys1.boundary_flows(tk, t1)
                return tk, hk, dt * (th * q_new + (1.0 - th) * q_old)
        raise ConvergenceError(
            f"latent-heat iteration did not converge in {self.max_iter} iterations at t = {t1:g} s"
        )

    def advance_split(
        self,
        temp: np.ndarray,
        h: np.ndarray,
        t: float,
        dt: float,
        depth: int = 0,
        tolerance: float | None = None,
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """:meth:`advance`, halving the step where it fails to converge.

        With ``tolerance`` (K) the step is also checked by step doubling: one step of ``dt``
        against two of ``dt/2``; where they differ by more than ``tolerance`` anywhere each
        half is taken the same way, else the two half steps are kept. Steps are split down
        to 1/2**MAX_SPLITS of ``dt``.
        """
        try:
            full = self.advance(temp, h, t, dt)
        except ConvergenceError:
            if depth >= MAX_SPLITS:
                raise
            log.info("t = %g s: a %g s step did not converge; splitting it", t, dt)
            return self._halves(temp, h, t, dt, depth, tolerance)
        if tolerance is None or depth >= MAX_SPLITS:
            return full
        try:
            halves = self._halves(temp, h, t, dt, MAX_SPLITS, None)
            if float(np.max(np.abs(halves[0] - full[0]))) <= tolerance:
                return halves
        except ConvergenceError:
            pass
        log.info(
            "t = %g s: step-doubling error above %g K; splitting a %g s step", t, tolerance, dt
        )
        return self._halves(temp, h, t, dt, depth, tolerance)

    def _halves(
        self,
        temp: np.ndarray,
        h: np.ndarray,
        t: float,
        dt: float,
        depth: int,
        tolerance: float | None,
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Two half steps, each taken by :meth:`advance_split` one level deeper."""
        t_a, h_a, e_a = self.advance_split(temp, h, t, dt / 2, depth + 1, tolerance)
        t_b, h_b, e_b = self.advance_split(t_a, h_a, t + dt / 2, dt / 2, depth + 1, tolerance)
        return t_b, h_b, e_a + e_b


def evolve_enthalpy(
    system: System,
    model: EnthalpyModel,
    temp0: np.ndarray,
    step: float,
    n_steps: int,
    *,
    theta: float = 1.0,
    t0: float = 0.0,
    method: SolverChoice = "auto",
    tolerance: float | None = None,
    damped_start: bool = True,
) -> Iterator[Step]:
    """Yield (t, T, boundary heat J/m) after each of ``n_steps`` steps of ``step`` s; with
    ``tolerance`` (K) each step is subdivided adaptively (step doubling), the output still
    coming at the requested times. With θ < 1 and ``damped_start`` the first step is taken
    as ``START`` backward-Euler steps, as in :func:`fvheat.solve.transient.evolve`."""
    temp = temp0.astype(float).copy()
    h = model.enthalpy(temp)
    first = 1
    if theta < 1.0 and damped_start and n_steps > 0:
        damped = EnthalpyStepper(system, model, 1.0, method=method)
        energy = np.zeros(len(system.surface.boundaries))
        for i in range(START):
            t = t0 + i * step / START
            temp, h, part = damped.advance_split(temp, h, t, step / START, tolerance=tolerance)
            energy = energy + part
        yield t0 + step, temp, energy
        first = 2
    stepper = EnthalpyStepper(system, model, theta, method=method)
    for k in range(first, n_steps + 1):
        t = t0 + (k - 1) * step
        temp, h, energy = stepper.advance_split(temp, h, t, step, tolerance=tolerance)
        yield t0 + k * step, temp, energy


def solve_steady_phase(
    system: System,
    model: EnthalpyModel,
    t: float,
    temp: np.ndarray,
    *,
    method: SolverChoice = "auto",
    tol: float = 1e-10,
    max_iter: int = 200,
) -> np.ndarray:
    """Steady field when conductivity depends on the phase: fixed-point on k(T) from ``temp``."""
    from fvheat.solve.steady import solve_steady

    for _ in range(max_iter):
        new = solve_steady(
            system.with_conductivity(model.conductivity(temp)), t, method=method, guess=temp
        )
        if float(np.max(np.abs(new - temp))) <= tol:
            return new
        temp = new
    raise ConvergenceError(
        f"steady phase-dependent conductivity did not converge in {max_iter} iterations"
    )
