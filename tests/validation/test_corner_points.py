"""The lowest inside surface temperature at re-entrant corners, against an independent
finite-element solve (scikit-fem, P2, elements of 0.1 mm at every corner: see
``fem_reference.py``).

At an inside corner where two exchanging surfaces meet around a body of more than 180°
(a window reveal meeting the frame, the glass edge meeting the frame at the sight line, a
slab soffit meeting the wall), the surface temperature is lowest at the corner point and
changes steeply next to it (by about 0.5 K within the first millimetre at the jamb's sight
line). fvheat refines its grid towards such corners and extrapolates face temperatures to
face end points; the reported θ_si,min must be within 0.1 K of the reference on the demo
cases' own meshes (what the README runs), and never warmer than that (the unsafe side);
both meshes must in fact read at most ``WARM_SIDE`` = 0.025 K warmer than the reference.

The demo cases are taken as written, with the surface resistances of their
surface-temperature solves (R_si = 0.25 on opaque surfaces, 0.13 on glazing and frames,
ISO 13788, from memory); the reference is given the same boxes, conductivities and
surface resistances. The reference's own discretisation uncertainty is checked against a
coarser reference solve (must be ≤ 0.01 K).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from fem_reference import solve_boxes

from fvheat.case.load import load_case
from fvheat.study import run_study, surface_case

from .helpers import report

CASES = Path(__file__).resolve().parents[2] / "cases"
TOLERANCE = 0.1  # K, the acceptance of the issue; the reference uncertainty must be ≤ 0.01 K
#: K, how much warmer than the reference (the unsafe side) a corner minimum may read on
#: either mesh. Measured: triangles read 0.002–0.011 K colder than the reference at every
#: corner of the three demos (the finer edges at re-entrant corners of ``mesh/triangles.py``;
#: +0.064 K at the glass/frame corner without them); the grid reads up to 0.0225 K warmer
#: (balcony floor meeting the wall).
WARM_SIDE = 0.025

#: demo case: the re-entrant inside corners whose temperature decides θ_si,min
DEMOS = {
    "wall_window_junction.toml": [(0.015, 0.12), (0.12, 0.143)],  # reveal/frame, glass/frame
    "balcony_slab.toml": [(0.0, 0.0), (0.0, 0.30)],  # slab soffit / wall, floor / wall
    "window_frame_section.toml": [],
}


@pytest.mark.slow
@pytest.mark.parametrize("kind", ["rectilinear", "triangles"])
@pytest.mark.parametrize("name", list(DEMOS))
def test_theta_si_min_against_fem(name, kind):
    """On both meshes (the triangle mesh's corner is a node: no extrapolation)."""
    case = load_case(CASES / name, [f"mesh.kind={kind}"])
    study = run_study(case)
    assert study.solution.mesh.kind == kind
    j = study.junction
    assert j is not None
    surf = study.surface_solution or study.solution
    reference_case = surface_case(case) if study.surface_solution is not None else case
    fem = solve_boxes(reference_case, h=0.02, h0=1e-4, ratio=1.3)
    coarse = solve_boxes(reference_case, h=0.04, h0=4e-4, ratio=1.4)
    rows = {}
    for b in case.junction.inside:
        ref, where = fem.surface_minimum(b)
        ref_coarse, _ = coarse.surface_minimum(b)
        assert abs(ref_coarse - ref) <= 0.01, f"reference not converged on {b}"
        got = surf.surfaces[b].min_temperature
        rows[b] = (got - ref, ref, tuple(where.round(4)), surf.surfaces[b].min_at)
        assert abs(got - ref) <= TOLERANCE, f"{b}: fvheat {got:.3f} °C, reference {ref:.3f} °C"
        assert got - ref <= WARM_SIDE, f"{b}: {got - ref:+.4f} K warmer than the reference"
    # the junction's θ_si,min (over its f_Rsi surfaces) against the reference minimum
    f_rsi_names = case.junction.f_rsi_boundaries or case.junction.inside
    ref_min = min(fem.surface_minimum(b)[0] for b in f_rsi_names)
    report(
        f"θ_si,min at corners, {name}, {kind}",
        per_boundary=rows,
        theta_si_min=j.theta_si_min,
        reference=ref_min,
        cells=surf.mesh.n_cells,
    )
    assert abs(j.theta_si_min - ref_min) <= TOLERANCE
    assert j.theta_si_min - ref_min <= WARM_SIDE
    # the named corners are where the reference finds the minimum of some inside surface,
    # and fvheat reports its minimum of that surface at the same point
    for corner in DEMOS[name]:
        hits = [b for b, (_, _, where, _) in rows.items() if np.allclose(where, corner)]
        assert hits, f"no inside surface has its reference minimum at {corner}"
        for b in hits:
            assert np.allclose(rows[b][3], corner, atol=1e-9)
