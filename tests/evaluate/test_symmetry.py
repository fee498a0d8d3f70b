"""Mirror symmetry: the same junction mirrored x → −x gives the same results.

Source: a fact of the physics (the problem is invariant under reflection) and of a
well-built method (the mesher grades grid lines symmetrically, so the mirrored grid is the
mirror image of the original and the discrete problem is the same up to round-off).
Tolerance 1e-9 relative on L2D, ψ, f_Rsi and θ_si,min; the location of θ_si,min mirrors.
"""

from __future__ import annotations

import pytest

from fvheat.mesh.rectilinear import build_mesh

from .helpers import box, load, num, pt, seg, segs, study

# An invented balcony slab through an insulated wall with a chamfered upstand at its tip
# (room at x < 0), in the un-mirrored orientation: (material, box or polygon)
MATERIALS = {"wall": 2.3, "wool": 0.035, "slab": 2.5, "screed": 1.4, "floor_ins": 0.04}
BOXES = [
    ("wall", (0.0, -1.2, 0.2, 1.5)),
    ("wool", (0.2, -1.2, 0.36, 1.5)),
    ("slab", (-1.2, 0.0, 1.4, 0.2)),
    ("floor_ins", (-1.2, 0.2, 0.0, 0.23)),
    ("screed", (-1.2, 0.23, 0.0, 0.28)),
]
# a 1:1.6 chamfer; a 45° one puts cell centres exactly on the sloped edge (tested below)
UPSTAND = [(1.25, 0.2), (1.4, 0.2), (1.4, 0.5), (1.3, 0.5), (1.25, 0.42)]
CAVITY = (0.24, 0.05, 0.3, 0.15)  # a closed air void in the slab inside the wool plane
INSIDE = [
    ((0.0, -1.2), (0.0, 0.0)),
    ((-1.2, 0.0), (0.0, 0.0)),
    ((-1.2, 0.28), (0.0, 0.28)),
    ((0.0, 0.28), (0.0, 1.5)),
]
OUTSIDE = [
    ((0.36, -1.2), (0.36, 0.0)),
    ((0.36, 0.2), (0.36, 1.5)),
    ((0.36, 0.0), (1.4, 0.0)),
    ((0.36, 0.2), (1.25, 0.2)),
    ((1.25, 0.2), (1.25, 0.42)),
    ((1.25, 0.42), (1.3, 0.5)),
    ((1.3, 0.5), (1.4, 0.5)),
    ((1.4, 0.0), (1.4, 0.5)),
]
CENTRE = (0.18, 0.1)
CUTS = {
    "wall_below": (((0.0, -0.9), (0.36, -0.9)), 1.2),
    "wall_above": (((0.0, 1.2), (0.36, 1.2)), 1.22),
}


def junction_toml(mirror: bool, upstand=UPSTAND) -> str:
    s = -1.0 if mirror else 1.0

    def p(q):
        return (s * q[0], q[1])

    def b(q):
        x0, x1 = sorted((s * q[0], s * q[2]))
        return (x0, q[1], x1, q[3])

    def sg(ss):
        return [(p(a), p(c)) for a, c in ss]

    text = """
title = "mirror test"
[mesh]
max_cell = 0.05
min_cell = 0.004
growth = 1.25
"""
    text += "".join(f"\n[materials.{n}]\nconductivity = {num(k)}\n" for n, k in MATERIALS.items())
    text += "".join(f'\n[[regions]]\nmaterial = "{m}"\nbox = {box(b(q))}\n' for m, q in BOXES)
    poly = [p(q) for q in upstand]
    text += '\n[[regions]]\nmaterial = "slab"\npolygon = [' + ", ".join(pt(q) for q in poly) + "]\n"
    flow = "-x" if mirror else "+x"
    text += f'\n[[regions]]\ncavity = {{ heat_flow = "{flow}" }}\nbox = {box(b(CAVITY))}\n'
    outside = [*OUTSIDE[:4], ((1.25, 0.2), upstand[-1]), (upstand[-1], (1.3, 0.5)), *OUTSIDE[6:]]
    for name, edges, air, r in (("inside", INSIDE, 20.0, 0.13), ("outside", outside, -5.0, 0.04)):
        text += (
            f'\n[[boundaries]]\nname = "{name}"\nedges = {segs(sg(edges))}\n'
            f"air_temperature = {air}\nresistance = {r}\n"
        )
    text += f"""
[junction]
inside = ["inside"]
outside = ["outside"]
condensation_resistance = 0.25
centre = {pt(p(CENTRE))}
"""
    for name, (cut, length) in CUTS.items():
        text += (
            f'\n[[junction.flanking]]\nname = "{name}"\nlength = {num(length)}\n'
            f"cut = {seg(sg([cut])[0])}\n"
        )
    return text


def test_mirrored_junction_same_results(tmp_path):
    """ψ, L2D, f_Rsi, θ_si,min equal to 1e-9 relative; θ_si,min's location mirrored (on
    the rectilinear grid: the triangle mesh of a mirrored outline is not its mirror image,
    see the next test)."""
    grid = ["mesh.kind=rectilinear"]
    a = study(tmp_path, junction_toml(False), grid, name="a.toml")
    b = study(tmp_path, junction_toml(True), grid, name="b.toml")
    ja, jb = a.junction, b.junction
    assert a.solution.mesh.n_cells == b.solution.mesh.n_cells
    for key in ("l2d", "psi", "f_rsi", "theta_si_min"):
        assert getattr(jb, key) == pytest.approx(getattr(ja, key), rel=1e-9), key
    for fa, fb in zip(ja.flanking, jb.flanking, strict=True):
        assert fb.u_value == pytest.approx(fa.u_value, rel=1e-12)
    xa, ya = ja.theta_si_min_at
    xb, yb = jb.theta_si_min_at
    assert (xb, yb) == pytest.approx((-xa, ya), abs=1e-9)
    # the junction is a real one: a sizeable ψ, and an asymmetric field
    assert ja.psi > 0.3


def test_mirrored_junction_on_triangles(tmp_path):
    """On the triangle mesh (the default for the chamfered upstand) the mirrored junction
    is meshed anew: ψ, L2D and f_Rsi agree within the discretisation error (0.1 %, the
    grid check's scale), θ_si,min within 0.01 K, at the mirrored place within two
    min_cell (the two meshes have their nodes in different places)."""
    a = study(tmp_path, junction_toml(False), name="a.toml")
    b = study(tmp_path, junction_toml(True), name="b.toml")
    assert a.solution.mesh.kind == b.solution.mesh.kind == "triangles"
    ja, jb = a.junction, b.junction
    for key in ("l2d", "psi", "f_rsi"):
        assert getattr(jb, key) == pytest.approx(getattr(ja, key), rel=1e-3), key
    assert jb.theta_si_min == pytest.approx(ja.theta_si_min, abs=0.01)
    xa, ya = ja.theta_si_min_at
    xb, yb = jb.theta_si_min_at
    assert (xb, yb) == pytest.approx((-xa, ya), abs=2 * 0.004)


def test_mirrored_45_degree_chamfer_paints_the_same(tmp_path):
    """The painted cells of a 45° chamfer mirror too (same cell count)."""
    chamfer = [(1.25, 0.2), (1.4, 0.2), (1.4, 0.5), (1.3, 0.5), (1.25, 0.45)]
    grid = ["mesh.kind=rectilinear"]
    a = load(tmp_path, junction_toml(False, chamfer), grid, name="a.toml")
    b = load(tmp_path, junction_toml(True, chamfer), grid, name="b.toml")
    assert build_mesh(a).n_cells == build_mesh(b).n_cells
