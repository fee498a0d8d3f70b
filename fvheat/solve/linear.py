"""Linear solvers for the symmetric positive-definite systems of conduction problems.

Direct: SuperLU with the minimum-degree ordering on Aᵀ+A and symmetric mode (2–2.5× faster
than the default column ordering on these matrices). Iterative: conjugate gradients with a
Ruge–Stüben algebraic multigrid preconditioner (pyamg) for large grids.
"""

from __future__ import annotations

from typing import Literal, Protocol

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from fvheat.errors import ConvergenceError

Method = Literal["auto", "direct", "amg"]

#: above this many unknowns "auto" picks AMG-CG for a single solve
AMG_THRESHOLD = 200_000


class LinearSolver(Protocol):
    def solve(self, b: np.ndarray) -> np.ndarray: ...


class DirectSolver:
    """Sparse LU factorisation, computed once and reused for every right-hand side."""

    def __init__(self, a: sp.spmatrix):
        self._lu = spla.splu(
            sp.csc_matrix(a), permc_spec="MMD_AT_PLUS_A", options={"SymmetricMode": True}
        )

    def solve(self, b: np.ndarray) -> np.ndarray:
        return self._lu.solve(b)


class AmgSolver:
    """CG preconditioned by a Ruge–Stüben AMG hierarchy built once for ``a``."""

    def __init__(self, a: sp.spmatrix, rtol: float = 1e-12, maxiter: int = 500):
        import pyamg

        self._a = sp.csr_matrix(a)
        self._ml = pyamg.ruge_stuben_solver(self._a)
        self._m = self._ml.aspreconditioner(cycle="V")
        self.rtol = rtol
        self.maxiter = maxiter

    def solve(self, b: np.ndarray, x0: np.ndarray | None = None) -> np.ndarray:
        x, info = spla.cg(self._a, b, x0=x0, rtol=self.rtol, maxiter=self.maxiter, M=self._m)
        if info != 0:
            raise ConvergenceError(
                f"AMG-CG did not reach rtol={self.rtol} in {self.maxiter} iterations"
            )
        return x


def make_solver(a: sp.spmatrix, method: Method = "auto", *, repeated: bool = False) -> LinearSolver:
    """A solver for matrix ``a``: direct unless large (or ``method`` says otherwise).

    ``repeated`` tells that many right-hand sides will follow (time stepping), which
    favours a factorisation up to a larger size.
    """
    if method == "auto":
        limit = AMG_THRESHOLD * (5 if repeated else 1)
        method = "amg" if a.shape[0] > limit else "direct"
    return AmgSolver(a) if method == "amg" else DirectSolver(a)
