"""Linear solvers for the symmetric positive-definite systems of conduction problems.

Direct: SuperLU with the minimum-degree ordering on Aᵀ+A and symmetric mode (2–2.5× faster
than the default column ordering on these matrices), factorised once and reused for every
right-hand side. Iterative: conjugate gradients preconditioned by one V-cycle of a
Ruge–Stüben algebraic multigrid hierarchy (pyamg), whose cost and memory grow nearly
linearly with the cell count (a factorisation's grow faster). ``"auto"`` picks AMG-CG for
large steady grids and the factorisation otherwise (limits in
:class:`~fvheat.case.model.SolverSettings`, the case's ``[solver]`` table).

Ruge–Stüben on both meshes, with the second pass of the splitting and direct
interpolation (:func:`coarsening`): on the triangle mesh's P1 matrix (200 000 nodes, 7
entries a row, lattice-seeded: see mesh/lattice.py) it needs 10 CG iterations to 1e-10
(with θ = 0.35), 18 with pyamg's defaults; the grid's 5-point matrix 12 (15 with
classical interpolation; the smoothers of :data:`PRESMOOTHER` in both). Before the
lattice, the irregular refinement-only mesh needed 33 (27 with pyamg's default smoothers).
Smoothed aggregation (``pyamg.smoothed_aggregation_solver``, symmetric Gauss–Seidel) was
measured on the irregular mesh's matrix: 22 iterations with the default strength (θ = 0), 12–13 with
θ = 0.05–0.08, but its set-up is slower, so set-up plus solve was only 0–10 % faster, and
θ = 0.2 took 200 iterations (on the grid's matrix too): too fragile to choose by mesh kind.
On the lattice-seeded matrix it needs 14–15 iterations (θ = 0.05–0.08, candidates not
improved) but 0.45–0.7 s of set-up: slower than Ruge–Stüben with the second pass.

Every AMG-CG solve ends with a Galerkin correction along the constant vector: for a
symmetric positive-definite A this never increases the error in the energy norm, and it
makes the residual sum to zero, so the energy balance of the solution (which equals that
sum) closes to round-off whatever the CG tolerance.
"""

from __future__ import annotations

import copy
import logging
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import replace
from typing import TYPE_CHECKING, Any, Literal, Protocol

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from fvheat.case.model import SolverMethod, SolverSettings
from fvheat.errors import ConvergenceError

if TYPE_CHECKING:
    from pyamg.multilevel import MultilevelSolver

log = logging.getLogger(__name__)

Method = SolverMethod
#: a method name, or the case's complete solver settings
SolverChoice = SolverMethod | SolverSettings
Kind = Literal["direct", "amg"]


def solver_settings(choice: SolverChoice) -> SolverSettings:
    """``choice`` as settings: a bare method name takes the defaults for everything else."""
    if isinstance(choice, SolverSettings):
        return choice
    return replace(SolverSettings(), method=choice)


def choose_method(n: int, choice: SolverChoice = "auto", *, repeated: bool = False) -> Kind:
    """The solver ``"auto"`` means for ``n`` unknowns.

    A single solve (``repeated`` False: steady, Newton iterations) uses AMG-CG above
    ``amg_above`` cells; a matrix reused for many right-hand sides (``repeated``: time
    steps of a fixed size) is factorised up to ``transient_amg_above`` cells, since each
    back-substitution costs far less than an AMG-CG solve.
    """
    s = solver_settings(choice)
    if s.method != "auto":
        return s.method
    limit = s.transient_amg_above if repeated else s.amg_above
    return "amg" if n > limit else "direct"


class LinearSolver(Protocol):
    """Solves A·x = b for a fixed matrix A."""

    def solve(self, b: np.ndarray) -> np.ndarray:
        """x for the right-hand side ``b`` (units of the system)."""
        ...


_controller = None


@contextmanager
def single_thread() -> Iterator[None]:
    """Limit BLAS to one thread: with two OpenBLAS threads pyamg's setup time was measured
    erratic on a 2-core machine (up to 30× slower), and the CG vector operations gain nothing."""
    global _controller
    if _controller is None:
        from threadpoolctl import ThreadpoolController

        _controller = ThreadpoolController()
    with _controller.limit(limits=1, user_api="blas"):
        yield


class DirectSolver:
    """Sparse LU factorisation, computed once and reused for every right-hand side."""

    kind: Kind = "direct"

    def __init__(self, a: sp.csr_matrix):
        try:
            self._lu = spla.splu(
                sp.csc_matrix(a), permc_spec="MMD_AT_PLUS_A", options={"SymmetricMode": True}
            )
        except RuntimeError as err:  # SuperLU: "Factor is exactly singular"
            raise ConvergenceError(
                f"the system matrix cannot be factorised ({err}): a part of the model has no "
                "temperature reference, or conductivities differ by too many orders of magnitude"
            ) from None

    def solve(self, b: np.ndarray) -> np.ndarray:
        """x for the right-hand side ``b`` from the factorisation."""
        return self._lu.solve(b)


#: one forward Gauss–Seidel sweep before the coarse correction and one backward after it:
#: the V-cycle stays a symmetric preconditioner (as CG needs) at half the smoothing work of
#: pyamg's default (a symmetric sweep on each side). Measured at 200 000 unknowns (set-up
#: plus solve to 1e-10): triangle mesh 1.11 → 0.93 s (27 → 31 iterations), grid
#: 0.42 → 0.40 s (11 → 13 iterations).
PRESMOOTHER = ("gauss_seidel", {"sweep": "forward"})
POSTSMOOTHER = ("gauss_seidel", {"sweep": "backward"})


#: matrices with more than this many entries a row on average (the box method's P1
#: matrices, about 7; the grid's have 5) take :data:`BOX_THETA` (see :func:`coarsening`)
DENSE_ROWS = 5.5
#: strength-of-connection threshold of those matrices (see :func:`coarsening`)
BOX_THETA = 0.35


def coarsening(a: sp.csr_matrix) -> dict[str, Any]:
    """pyamg's C/F splitting and interpolation for ``a`` (keyword arguments of
    ``ruge_stuben_solver``): the splitting's second pass (every pair of strongly connected
    fine points shares a coarse point) and direct interpolation, which the denser coarse
    grid makes enough and which is cheaper to build than the classical one.

    On the box method's P1 matrices, measured at 200 000 nodes, set-up + solve (CG
    iterations), alternating runs on a machine shared with other work: lattice-seeded mesh
    0.45 s (18) → 0.33 s (11); refinement-only mesh 0.87 s (33) → 0.77 s (15); a graded
    sloped section at 100 000 nodes 0.24 → 0.17 s. On the grid's 5-point matrices (CPU s,
    best of two, classical → second pass + direct; CG iterations): benchmark section
    90 000 cells 0.19 (14) → 0.16 (11), 250 000 cells 0.61 (15) → 0.52 (12), 1 M cells
    (wall) 3.07 (16) → 2.72 (13); the demo junctions on finer grids, graded, with metal
    and insulation side by side: balcony 31 800 cells 0.09–0.10 (24–26) → 0.07 (12),
    frost slab edge 39 800 cells 0.11 (21) → 0.09 (13), window jamb 42 300 cells 0.13 (25)
    → 0.10 (14), window frame 40 200 cells 0.15 (29) → 0.13 (17), ground floor 104 000
    cells 0.33 (25) → 0.27 (15). The hierarchy's operator complexity grows on graded grids
    (2.3–2.5 → 2.8–3.0: about a fifth more of its memory), not on uniform ones (2.2).

    Matrices of more than :data:`DENSE_ROWS` entries a row also take the strength threshold
    :data:`BOX_THETA` (pyamg's default 0.25, which the grid's keep: 0.35 was no faster there).
    Set-up + solve (CPU s, medians of 5–7, CG iterations) at θ = 0.25 → 0.35: benchmark
    section 200 000 nodes 0.52 (11) → 0.46 (10); eaves demo 90 000 nodes 0.24 (12) → 0.22
    (11); window frame demo 99 000 nodes 0.39 (20) → 0.33 (16); balcony demo 144 000 nodes
    0.39 (12) both; a sloped section 0.24 (11) both; a refinement-only mesh (no lattice)
    1.03 (15) → 1.06 (15). θ = 0.5 and 0.6 were slower on all but the benchmark section."""
    options: dict[str, Any] = {"CF": ("RS", {"second_pass": True}), "interpolation": "direct"}
    if a.nnz > DENSE_ROWS * max(a.shape[0], 1):
        options["strength"] = ("classical", {"theta": BOX_THETA})
    return options


class AmgSolver:
    """CG preconditioned by a Ruge–Stüben AMG hierarchy built once for ``a``.

    ``tolerance`` is the relative residual ‖b − A·x‖/‖b‖ at which CG stops and
    ``max_iterations`` its iteration limit per solve. :meth:`with_diagonal` gives a solver
    for A + diag(d) that keeps this hierarchy as its preconditioner (Newton iterations on
    radiating surfaces change only such a diagonal).
    """

    kind: Kind = "amg"

    def __init__(self, a: sp.csr_matrix, *, tolerance: float = 1e-10, max_iterations: int = 200):
        import pyamg

        self.a = sp.csr_matrix(a)
        self.tolerance = tolerance
        self.max_iterations = max_iterations
        self.iterations = 0  # CG iterations over all solves
        with single_thread():
            self._ml = pyamg.ruge_stuben_solver(
                self.a,
                **coarsening(self.a),
                presmoother=PRESMOOTHER,
                postsmoother=POSTSMOOTHER,
            )
        log.debug("AMG hierarchy: %d levels", len(self._ml.levels))
        self._precond = v_cycle(self._ml)
        self._op: sp.csr_matrix | spla.LinearOperator = self.a
        self._total = float(self.a.sum())  # 1ᵀ·A·1, for the constant-vector correction

    def with_diagonal(self, d: np.ndarray) -> AmgSolver:
        """A solver for A + diag(``d``) preconditioned by this solver's hierarchy."""
        if not np.any(d):
            return self
        a = self.a
        s = copy.copy(self)
        s._op = spla.LinearOperator(a.shape, matvec=lambda x: a @ x + d * x, dtype=float)
        s._total = self._total + float(np.sum(d))
        return s

    def solve(self, b: np.ndarray, x0: np.ndarray | None = None) -> np.ndarray:
        """x for the right-hand side ``b`` by AMG-preconditioned CG from ``x0``."""
        count = 0

        def counter(_: np.ndarray) -> None:
            nonlocal count
            count += 1

        with single_thread():
            x, info = spla.cg(
                self._op,
                b,
                x0=x0,
                rtol=self.tolerance,
                atol=0.0,
                maxiter=self.max_iterations,
                M=self._precond,
                callback=counter,
            )
        self.iterations += count
        if info != 0:
            raise ConvergenceError(
                f"AMG-CG did not reach the relative residual {self.tolerance:g} in "
                f"{self.max_iterations} iterations (raise [solver] max_iterations or use "
                'method = "direct")'
            )
        if self._total > 0.0:
            x += float(np.sum(b - self._op @ x)) / self._total
        log.debug("AMG-CG: %d iterations", count)
        return x


def v_cycle(ml: MultilevelSolver) -> spla.LinearOperator:
    """One V-cycle of the pyamg hierarchy ``ml`` from a zero guess, as a preconditioner.

    The same cycle as ``ml.aspreconditioner("V")`` without the two residual norms on the
    finest level that pyamg's ``solve`` computes around every cycle for its stopping test.
    """
    levels = ml.levels

    def cycle(k: int, b: np.ndarray) -> np.ndarray:
        if k == len(levels) - 1:
            return np.asarray(ml.coarse_solver(levels[k].A, b)).reshape(b.shape)
        lev = levels[k]
        x = np.zeros_like(b)
        lev.presmoother(lev.A, x, b)
        x += lev.P @ cycle(k + 1, lev.R @ (b - lev.A @ x))
        lev.postsmoother(lev.A, x, b)
        return x

    a = levels[0].A
    return spla.LinearOperator(a.shape, matvec=lambda b: cycle(0, np.ravel(b)), dtype=a.dtype)


def make_solver(
    a: sp.csr_matrix, method: SolverChoice = "auto", *, repeated: bool = False
) -> DirectSolver | AmgSolver:
    """A solver for matrix ``a`` chosen by :func:`choose_method`.

    ``method`` is a method name or the case's :class:`SolverSettings`; ``repeated`` tells
    that many right-hand sides will follow (time stepping).
    """
    s = solver_settings(method)
    kind = choose_method(a.shape[0], s, repeated=repeated)
    log.debug("%s solver for %d unknowns", kind, a.shape[0])
    if kind == "amg":
        return AmgSolver(a, tolerance=s.tolerance, max_iterations=s.max_iterations)
    return DirectSolver(a)
