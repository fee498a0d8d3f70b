import numpy as np
import pytest


@pytest.fixture(autouse=True)
def _raise_on_float_errors():
    """Division by zero, overflow and invalid operations fail the test (underflow may pass)."""
    with np.errstate(all="raise", under="ignore"):
        yield
