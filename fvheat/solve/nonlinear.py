"""Newton iteration for F(T) = 0 when only a diagonal part of the Jacobian changes.

The systems solved here have the form R(x) = c − A·x + s·r(x), where A is a constant
sparse matrix and r(x) acts per cell (surface radiation), so the Jacobian system is
(A − s·diag(∂r/∂x))·Δx = R. The factorisation of that matrix is kept across iterations
(and across calls: :class:`NewtonSolver` remembers it) and rebuilt only when the
iteration stops contracting fast, i.e. a chord method that becomes full Newton when needed.
"""

from __future__ import annotations

import logging
from collections.abc import Callable

import numpy as np
import scipy.sparse as sp

from fvheat.errors import ConvergenceError
from fvheat.solve.linear import LinearSolver, Method, make_solver

log = logging.getLogger(__name__)

Residual = Callable[[np.ndarray], tuple[np.ndarray, np.ndarray]]


class NewtonSolver:
    """Solves c − A·x + s·r(x) = 0 repeatedly (steady solve or every implicit time step).

    ``tol`` is the largest accepted temperature correction, K. With ``linear`` (r ≡ 0)
    one step is exact and no convergence check is made.
    """

    def __init__(
        self,
        a: sp.csr_matrix,
        scale: float = 1.0,
        *,
        method: Method = "auto",
        repeated: bool = False,
        tol: float = 1e-10,
        max_iter: int = 100,
        slow: float = 0.25,
        linear: bool = False,
    ):
        self.a = a
        self.scale = scale
        self.method: Method = method
        self.repeated = repeated
        self.tol = tol
        self.max_iter = max_iter
        self.slow = slow
        self.linear = linear
        self._solver: LinearSolver | None = None
        self.factorisations = 0
        self.iterations = 0

    def _factorise(self, dr: np.ndarray) -> None:
        self._solver = make_solver(
            self.a - sp.diags(self.scale * dr), self.method, repeated=self.repeated
        )
        self.factorisations += 1

    def solve(self, residual: Residual, x0: np.ndarray) -> np.ndarray:
        """Iterate from ``x0``; ``residual(x)`` returns (R(x), ∂r/∂x diagonal)."""
        x = x0.copy()
        res, dr = residual(x)
        if self._solver is None:
            self._factorise(dr)
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
            if size > self.slow * prev:
                log.debug("Newton iteration %d contracting slowly; refactorising", it)
                self._factorise(dr)
            prev = size
        raise ConvergenceError(
            f"non-linear iteration did not converge in {self.max_iter} iterations "
            f"(last temperature correction {size:.3g} K)"
        )
