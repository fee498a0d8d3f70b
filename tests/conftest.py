"""Shared test settings: floating-point problems raise instead of passing silently."""

import numpy as np

np.seterr(all="raise", under="ignore")
