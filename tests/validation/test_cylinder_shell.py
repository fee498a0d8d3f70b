"""Pipe insulation: a cylindrical shell on the triangle mesh against the analytic solution.

Source: textbook (Incropera & DeWitt, ch. 3, radial conduction in a cylindrical wall, from
memory): per metre of pipe, q' = (T_1 − T_∞) / (ln(r_2/r_1)/(2πk) + 1/(2π r_2 h)) with the
inner surface at T_1 and convection h to T_∞ outside. A quarter of the shell is modelled
(the cut planes adiabatic by symmetry); its outlines are polygons of 64 chords per quarter,
whose inscribed radii differ from the circle's by 8e-5 (negligible against the 0.5 %
tolerance). Also checks that a fixed temperature on the triangle mesh holds the surface
nodes at that temperature.
"""

from __future__ import annotations

import numpy as np
import pytest

from .helpers import report, run

R1, R2, K, H, T1, T_INF = 0.03, 0.08, 0.04, 10.0, 60.0, 0.0
N = 64


def _arc(r: float) -> np.ndarray:
    a = np.linspace(0.0, 0.5 * np.pi, N + 1)
    return np.column_stack([r * np.cos(a), r * np.sin(a)])


def _segments(p: np.ndarray) -> str:
    return (
        "["
        + ", ".join(
            f"[[{a[0]!r}, {a[1]!r}], [{b[0]!r}, {b[1]!r}]]"
            for a, b in zip(p[:-1].tolist(), p[1:].tolist(), strict=True)
        )
        + "]"
    )


def _toml(kind: str) -> str:
    outline = np.concatenate([_arc(R2), _arc(R1)[::-1]])
    poly = "[" + ", ".join(f"[{x!r}, {y!r}]" for x, y in outline.tolist()) + "]"
    return f"""
title = "insulated pipe"
[mesh]
max_cell = 0.005
min_cell = 0.002
kind = "{kind}"
[materials.insulation]
conductivity = {K!r}
[[regions]]
material = "insulation"
polygon = {poly}
[[boundaries]]
name = "pipe"
edges = {_segments(_arc(R1))}
temperature = {T1!r}
[[boundaries]]
name = "air"
edges = {_segments(_arc(R2))}
air_temperature = {T_INF!r}
convection = {H!r}
"""


@pytest.mark.parametrize("kind", ["triangles"])
def test_cylinder_shell(tmp_path, kind):
    sol = run(tmp_path, _toml(kind))
    exact = 0.25 * (T1 - T_INF) / (np.log(R2 / R1) / (2 * np.pi * K) + 1 / (2 * np.pi * R2 * H))
    got = sol.surfaces["pipe"].heat_flow
    report("cylinder shell (triangles)", got=got, exact=exact, rel=got / exact - 1)
    assert sol.mesh.kind == kind
    assert got == pytest.approx(exact, rel=0.005)
    assert sol.surfaces["air"].heat_flow == pytest.approx(-got, rel=1e-9)
    assert sol.surfaces["pipe"].min_temperature == pytest.approx(T1, abs=1e-9)
    # outer surface temperature: T_∞ + q'/(2π r_2 h) (same source)
    t_surface = T_INF + 4 * exact / (2 * np.pi * R2 * H)
    assert sol.surfaces["air"].min_temperature == pytest.approx(t_surface, abs=0.02)
