"""Physical constants, written out so that start-up does not import ``scipy.constants``
(about 0.1 s); ``tests/test_constants.py`` checks them against it."""

import math

#: Boltzmann constant (J/K), Planck constant (J·s), speed of light (m/s): exact in the SI
#: since 2019
_K_B, _H, _C = 1.380649e-23, 6.62607015e-34, 299792458.0
#: Stefan–Boltzmann constant, W/(m²·K⁴): 2π⁵k⁴/(15h³c²) ≈ 5.670374419e-8
STEFAN_BOLTZMANN = 2.0 * math.pi**5 * _K_B**4 / (15.0 * _H**3 * _C**2)
#: 0 °C in kelvin
ZERO_CELSIUS = 273.15
