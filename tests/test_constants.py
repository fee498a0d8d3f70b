"""fvheat's written-out constants against scipy.constants (CODATA, an independent source)."""

import scipy.constants

from fvheat.constants import STEFAN_BOLTZMANN, ZERO_CELSIUS


def test_constants_are_scipys():
    assert STEFAN_BOLTZMANN == scipy.constants.Stefan_Boltzmann
    assert ZERO_CELSIUS == scipy.constants.zero_Celsius
