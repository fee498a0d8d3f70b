"""Flanking U-values and ψ of plane elements.

1. A straight wall modelled as a "junction" whose only flanking element is the wall itself
   has ψ = 0. Source: ISO 10211 principle (ψ is the heat flow beyond that of the 1-D
   flanking elements; a plane element has none). Tolerance: 0.001 W/(m·K), the resolution
   to which ψ is reported in practice (common practice: three decimals). Finite volumes are
   exact for a 1-D layered wall, so L2D = U·l is also checked to 1e-9 relative.
2. The automatic U of a layer cut equals the ISO 6946 layer sum U = 1/(R_si + Σ d/λ + R_se).
   Source: ISO 6946 (plane layers, combined surface resistances). Tolerance 1e-12 relative
   (only round-off separates the two sums).
"""

from __future__ import annotations

import pytest

from fvheat.mesh.rectilinear import build_mesh

from .helpers import iso6946_u, load, materials_toml, num, regions_toml, seg, study, surface_toml

T_IN, T_OUT = 20.0, -5.0
R_SI, R_SE = 0.13, 0.04  # ISO 6946 horizontal heat flow (common practice)
HEIGHT = 2.0  # m, length of the wall in the section

HOMOGENEOUS = [("concrete", 0.25, 1.35)]
LAYERED = [  # inside to outside: (material, d m, λ W/(m·K)); design-like values
    ("plaster", 0.015, 0.4),
    ("brick", 0.215, 0.77),
    ("wool", 0.12, 0.035),
    ("render", 0.02, 1.0),
]


def wall_toml(
    layers, *, flanking: str, axis: str = "x", r_si: float = R_SI, r_se: float = R_SE
) -> str:
    """A plane wall of ``layers`` (inside first) across ``axis`` (x: inside face at x = 0,
    room at x < 0; y: a roof, room below y = 0), ``HEIGHT`` long, cut-off planes adiabatic,
    with a junction whose one flanking element is given by the TOML lines ``flanking``."""
    regions, pos = [], 0.0
    for name, d, _ in layers:
        b = (pos, 0.0, pos + d, HEIGHT) if axis == "x" else (0.0, pos, HEIGHT, pos + d)
        regions.append((name, b))
        pos += d
    if axis == "x":
        inside = [((0.0, 0.0), (0.0, HEIGHT))]
        outside = [((pos, 0.0), (pos, HEIGHT))]
    else:
        inside = [((0.0, 0.0), (HEIGHT, 0.0))]
        outside = [((0.0, pos), (HEIGHT, pos))]
    return f"""
title = "plane wall as a junction"
[mesh]
max_cell = 0.05
min_cell = 0.005
{materials_toml({n: k for n, _, k in layers})}
{regions_toml(regions)}
{surface_toml("inside", inside, T_IN, r_si)}
{surface_toml("outside", outside, T_OUT, r_se)}
[junction]
inside = ["inside"]
outside = ["outside"]
centre = [0.0, 0.0]

[[junction.flanking]]
name = "wall"
length = {num(HEIGHT)}
{flanking}
"""


def thickness(layers) -> float:
    return sum(d for _, d, _ in layers)


@pytest.mark.parametrize("layers", [HOMOGENEOUS, LAYERED], ids=["homogeneous", "layered"])
@pytest.mark.parametrize("source", ["u_value", "cut"])
def test_plane_wall_has_zero_psi(tmp_path, layers, source):
    """ISO 10211 principle: ψ of a plane wall against its own U is 0 (within 0.001)."""
    u = iso6946_u([(d, k) for _, d, k in layers], R_SI, R_SE)
    if source == "u_value":
        flank = f"u_value = {num(u)}"
    else:
        flank = f"cut = {seg(((0.0, 0.7), (thickness(layers), 0.7)))}"
    j = study(tmp_path, wall_toml(layers, flanking=flank)).junction
    assert j is not None
    assert abs(j.psi) < 1e-3
    # finite volumes are exact for 1-D layers: L2D = U·l to round-off
    assert j.l2d == pytest.approx(u * HEIGHT, rel=1e-9)
    assert j.heat_flow == pytest.approx(u * HEIGHT * (T_IN - T_OUT), rel=1e-9)


@pytest.mark.parametrize("reverse", [False, True], ids=["inside-first", "outside-first"])
@pytest.mark.parametrize("axis", ["x", "y"])
def test_cut_u_is_iso6946_layer_sum(tmp_path, axis, reverse):
    """ISO 6946: U from the cut = 1/(R_si + Σ d/λ + R_se) to 1e-12, whichever way the cut
    runs and whether the layers lie across x (a wall) or y (a roof with R_si = 0.10 for
    upward heat flow, ISO 6946 common practice); the layers are listed from the cut's
    first point, with R_si / R_se swapped accordingly."""
    r_si = R_SI if axis == "x" else 0.10
    t = thickness(LAYERED)
    a, b = (0.0, 0.7), (t, 0.7)
    if axis == "y":
        a, b = (0.7, 0.0), (0.7, t)
    if reverse:
        a, b = b, a
    s = study(tmp_path, wall_toml(LAYERED, flanking=f"cut = {seg((a, b))}", axis=axis, r_si=r_si))
    f = s.junction.flanking[0]
    expected = iso6946_u([(d, k) for _, d, k in LAYERED], r_si, R_SE)
    assert f.u_value == pytest.approx(expected, rel=1e-12)
    order = LAYERED[::-1] if reverse else LAYERED
    assert [m for m, _, _ in f.cut.layers] == [m for m, _, _ in order]
    for (_, d, k), (_, d_cut, k_cut) in zip(order, f.cut.layers, strict=True):
        assert d_cut == pytest.approx(d, rel=1e-12)
        assert k_cut == k
    ends = (f.cut.r_start, f.cut.r_end)
    assert ends == ((R_SE, r_si) if reverse else (r_si, R_SE))
    assert f.cut.thickness == pytest.approx(t, rel=1e-12)


def test_cut_on_a_grid_line_inside_a_layer(tmp_path):
    """A cut lying exactly on a grid line that the mesher placed inside the layers (not a
    material edge) reads the same layers and U as a cut between grid lines (regression: it
    used to be refused as "a material edge", so a cut's validity hung on the mesh)."""
    t = thickness(LAYERED)
    text = wall_toml(LAYERED, flanking=f"cut = {seg(((0.0, 0.7), (t, 0.7)))}")
    y = build_mesh(load(tmp_path, text)).grid.y
    y_line = float(y[y.size // 2])  # an interior grid line, not a region edge
    assert 0.0 < y_line < HEIGHT
    s = study(tmp_path, text, [f"junction.flanking.0.cut={seg(((0.0, y_line), (t, y_line)))}"])
    expected = iso6946_u([(d, k) for _, d, k in LAYERED], R_SI, R_SE)
    assert s.junction.flanking[0].u_value == pytest.approx(expected, rel=1e-12)
    assert abs(s.junction.psi) < 1e-3
