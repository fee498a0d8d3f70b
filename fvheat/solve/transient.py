"""Implicit θ-scheme time stepping as a generator over a reused factorisation.

    C (T¹ − T⁰)/Δt = θ F(T¹, t¹) + (1 − θ) F(T⁰, t⁰),   θ = 1 (backward Euler) or ½ (Crank–Nicolson)

with F(T, t) = b(t) − M·T + r(T, t) (see :mod:`fvheat.assembly.system`). The matrix
C/Δt + θM is factorised once; radiating surfaces add a diagonal handled by
:class:`~fvheat.solve.nonlinear.NewtonSolver`, which keeps its factorisation while it works.
"""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np
import scipy.sparse as sp

from fvheat.assembly.system import System
from fvheat.solve.linear import SolverChoice
from fvheat.solve.nonlinear import NewtonSolver

#: what a stepper yields after each step: time (s), cell temperatures (°C), and the heat that
#: entered through each boundary during the step (J/m), θ-weighted as the scheme balanced it
Step = tuple[float, np.ndarray, np.ndarray]


def evolve(
    system: System,
    temp0: np.ndarray,
    step: float,
    n_steps: int,
    *,
    theta: float = 1.0,
    t0: float = 0.0,
    method: SolverChoice = "auto",
) -> Iterator[Step]:
    """Yield (t, T, boundary heat) after each of ``n_steps`` steps of ``step`` s from
    (t0, ``temp0``)."""
    c_dt = system.capacity / step
    a = (sp.diags(c_dt) + theta * system.matrix).tocsr()
    newton = NewtonSolver(a, theta, method=method, repeated=True, linear=not system.nonlinear)
    temp = temp0.astype(float).copy()
    t = t0
    explicit = theta < 1.0  # the old time level enters the balance
    f_old = system.heat_in(temp, t)[0] if explicit else None
    q_old = system.boundary_flows(temp, t)
    for k in range(1, n_steps + 1):
        t_new = t0 + k * step
        # all terms of the balance that do not depend on T¹
        c = c_dt * temp + theta * system.sources(t_new)
        if f_old is not None:
            c += (1.0 - theta) * f_old

        def residual(
            x: np.ndarray, t_new: float = t_new, c: np.ndarray = c
        ) -> tuple[np.ndarray, np.ndarray]:
            r, dr = system.surface.radiative_terms(x, t_new, system.n)
            return c - a @ x + theta * r, dr

        if system.nonlinear:
            temp = newton.solve(residual, temp)
        else:  # a·T¹ = c: one back-substitution
            temp = newton.solve_linear(c, temp)
        t = t_new
        if explicit:
            f_old = system.heat_in(temp, t)[0]
        q_new = system.boundary_flows(temp, t)
        yield t, temp, step * (theta * q_new + (1.0 - theta) * q_old)
        q_old = q_new
