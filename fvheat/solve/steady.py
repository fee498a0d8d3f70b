"""Steady state: M·T = b(t) + r(T, t), direct or AMG, Newton when surfaces radiate."""

from __future__ import annotations

import numpy as np

from fvheat.assembly.system import System
from fvheat.solve.linear import LinearSolver, SolverChoice, make_solver
from fvheat.solve.nonlinear import NewtonSolver


def solve_steady(
    system: System,
    t: float = 0.0,
    *,
    method: SolverChoice = "auto",
    guess: np.ndarray | None = None,
) -> np.ndarray:
    """Steady cell temperatures (°C) for the boundary values at time ``t`` (s).

    ``method`` is a method name or the case's solver settings (:mod:`fvheat.solve.linear`).
    """
    return solve_steady_kept(system, t, method=method, guess=guess)[0]


def solve_steady_kept(
    system: System,
    t: float = 0.0,
    *,
    method: SolverChoice = "auto",
    guess: np.ndarray | None = None,
) -> tuple[np.ndarray, LinearSolver | None]:
    """:func:`solve_steady`, also returning the solver of M when the system is linear (its
    factorisation, kept for adjoint solves: M is symmetric), None when it is not."""
    b = system.sources(t)
    if not system.nonlinear:
        solver = make_solver(system.matrix, method)
        return solver.solve(b), solver
    if guess is None:
        # a uniform field at the mean reference temperature of the surfaces
        guess = np.full(system.n, float(np.mean(system.surface.values(t)[0])))
    newton = NewtonSolver(system.matrix, 1.0, method=method)

    def residual(temp: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        return system.heat_in(temp, t)

    return newton.solve(residual, guess), None
