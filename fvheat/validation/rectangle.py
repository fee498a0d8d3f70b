"""ISO 10211 validation case 1 form: steady conduction in a rectangle, one edge warm, the
other three cold, temperatures at 28 points against the Fourier-series solution.

Source: Carslaw & Jaeger, steady temperature in a rectangle; Incropera & DeWitt §4.2,
eq. 4.19. ISO 10211 accepts a method when the 28 points are within 0.1 K (from memory);
the rectangle (1 m × 2 m, 20 °C on the edge y = H) and the 4 × 7 lattice are chosen here.
"""

from __future__ import annotations

import numpy as np

from fvheat.validation.check import Check, solve

SOURCE = "Fourier series, Incropera & DeWitt eq. 4.19; ISO 10211 case-1 tolerance from memory"
W, H = 1.0, 2.0  # m
THETA1 = 20.0  # °C
CELL = 0.05  # m
POINTS = [(i * W / 5, j * H / 8) for j in range(1, 8) for i in range(1, 5)]


def fourier(
    x: np.ndarray,
    y: np.ndarray,
    terms: int = 400,
    width: float = W,
    height: float = H,
    theta1: float = THETA1,
) -> np.ndarray:
    """Temperatures (°C) at points (x, y) m of the series solution (Incropera eq. 4.19),
    θ = θ1 on the edge y = ``height``, 0 on the other three:
    θ/θ1 = (2/π) Σ_n ((−1)^(n+1) + 1)/n · sin(nπx/W) · sinh(nπy/W)/sinh(nπH/W).
    sinh(a)/sinh(b) is written as e^(a−b)(1 − e^(−2a))/(1 − e^(−2b)) so that no term
    overflows."""
    n = np.arange(1, terms + 1)[:, None]
    coeff = ((-1.0) ** (n + 1) + 1.0) / n
    a = n * np.pi * np.asarray(y)[None, :] / width
    b = n * np.pi * height / width
    ratio = np.exp(a - b) * (-np.expm1(-2.0 * a)) / (-np.expm1(-2.0 * b))
    waves = np.sin(n * np.pi * np.asarray(x)[None, :] / width)
    return theta1 * 2.0 / np.pi * np.sum(coeff * waves * ratio, axis=0)


def case_text(cell: float = CELL) -> str:
    """The rectangle as a case file on uniform square cells of edge ``cell`` (m), with a
    probe at every point."""
    probes = "".join(
        f'[[probes]]\nname = "p{k}"\nat = [{x!r}, {y!r}]\n' for k, (x, y) in enumerate(POINTS)
    )
    return f"""title = "rectangle, one warm edge"
[mesh]
max_cell = {cell}
min_cell = {cell}
[materials.solid]
conductivity = 1.0
[[regions]]
material = "solid"
box = [0.0, 0.0, {W}, {H}]
[[boundaries]]
name = "warm"
edges = [[[0.0, {H}], [{W}, {H}]]]
temperature = {THETA1}
[[boundaries]]
name = "cold"
edges = [[[0.0, 0.0], [{W}, 0.0]], [[0.0, 0.0], [0.0, {H}]], [[{W}, 0.0], [{W}, {H}]]]
temperature = 0.0
{probes}"""


def checks() -> list[Check]:
    """The point with the largest deviation of the 28 (the acceptance test is on the max)."""
    sol = solve(case_text(), "rectangle")
    pts = np.array(POINTS)
    exact = fourier(pts[:, 0], pts[:, 1])
    got = np.array([sol.probes[f"p{k}"] for k in range(len(POINTS))])
    k = int(np.argmax(np.abs(got - exact)))
    return [
        Check(
            "ISO 10211 case 1",
            "θ, worst of 28 points",
            "°C",
            float(exact[k]),
            float(got[k]),
            0.1,
            SOURCE,
        )
    ]
