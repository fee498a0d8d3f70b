"""The triangle mesh: which mesh a case gets, what it refuses, its geometry and outputs.

Sources: the geometry checks are exact identities (areas of the drawn polygons, lengths of
the drawn boundary segments, the P1 stiffness rows summing to zero); the field checks
compare with the 1-D series-resistance solution (ISO 6946 layer sum).
"""

from __future__ import annotations

import meshio
import numpy as np
import pytest
import shapely
from casefiles import load, write_case
from wallcases import TRIANGLE_WALL

from fvheat.errors import CaseError
from fvheat.mesh.select import build_mesh, mesh_kind
from fvheat.output.results import ResultsFolder
from fvheat.run import run_to_folder
from fvheat.simulate import simulate

SLOPED = """
title = "sloped eaves detail"
[mesh]
max_cell = 0.03
min_cell = 0.005
kind = "{kind}"
[materials.timber]
conductivity = 0.13
density = 500
specific_heat = 1600
[materials.wool]
conductivity = 0.035
{latent}
[[regions]]
material = "timber"
polygon = [[0.0, 0.0], [0.4, 0.0], [0.4, 0.1], [0.0, 0.3]]
[[regions]]
material = "wool"
polygon = [[0.05, 0.05], [0.3, 0.05], [0.3, 0.1], [0.05, 0.225]]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.4, 0.0]]]
air_temperature = 20.0
resistance = 0.10
[[boundaries]]
name = "roof"
edges = [[[0.0, 0.3], [0.4, 0.1]]]
air_temperature = -5.0
resistance = 0.04
[[probes]]
name = "in_wool"
at = [0.2, 0.08]
"""


def _case(tmp_path, kind="triangles", latent=""):
    return load(tmp_path, SLOPED.format(kind=kind, latent=latent))


def test_auto_picks_triangles_only_for_sloped_geometry(tmp_path):
    assert mesh_kind(_case(tmp_path, "auto")) == "triangles"
    boxes = SLOPED.replace("[0.0, 0.3]]", "[0.0, 0.1]]").replace("[0.05, 0.225]", "[0.05, 0.1]")
    boxes = boxes.replace("[[0.0, 0.3], [0.4, 0.1]]", "[[0.0, 0.1], [0.4, 0.1]]")
    assert mesh_kind(load(tmp_path, boxes.format(kind="auto", latent=""))) == "rectilinear"
    assert mesh_kind(_case(tmp_path, "rectilinear")) == "rectilinear"


def test_geometry_is_exact(tmp_path):
    case = _case(tmp_path)
    mesh = build_mesh(case)
    assert mesh.kind == "triangles" and mesh.vertex_centred
    # areas per region as drawn (the wool is painted over the timber)
    wool = shapely.Polygon(case.regions[1].vertices).area
    timber = shapely.Polygon(case.regions[0].vertices).area - wool
    assert mesh.piece_region is not None and mesh.piece_volume is not None
    got = np.bincount(mesh.piece_region, weights=mesh.piece_volume)
    np.testing.assert_allclose(got, [timber, wool], rtol=1e-12)
    # the sloped boundary covered over its whole drawn length
    roof = mesh.boundary_faces("roof")
    assert mesh.b_area[roof].sum() == pytest.approx(np.hypot(0.4, 0.2), rel=1e-12)
    assert mesh.stats()["min_angle_deg"] >= 20.0
    # conduction rows sum to zero (a uniform field carries no heat)
    sol = simulate(case, mesh=mesh)
    assert (
        np.abs(
            sol.system.matrix @ np.ones(mesh.n_cells) - sol.system.surface.diagonal(mesh.n_cells)
        ).max()
        < 1e-12
    )
    assert sol.balance.relative < 1e-10


def test_refining_halves_the_sizes(tmp_path):
    case = _case(tmp_path)
    coarse, fine = build_mesh(case), build_mesh(case, refine=2.0)
    assert 3.0 < fine.n_cells / coarse.n_cells < 5.0


def test_two_phase_change_materials_at_one_node_refused(tmp_path):
    """The wool (−1…0 °C) inside the timber (1…2 °C): nodes on their interface would need
    two phase-change ranges."""
    from fvheat.assembly.enthalpy import EnthalpyModel

    wool = "density = 30\nspecific_heat = 1000\nlatent_heat = 1000\nphase_change = [-1.0, 0.0]"
    text = SLOPED.format(kind="triangles", latent=wool).replace(
        "specific_heat = 1600\n",
        "specific_heat = 1600\nlatent_heat = 500\nphase_change = [1.0, 2.0]\n",
    )
    case = load(tmp_path, text)
    with pytest.raises(CaseError, match=r"phase-change materials .* meet at the mesh node"):
        EnthalpyModel.build(case, build_mesh(case))


def test_bad_kind_is_one_line(tmp_path):
    with pytest.raises(CaseError, match=r"mesh\.kind.*'auto', 'triangles', 'rectilinear'"):
        _case(tmp_path, "hexagons")


def test_probe_outside_refused(tmp_path):
    text = SLOPED.format(kind="triangles", latent="").replace("[0.2, 0.08]", "[0.35, 0.3]")
    with pytest.raises(CaseError, match=r"probes\.0\.at.*outside the body"):
        build_mesh(load(tmp_path, text))


def test_run_writes_triangle_vtu_and_kind(tmp_path):
    path = write_case(tmp_path, SLOPED.format(kind="triangles", latent=""))
    study, summary = run_to_folder(path, tmp_path / "out", plots=False)
    assert summary["mesh"]["kind"] == "triangles"
    m = meshio.read(tmp_path / "out" / "fields" / "field.vtu")
    mesh = study.solution.mesh
    assert m.cells_dict["triangle"].shape == mesh.triangles.shape
    np.testing.assert_allclose(m.point_data["temperature"], study.solution.temperature)
    q = m.cell_data_dict["heat_flux"]["triangle"]
    assert np.all(np.isfinite(q)) and np.mean(q[:, 1]) > 0.0  # from the warm side (y = 0) up
    folder = ResultsFolder.open(tmp_path / "out")  # read back like a grid folder
    assert folder.field_meta()["format"] == "fvheat-triangle-fields-1"
    np.testing.assert_array_equal(folder.field().temperature, study.solution.temperature)
    assert "triangles" in (tmp_path / "out" / "report.md").read_text(encoding="utf-8")
    rows = (tmp_path / "out" / "cells.csv").read_text(encoding="utf-8").splitlines()
    assert len(rows) == 1 + mesh.n_cells and rows[0].startswith("x_m,y_m,material,temperature_C")


def test_figures_and_preview_on_triangles(tmp_path):
    from fvheat.output.plots.preview import write_preview

    path = write_case(tmp_path, SLOPED.format(kind="triangles", latent=""))
    run_to_folder(path, tmp_path / "out", plots=True)
    figures = (tmp_path / "out" / "figures" / "figures.json").read_text(encoding="utf-8")
    for name in ("temperature", "heat_flux", "mesh"):
        assert f'"{name}"' in figures
        assert (tmp_path / "out" / "figures" / f"{name}.png").stat().st_size > 10_000
    assert "figures/temperature.png" in (tmp_path / "out" / "report.md").read_text("utf-8")
    case = _case(tmp_path)
    assert write_preview(case, build_mesh(case), tmp_path / "p.png").stat().st_size > 10_000


WALL = TRIANGLE_WALL


def test_triangle_heat_flux_of_a_wall(tmp_path):
    """q = −k∇T per triangle in the VTU: the ISO 6946 flux density q = Δθ/ΣR everywhere
    in a two-layer wall (x towards the cold side), 0 along it; P1 is exact in 1-D."""
    from fvheat.output.triangle_fields import node_flux, to_meshio
    from fvheat.output.triangle_view import TriangleViews

    sol = simulate(load(tmp_path, WALL))
    q_exact = 20.0 / (0.13 + 0.1 / 1.0 + 0.1 / 0.1 + 0.04)
    view = TriangleViews(sol).view(sol.temperature, sol.time)
    q = to_meshio(view).cell_data["heat_flux"][0]
    np.testing.assert_allclose(q[:, 0], -q_exact, rtol=1e-9)
    np.testing.assert_allclose(q[:, 1], 0.0, atol=1e-9 * q_exact)
    qn = node_flux(sol, sol.temperature)  # the cells.csv values: the same at every node
    np.testing.assert_allclose(qn, np.broadcast_to([-q_exact, 0.0], qn.shape), atol=1e-9 * q_exact)


def test_imposed_flux_and_fixed_temperature_on_nodes(tmp_path):
    """A 0.2 m slab (λ = 1), 0 °C fixed on x = 0, 10 W/m² imposed into x = 0.2: Fourier's
    law in 1-D gives θ(0.2) = q·L/λ = 2 °C. The imposed flow is exact (10 W/m² × 0.5 m);
    the fixed face holds its node within the penalty's 1e-4 of a cell's drop (2e-5 K)."""
    text = WALL.replace("[materials.b]\nconductivity = 0.1\n", "")
    text = text.replace('[[regions]]\nmaterial = "b"\nbox = [0.1, 0.0, 0.2, 0.5]\n', "")
    text = text.replace("air_temperature = 20.0\nresistance = 0.13", "heat_flux = 10.0").replace(
        "air_temperature = 0.0\nresistance = 0.04", "temperature = 0.0"
    )
    sol = simulate(load(tmp_path, text))
    inside, outside = sol.surfaces["inside"], sol.surfaces["outside"]
    assert inside.heat_flow == pytest.approx(10.0 * 0.5, rel=1e-12)
    assert outside.heat_flow == pytest.approx(-5.0, rel=1e-9)
    assert inside.min_temperature == pytest.approx(2.0, abs=1e-4)
    assert inside.max_temperature == pytest.approx(2.0, abs=1e-4)
    assert outside.min_temperature == 0.0  # the fixed value itself


def test_near_degenerate_input_is_cleaned(tmp_path):
    """Inputs `triangle` cannot take raw (it may crash on them): a probe and a cut ending a
    few ulp off an outline, an outline vertex 1e-15 m off another, a boundary segment
    running along an outline and past its end. Source: identity (the mesh is valid: every
    triangle has positive area, the drawn areas are kept to 1e-12)."""
    import math

    t = math.tan(math.radians(35.0))
    y = 0.3 - t * 0.1  # on no line exactly: the wool's slope is drawn through other points
    text = SLOPED.format(kind="triangles", latent="").replace(
        "[0.05, 0.225]]", "[0.05000000000000001, 0.225]]"
    )
    text += f"""
[[probes]]
name = "on_the_roof_edge"
at = [0.2, {0.3 - 0.5 * 0.2!r}]
[[probes]]
name = "odd"
at = [0.1, {y!r}]
"""
    text = text.replace(
        "edges = [[[0.0, 0.0], [0.4, 0.0]]]",
        "edges = [[[0.0, 0.0], [0.4, 0.0]], [[0.39, 0.0], [0.5, 0.0]]]",
    )
    case = load(tmp_path, text)
    mesh = build_mesh(case)
    assert mesh.piece_volume is not None and mesh.triangles is not None
    v, tri = mesh.centres, mesh.triangles
    e1, e2 = v[tri[:, 1]] - v[tri[:, 0]], v[tri[:, 2]] - v[tri[:, 0]]
    area = 0.5 * (e1[:, 0] * e2[:, 1] - e1[:, 1] * e2[:, 0])
    assert np.all(area > 0.0)
    total = shapely.Polygon(case.regions[0].vertices).area
    assert mesh.piece_volume.sum() == pytest.approx(total, rel=1e-12)
    sol = simulate(case, mesh=mesh)
    assert sol.balance.relative < 1e-10


def test_max_cells_bounds_the_triangle_mesh(tmp_path):
    """[mesh] max_cells counts the triangle mesh's nodes (one control volume each): a mesh
    beyond it is one line naming mesh.max_cells before it is made, and the grid check's
    refined mesh (about four nodes per node) is refused before any solve."""
    nodes = build_mesh(_case(tmp_path)).n_cells
    small = load(
        tmp_path, SLOPED.format(kind="triangles", latent=""), [f"mesh.max_cells={nodes // 3}"]
    )
    with pytest.raises(CaseError) as err:
        build_mesh(small)
    assert err.value.key == "mesh.max_cells" and "nodes" in str(err.value)
    assert "\n" not in str(err.value)
    fits = load(
        tmp_path, SLOPED.format(kind="triangles", latent=""), [f"mesh.max_cells={2 * nodes}"]
    )
    from fvheat.mesh.rectilinear import check_refined_size

    mesh = build_mesh(fits)  # fits itself ...
    with pytest.raises(CaseError) as err:  # ... but not split in four
        check_refined_size(fits, mesh, 2.0)
    assert "grid check" in str(err.value)
