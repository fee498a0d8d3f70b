"""Field files: VTU and the VTU series round-trip through meshio (an independent reader) with
the solver's temperatures to the last bit, and the boundary data close the heat balance."""

from __future__ import annotations

import csv
import xml.etree.ElementTree as ET

import meshio
import numpy as np
import pytest

from fvheat.case.load import load_case
from fvheat.output.fields import read_field, write_cells_csv, write_fields
from fvheat.output.view import field_view
from fvheat.simulate import simulate

from .conftest import CASES, coarse_overrides


def demo(stem: str):
    (path,) = [c for c in CASES if c.stem == stem]
    return load_case(path, coarse_overrides(path))


@pytest.fixture(scope="module")
def steady(tmp_path_factory):
    sol = simulate(demo("balcony_slab"))
    out = tmp_path_factory.mktemp("steady")
    write_fields(sol, out)
    return sol, out


@pytest.fixture(scope="module")
def transient(tmp_path_factory):
    sol = simulate(demo("wall_daily_cycle"))
    out = tmp_path_factory.mktemp("transient")
    write_fields(sol, out)
    return sol, out


def test_steady_vtu_round_trip_is_exact(steady):
    sol, out = steady
    m = meshio.read(out / "fields" / "field.vtu")
    types = [b.type for b in m.cells]
    assert types == ["quad", "line"]
    quads = m.cells[0].data
    assert quads.shape == (sol.mesh.n_cells, 4)
    # same cells in the solver's order: quad centres are the cell centres, areas the volumes
    pts = m.points[:, :2]
    np.testing.assert_allclose(pts[quads].mean(axis=1), sol.mesh.centres, rtol=0, atol=1e-12)
    x, y = pts[quads, 0], pts[quads, 1]
    x, y = x - x.mean(axis=1, keepdims=True), y - y.mean(axis=1, keepdims=True)  # round-off
    area = 0.5 * np.abs(np.sum(x * np.roll(y, -1, 1) - np.roll(x, -1, 1) * y, axis=1))
    np.testing.assert_allclose(area, sol.mesh.volumes, rtol=1e-12)
    # temperatures bit for bit (binary float64 in the file)
    np.testing.assert_array_equal(m.cell_data["temperature"][0], sol.temperature)
    np.testing.assert_array_equal(m.cell_data["material"][0], sol.mesh.material)
    assert m.cell_data["heat_flux"][0].shape == (sol.mesh.n_cells, 3)


def test_boundary_lines_carry_the_reported_heat_flows(steady):
    sol, out = steady
    m = meshio.read(out / "fields" / "field.vtu")
    lines = m.cells[1].data
    length = np.linalg.norm(np.diff(m.points[lines][:, :, :2], axis=1)[:, 0], axis=1)
    bid = m.cell_data["boundary"][1]
    q = m.cell_data["surface_heat_flux"][1]
    assert lines.shape[0] == sol.mesh.n_boundary_faces
    for k, name in enumerate(sol.mesh.boundary_names):
        flow = float(np.sum(q[bid == k] * length[bid == k]))
        assert flow == pytest.approx(sol.surfaces[name].heat_flow, rel=1e-12, abs=1e-12)
        # the lines carry face-centre temperatures; the reported minimum also covers the
        # face end points (corners), so it is the same or lower
        t_min = float(m.cell_data["temperature"][1][bid == k].min())
        assert sol.surfaces[name].min_temperature <= t_min + 1e-12
    assert np.all(q[bid < 0] == 0.0)  # adiabatic faces


def test_steady_view_read_back_equals_the_written_one(steady):
    sol, out = steady
    back = read_field(out)
    ref = field_view(sol)
    np.testing.assert_array_equal(back.temperature, ref.temperature)
    np.testing.assert_array_equal(back.grid.cell_index, ref.grid.cell_index)
    np.testing.assert_array_equal(back.face_boundary, ref.face_boundary)
    np.testing.assert_allclose(back.face_ends, ref.face_ends, rtol=0, atol=1e-12)
    np.testing.assert_array_equal(back.flux, ref.flux)


def test_transient_series_and_pvd_index(transient):
    sol, out = transient
    h = sol.history
    assert h is not None and len(h.fields) == len(h.times) >= 2
    root = ET.parse(out / "fields" / "field.pvd").getroot()
    entries = [(float(d.get("timestep")), d.get("file")) for d in root.iter("DataSet")]
    assert [t for t, _ in entries] == h.times
    for (_, name), temp in zip(entries, h.fields, strict=True):
        m = meshio.read(out / "fields" / name)
        np.testing.assert_array_equal(m.cell_data["temperature"][0], temp)
    assert len({f for _, f in entries}) == len(entries)


def test_cells_csv(tmp_path, steady):
    sol, _ = steady
    path = write_cells_csv(tmp_path / "cells.csv", field_view(sol))
    with path.open(newline="", encoding="utf-8") as fh:
        rows = list(csv.DictReader(fh))
    assert len(rows) == sol.mesh.n_cells
    xy = np.array([[float(r["x_m"]), float(r["y_m"])] for r in rows])
    np.testing.assert_array_equal(xy, sol.mesh.centres)
    np.testing.assert_array_equal([float(r["temperature_C"]) for r in rows], sol.temperature)
    names = np.asarray(sol.mesh.material_names)[sol.mesh.material]
    assert [r["material"] for r in rows] == list(names)


@pytest.mark.parametrize("stem", [c.stem for c in CASES])
def test_no_temporary_files_left(tmp_path, stem):
    sol = simulate(demo(stem), keep_fields=False)
    write_fields(sol, tmp_path)
    names = [p.name for p in (tmp_path / "fields").iterdir()]
    assert not [n for n in names if n.startswith(".")]
    assert "fields.json" in names


def test_uncompressed_vtu_reads_back_like_the_compressed_one(tmp_path, steady):
    """Large fields are written with raw appended arrays (fvheat.output.vtu), small ones
    zlib-compressed through meshio: meshio (an independent reader) reads both to the same
    points, cells and cell data, bit for bit and with the same types."""
    from fvheat.output.fields import write_vtu

    view = field_view(steady[0])
    raw = meshio.read(write_vtu(tmp_path / "raw.vtu", view, compress=False))
    packed = meshio.read(write_vtu(tmp_path / "zlib.vtu", view, compress=True))
    assert b'encoding="raw"' in (tmp_path / "raw.vtu").read_bytes()[:4000]
    assert np.array_equal(raw.points, packed.points)
    assert [c.type for c in raw.cells] == [c.type for c in packed.cells] == ["quad", "line"]
    for a, b in zip(raw.cells, packed.cells, strict=True):
        assert np.array_equal(a.data, b.data)
    assert raw.cell_data.keys() == packed.cell_data.keys()
    for name, blocks in packed.cell_data.items():
        for a, b in zip(raw.cell_data[name], blocks, strict=True):
            assert a.dtype == b.dtype and np.array_equal(a, b, equal_nan=True), name
    assert np.array_equal(raw.cell_data["temperature"][0], steady[0].temperature)


def test_fvheat_reads_its_raw_vtu_as_meshio_does(tmp_path, steady):
    """fvheat.output.vtu.read_vtu reads the raw appended arrays straight from the file (fast)
    and any other VTU through meshio: the same mesh as meshio reads, bit for bit."""
    from fvheat.output.fields import write_vtu
    from fvheat.output.vtu import read_vtu

    view = field_view(steady[0])
    for compress in (False, True):
        path = write_vtu(tmp_path / f"f{compress}.vtu", view, compress=compress)
        ours, theirs = read_vtu(path), meshio.read(path)
        assert np.array_equal(ours.points, theirs.points)
        assert [(c.type, c.data.tolist()) for c in ours.cells] == [
            (c.type, c.data.tolist()) for c in theirs.cells
        ]
        for name, blocks in theirs.cell_data.items():
            for a, b in zip(ours.cell_data[name], blocks, strict=True):
                assert a.dtype == b.dtype and np.array_equal(a, b, equal_nan=True), name


@pytest.mark.parametrize("compress", [False, True])
def test_block_edges_and_empty_arrays_read_back_as_meshio_reads_them(tmp_path, compress):
    """Arrays of exactly one zlib block, of several blocks with a short last one, and an
    empty cell block: meshio (an independent reader) and fvheat's reader get the arrays
    written, bit for bit."""
    from fvheat.output.vtu import ZLIB_BLOCK, read_vtu, write_raw_vtu

    rng = np.random.default_rng(3)
    n = ZLIB_BLOCK // 8  # float64 values in one block exactly
    points, node_values = rng.random((n, 3)), rng.random(n)
    quads = rng.integers(0, n, size=(3 * n // 4 + 5, 4))
    values = rng.random(len(quads))
    path = write_raw_vtu(
        tmp_path / "f.vtu",
        points,
        [("quad", quads), ("line", np.empty((0, 2), np.int64))],
        {"t": [values, np.empty(0)]},
        {"p": node_values},
        compress=compress,
    )
    assert (b"vtkZLibDataCompressor" in path.read_bytes()[:2000]) == compress
    for mesh in (read_vtu(path), meshio.read(path)):
        assert np.array_equal(mesh.points, points)
        assert mesh.cells[0].type == "quad" and np.array_equal(mesh.cells[0].data, quads)
        assert np.array_equal(mesh.cell_data["t"][0], values)
        assert np.array_equal(mesh.point_data["p"], node_values)
