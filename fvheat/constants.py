"""Physical constants, written out so that start-up does not import ``scipy.constants``
(about 0.1 s); ``tests/test_constants.py`` checks them against it."""

#: Stefan–Boltzmann constant, W/(m²·K⁴) (CODATA 2018; exact in the SI since 2019)
STEFAN_BOLTZMANN = 5.670374419e-8
#: 0 °C in kelvin
ZERO_CELSIUS = 273.15
