"""A matrix SuperLU cannot factorise is a numerical failure (ConvergenceError: exit 1 and
one line through the CLI), not a RuntimeError traceback (found by tests/cli/test_fuzz.py
with conductivities 1e308 W/(m·K) before their range was limited)."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp

from fvheat.errors import ConvergenceError
from fvheat.solve.linear import DirectSolver


def test_singular_matrix_is_a_convergence_error():
    # the conduction matrix of two cells with no temperature reference: rows sum to zero
    a = sp.csr_matrix(np.array([[1.0, -1.0], [-1.0, 1.0]]))
    with pytest.raises(ConvergenceError, match="cannot be factorised"):
        DirectSolver(sp.csr_matrix((2, 2)))
    # a regular matrix still factorises (the same with a reference on cell 0)
    fixed = a + sp.diags([1.0, 0.0])
    x = DirectSolver(fixed).solve(np.array([1.0, 0.0]))
    np.testing.assert_allclose(fixed @ x, [1.0, 0.0])
