"""Solvers: linear (direct / AMG-CG), Newton for radiating surfaces, steady and transient."""

from fvheat.solve.linear import make_solver
from fvheat.solve.steady import solve_steady
from fvheat.solve.transient import evolve

__all__ = ["evolve", "make_solver", "solve_steady"]
