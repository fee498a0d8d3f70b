"""``[mesh] file``: a mesh written by meshio with named physical groups.

Source: identity. The same triangles (same nodes, same material per triangle, same
boundary edges) solved through a file give the same temperatures and heat flows as the
mesh fvheat made, to 1e-9; the file path goes through meshio's gmsh writer and reader,
which fvheat does not control.
"""

from __future__ import annotations

import meshio
import numpy as np
import pytest
from casefiles import load

from fvheat.errors import CaseError
from fvheat.mesh.select import build_mesh
from fvheat.simulate import simulate

from .test_triangles import SLOPED

FILE_CASE = """
title = "sloped eaves detail from a mesh file"
[mesh]
file = "{file}"
[materials.timber]
conductivity = 0.13
[materials.wool]
conductivity = 0.035
[[boundaries]]
name = "inside"
air_temperature = 20.0
resistance = 0.10
[[boundaries]]
name = "roof"
air_temperature = -5.0
resistance = 0.04
[[probes]]
name = "in_wool"
at = [0.2, 0.08]
"""


def write_msh(path, mesh, quads: bool = False) -> None:
    """The fvheat mesh as gmsh 2.2 with physical groups: 2-D per material, 1-D per boundary."""
    names = list(mesh.material_names)
    half = mesh.n_boundary_faces // 2
    edges = np.column_stack([mesh.b_cell[:half], mesh.b_cell[half:]])
    bid = mesh.b_boundary[:half]
    on = bid >= 0
    field_data = {n: np.array([k + 1, 2]) for k, n in enumerate(names)}
    field_data |= {n: np.array([100 + k, 1]) for k, n in enumerate(mesh.boundary_names)}
    tags = [mesh.triangle_material + 1, bid[on] + 100]
    m = meshio.Mesh(
        np.column_stack([mesh.centres, np.zeros(mesh.n_cells)]),
        [("triangle", mesh.triangles), ("line", edges[on])],
        cell_data={"gmsh:physical": tags, "gmsh:geometrical": tags},
        field_data=field_data,
    )
    meshio.write(path, m, file_format="gmsh22", binary=False)


def test_round_trip_gives_the_same_results(tmp_path):
    made = load(tmp_path, SLOPED.format(kind="triangles", latent=""))
    ours = simulate(made)
    write_msh(tmp_path / "section.msh", ours.mesh)
    case = load(tmp_path, FILE_CASE.format(file="section.msh"), name="from_file.toml")
    mesh = build_mesh(case)
    assert mesh.n_cells == ours.mesh.n_cells
    sol = simulate(case, mesh=mesh)
    np.testing.assert_allclose(sol.temperature, ours.temperature, rtol=0, atol=1e-9)
    for name in ("inside", "roof"):
        assert sol.surfaces[name].heat_flow == pytest.approx(
            ours.surfaces[name].heat_flow, rel=1e-9
        )
    assert sol.probes["in_wool"] == pytest.approx(ours.probes["in_wool"], abs=1e-9)
    # the mesh file is one of the case's inputs (sweeps record its SHA-256)
    from fvheat.case.inputs import case_inputs

    assert (tmp_path / "section.msh").absolute() in case_inputs(case)
    assert case.mesh.file_sha256 is not None and len(case.mesh.file_sha256) == 64
    # the grid check splits every triangle of a file mesh into four
    assert build_mesh(case, refine=2.0).triangles.shape[0] == 4 * mesh.triangles.shape[0]


def test_unknown_group_and_missing_boundary_in_one_line(tmp_path):
    made = load(tmp_path, SLOPED.format(kind="triangles", latent=""))
    write_msh(tmp_path / "section.msh", build_mesh(made))
    text = FILE_CASE.format(file="section.msh")
    with pytest.raises(CaseError, match=r"mesh\.file.*'wool' names no material"):
        load(tmp_path, text.replace("[materials.wool]\nconductivity = 0.035\n", ""))
    with pytest.raises(CaseError, match=r"boundaries\.1\.name.*no 1-D group 'eaves'"):
        load(tmp_path, text.replace('name = "roof"', 'name = "eaves"'))
    with pytest.raises(CaseError, match=r"mesh\.file.*missing\.msh: file not found"):
        load(tmp_path, FILE_CASE.format(file="missing.msh"))
    with pytest.raises(CaseError, match=r"mesh\.max_cell.*not used with mesh\.file"):
        load(tmp_path, text.replace("[mesh]\n", "[mesh]\nmax_cell = 0.1\n"))
