"""A 2-D composite junction against an independent finite-element solve (scikit-fem).

An invented concrete balcony slab with an upstand at its tip (λ = 2.3) runs through a brick
wall (λ = 0.9) with external insulation (λ = 0.04); R_si 0.13, R_se 0.04 m²·K/W; 20 °C
inside, −10 °C outside. The references were computed with scikit-fem (quadratic P2
triangles on a 10 mm tensor mesh through every material interface; 20 mm and 10 mm meshes
agree within 0.25 %), by ``tests/validation/test_skfem_composite.py``, which imports this
junction and recomputes them, so the numbers stored here cannot drift from that solve.
scikit-fem is not needed to run this check.
"""

from __future__ import annotations

from fvheat.validation.check import Check, solve

SOURCE = (
    "scikit-fem (independent FE library), P2 triangles, 10 mm mesh; recomputed by "
    "tests/validation/test_skfem_composite.py"
)
CONDUCTIVITY = {"brick": 0.9, "insulation": 0.04, "concrete": 2.3}  # W/(m·K)
#: painted in order, later ones win (x0, y0, x1, y1), m
REGIONS = (
    ("brick", (0.0, 0.0, 0.25, 2.6)),
    ("insulation", (0.25, 0.0, 0.40, 2.6)),
    ("concrete", (-1.2, 1.2, 1.5, 1.4)),
    ("concrete", (1.35, 1.4, 1.5, 1.9)),
)
INSIDE = (
    ((0.0, 0.0), (0.0, 1.2)),
    ((0.0, 1.4), (0.0, 2.6)),
    ((-1.2, 1.2), (0.0, 1.2)),
    ((-1.2, 1.4), (0.0, 1.4)),
)
OUTSIDE = (
    ((0.4, 0.0), (0.4, 1.2)),
    ((0.4, 1.4), (0.4, 2.6)),
    ((0.4, 1.2), (1.5, 1.2)),
    ((0.4, 1.4), (1.35, 1.4)),
    ((1.35, 1.4), (1.35, 1.9)),
    ((1.35, 1.9), (1.5, 1.9)),
    ((1.5, 1.2), (1.5, 1.9)),
)
T_IN, R_IN, T_OUT, R_OUT = 20.0, 0.13, -10.0, 0.04
POINT = (0.12, 1.3)  # m, in the slab inside the wall
#: scikit-fem results (see the module docstring)
HEAT_FLOW_REF = 43.41514  # W/m through the inside surfaces
THETA_REF = 10.83829  # °C at POINT


def _segments(segs: tuple[tuple[tuple[float, float], tuple[float, float]], ...]) -> str:
    return "[" + ", ".join(f"[[{a[0]}, {a[1]}], [{b[0]}, {b[1]}]]" for a, b in segs) + "]"


def case_text() -> str:
    """The junction as a case file (cells 4 to 40 mm, 1 mm at corners)."""
    mats = "".join(f"[materials.{n}]\nconductivity = {k}\n" for n, k in CONDUCTIVITY.items())
    regions = "".join(
        f'[[regions]]\nmaterial = "{n}"\nbox = [{", ".join(map(str, b))}]\n' for n, b in REGIONS
    )
    return f"""title = "balcony slab through an insulated wall"
[mesh]
max_cell = 0.04
min_cell = 0.004
corner_cell = 0.001
{mats}{regions}
[[boundaries]]
name = "inside"
edges = {_segments(INSIDE)}
air_temperature = {T_IN}
resistance = {R_IN}
[[boundaries]]
name = "outside"
edges = {_segments(OUTSIDE)}
air_temperature = {T_OUT}
resistance = {R_OUT}
[[probes]]
name = "slab_in_wall"
at = [{POINT[0]}, {POINT[1]}]
"""


def checks() -> list[Check]:
    """Heat flow through the inside surfaces and the temperature in the slab."""
    sol = solve(case_text(), "composite")
    name = "balcony slab 2-D"
    return [
        Check(
            name,
            "heat flow in",
            "W/m",
            HEAT_FLOW_REF,
            sol.surfaces["inside"].heat_flow,
            5e-3,
            SOURCE,
            relative=True,
        ),
        Check(
            name, "θ in the slab", "°C", THETA_REF, float(sol.probes["slab_in_wall"]), 0.05, SOURCE
        ),
    ]
