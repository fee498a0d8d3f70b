"""Newton iteration for F(T) = 0 when only a diagonal part of the Jacobian changes.

The systems solved here have the form R(x) = c − A·x + s·r(x), where A is a constant
sparse matrix and r(x) acts per cell (surface radiation), so the Jacobian system is
(A − s·diag(∂r/∂x))·Δx = R. What is kept across iterations (and across calls:
:class:`NewtonSolver` remembers it) depends on the linear solver:

- direct: the factorisation of the Jacobian, rebuilt only when the iteration stops
  contracting fast, i.e. a chord method that becomes full Newton when needed;
- AMG-CG: the multigrid hierarchy of the first Jacobian, used as the preconditioner of CG
  on each new Jacobian (only the radiative diagonal of surface cells changes), i.e. full
  Newton with no multigrid setup after the first.
"""

from __future__ import annotations

import logging
from collections.abc import Callable

import numpy as np
import scipy.sparse as sp

from fvheat.errors import ConvergenceError
from fvheat.solve.linear import (
    AmgSolver,
    DirectSolver,
    LinearSolver,
    SolverChoice,
    choose_method,
    solver_settings,
)

log = logging.getLogger(__name__)

Residual = Callable[[np.ndarray], tuple[np.ndarray, np.ndarray]]


class NewtonSolver:
    """Solves c − A·x + s·r(x) = 0 repeatedly (steady solve or every implicit time step).

    ``scale`` is s; ``method`` a method name or the case's solver settings; ``repeated``
    tells that A serves many solves (time steps). ``tol`` is the largest accepted
    temperature correction, K. With ``linear`` (r ≡ 0) one step is exact and no
    convergence check is made.
    """

    def __init__(
        self,
        a: sp.csr_matrix,
        scale: float = 1.0,
        *,
        method: SolverChoice = "auto",
        repeated: bool = False,
        tol: float = 1e-10,
        max_iter: int = 100,
        slow: float = 0.25,
        linear: bool = False,
    ):
        self.a = a
        self.scale = scale
        self.settings = solver_settings(method)
        self.kind = choose_method(a.shape[0], self.settings, repeated=repeated)
        self.tol = tol
        self.max_iter = max_iter
        self.slow = slow
        self.linear = linear
        self._solver: LinearSolver | None = None
        self._amg: AmgSolver | None = None
        self._dr0 = np.zeros(0)
        self.factorisations = 0  # factorisations or AMG hierarchies built
        self.iterations = 0

    def _prepare(self, dr: np.ndarray) -> None:
        """Make the solver of the Jacobian for the radiative derivative ``dr`` (W/(m·K))."""
        if self.kind == "amg":
            if self._amg is None:
                # the hierarchy of the first Jacobian (A alone can be singular when every
                # exchanging surface radiates only)
                s = self.settings
                self._dr0 = dr.copy()
                self._amg = AmgSolver(
                    self._jacobian(dr), tolerance=s.tolerance, max_iterations=s.max_iterations
                )
                self.factorisations += 1
            self._solver = self._amg.with_diagonal(-self.scale * (dr - self._dr0))
            return
        self._solver = DirectSolver(self._jacobian(dr))
        self.factorisations += 1

    def _jacobian(self, dr: np.ndarray) -> sp.csr_matrix:
        """A − s·diag(dr)."""
        return (self.a - sp.diags(self.scale * dr)).tocsr() if np.any(dr) else self.a

    def solve_linear(self, b: np.ndarray, guess: np.ndarray) -> np.ndarray:
        """Solve A·x = ``b`` (no radiative terms) with the kept factorisation or hierarchy;
        AMG-CG starts from ``guess``."""
        if self._solver is None:
            self._prepare(np.zeros(b.size))
        assert self._solver is not None
        self.iterations += 1
        if self.kind == "amg":
            return guess + self._solver.solve(b - self.a @ guess)
        return self._solver.solve(b)

    def solve(self, residual: Residual, x0: np.ndarray) -> np.ndarray:
        """Iterate from ``x0``; ``residual(x)`` returns (R(x), ∂r/∂x diagonal)."""
        x = x0.copy()
        res, dr = residual(x)
        if self._solver is None or (self.kind == "amg" and not self.linear):
            self._prepare(dr)
        prev = np.inf
        for it in range(1, self.max_iter + 1):
            assert self._solver is not None
            dx = self._solver.solve(res)
            x += dx
            self.iterations += 1
            if self.linear:  # one exact step; no need to check
                return x
            size = float(np.max(np.abs(dx)))
            if size <= self.tol:
                return x
            res, dr = residual(x)
            if self.kind == "amg":  # a new operator costs nothing: full Newton
                self._prepare(dr)
            elif size > self.slow * prev:
                log.debug("Newton iteration %d contracting slowly; refactorising", it)
                self._prepare(dr)
            prev = size
        raise ConvergenceError(
            f"non-linear iteration did not converge in {self.max_iter} iterations "
            f"(last temperature correction {size:.3g} K)"
        )
