"""Geometry from a drawing and the case's length unit, checked against the typed-coordinate
demo case: the same junction drawn in a DXF (in mm and in m) or typed in mm must give the
same results as the typed metre case (cases/balcony_slab.toml)."""

from __future__ import annotations

import copy
import hashlib
import json
import tomllib
from pathlib import Path

import numpy as np
import pytest
from casefiles import write_case
from drawings import line, new_drawing, rectangle, save

from fvheat.case.load import load_case, parse_case
from fvheat.case.model import Case
from fvheat.cli.main import main
from fvheat.mesh.rectilinear import build_mesh
from fvheat.study import Study, run_study

BALCONY = Path(__file__).resolve().parents[2] / "cases" / "balcony_slab.toml"


def balcony() -> dict:
    with BALCONY.open("rb") as f:
        return tomllib.load(f)


def in_mm(v):
    """A length in metres written in mm (rounded to the nm so 0.36 m becomes 360.0)."""
    if isinstance(v, list):
        return [in_mm(x) for x in v]
    return round(v * 1000.0, 9)


def balcony_in_mm(data: dict) -> dict:
    """The balcony case with every length it types written in mm; the keys are listed here
    one by one from the case file, independently of fvheat's own list."""
    d = copy.deepcopy(data)
    for key in ("max_cell", "min_cell", "corner_cell"):
        if key in d["mesh"]:
            d["mesh"][key] = in_mm(d["mesh"][key])
    for r in d["regions"]:
        for key in ("box", "polygon"):
            if key in r:
                r[key] = in_mm(r[key])
    for b in d["boundaries"]:
        if "edges" in b:
            b["edges"] = in_mm(b["edges"])
    for p in d.get("probes", []):
        p["at"] = in_mm(p["at"])
    for p in d.get("probe_lines", []):
        p["start"], p["end"] = in_mm(p["start"]), in_mm(p["end"])
    j = d["junction"]
    for key in ("centre", "frame_width"):
        if key in j:
            j[key] = in_mm(j[key])
    for f in j["flanking"]:
        for key in ("length", "cut", "thickness"):
            if key in f:
                f[key] = in_mm(f[key])
    return d


def balcony_drawn(folder: Path, scale: float) -> dict:
    """The balcony case with its boxes and boundary segments drawn with ezdxf on layers
    R0, R1, ... and B0, B1, ... (drawing units: m times ``scale``)."""
    data = balcony()
    doc, msp = new_drawing()
    for i, r in enumerate(data["regions"]):
        rectangle(msp, f"R{i}", r.pop("box"), scale)
        r["layer"] = f"R{i}"
    for i, b in enumerate(data["boundaries"]):
        for a, c in b.pop("edges"):
            line(msp, f"B{i}", a, c, scale)
        b["layer"] = f"B{i}"
    name = f"balcony_{scale:g}.dxf"
    save(doc, folder / name)
    data["geometry"] = {"drawing": name, "units": "m" if scale == 1 else "mm"}
    return balcony_in_mm(data) if scale == 1000 else data


def results(study: Study) -> dict[str, float]:
    s, j = study.solution, study.junction
    assert j is not None
    out = {f"heat_flow_{n}": r.heat_flow for n, r in s.surfaces.items()}
    out |= {f"probe_{n}": t for n, t in s.probes.items()}
    out |= {"L2D": j.l2d, "psi": j.psi, "f_Rsi": j.f_rsi, "theta_si_min": j.theta_si_min}
    return out


@pytest.fixture(scope="module")
def typed() -> tuple[Case, dict[str, float]]:
    case = load_case(BALCONY)
    return case, results(run_study(case, check_grid=False))


@pytest.mark.parametrize("scale", [1000, 1], ids=["drawing in mm", "drawing in m"])
def test_drawn_balcony_equals_typed(tmp_path, typed, scale):
    """Source: the typed case itself (same geometry, exact drawing coordinates); heat flows,
    probes, L2D, ψ, f_Rsi and θ_si,min agree to 1e-9 relative and the mesh is the same."""
    case = parse_case(balcony_drawn(tmp_path, scale), tmp_path / "case.toml")
    ref_case, ref = typed
    assert [r.material for r in case.regions] == [r.material for r in ref_case.regions]
    study = run_study(case, check_grid=False)
    assert study.solution.mesh.n_cells == build_mesh(ref_case).n_cells
    got = results(study)
    assert got.keys() == ref.keys()
    for key, value in ref.items():
        assert got[key] == pytest.approx(value, rel=1e-9), key


def test_typed_mm_case_equals_metres(tmp_path):
    """Source: the metre case. The balcony case with extra length keys (corner_cell, a probe
    line, frame_width, flanking thickness), typed once in m and once in mm with
    [geometry] units = "mm", loads to the same lengths and gives the same results (1e-9)."""
    data = balcony()
    data["mesh"]["corner_cell"] = 0.002
    data["probe_lines"] = [{"name": "slab", "start": [-1.2, 0.11], "end": [1.5, 0.11]}]
    data["junction"]["frame_width"] = 0.12
    data["junction"]["flanking"][0]["thickness"] = 0.36
    metres = parse_case(data, tmp_path / "m.toml")
    mm = balcony_in_mm(data)
    mm["geometry"] = {"units": "mm"}
    millimetres = parse_case(mm, tmp_path / "mm.toml")

    for key in ("max_cell", "min_cell", "corner_cell"):
        assert getattr(millimetres.mesh, key) == pytest.approx(getattr(metres.mesh, key), 1e-12)
    for a, b in zip(millimetres.regions, metres.regions, strict=True):
        np.testing.assert_allclose(a.vertices, b.vertices, rtol=1e-12)
    for a, b in zip(millimetres.boundaries, metres.boundaries, strict=True):
        np.testing.assert_allclose(np.array(a.edges), np.array(b.edges), rtol=1e-12)
    assert millimetres.probes == metres.probes
    assert millimetres.probe_lines == metres.probe_lines
    jm, jr = millimetres.junction, metres.junction
    assert (jm.centre, jm.frame_width) == (jr.centre, jr.frame_width)
    assert jm.flanking == jr.flanking

    got = run_study(millimetres, check_grid=False)
    ref = run_study(metres, check_grid=False)
    for key, value in results(ref).items():
        assert results(got)[key] == pytest.approx(value, rel=1e-9), key
    assert got.junction.u_f == pytest.approx(ref.junction.u_f, rel=1e-9)


def test_mm_message_says_lengths_are_converted(tmp_path):
    """An error quoting a converted length says the message is in m."""
    data = balcony_in_mm(balcony())
    data["geometry"] = {"units": "mm"}
    data["mesh"]["min_cell"] = 80.0
    with pytest.raises(Exception) as err:
        parse_case(data, tmp_path / "case.toml")
    text = str(err.value)
    assert "mesh.min_cell" in text and "0.08 m" in text and "converted" in text


def test_summary_records_the_drawing(tmp_path):
    """summary.json and inputs.json name the drawing, its SHA-256 and the units."""
    doc, msp = new_drawing()
    rectangle(msp, "WALL", (0, 0, 200, 1000))
    line(msp, "IN", (0, 0), (0, 1000))
    line(msp, "OUT", (200, 0), (200, 1000))
    dxf = save(doc, tmp_path / "wall.dxf")
    case = write_case(
        tmp_path,
        """
        [geometry]
        drawing = "wall.dxf"
        units = "mm"
        [mesh]
        max_cell = 50
        [[regions]]
        name = "wall"
        layer = "WALL"
        material = "clay_brick"
        [[boundaries]]
        name = "in"
        layer = "IN"
        air_temperature = 20
        resistance = 0.13
        [[boundaries]]
        name = "out"
        layer = "OUT"
        air_temperature = 0
        resistance = 0.04
        """,
    )
    assert main(["run", str(case), "-o", str(tmp_path / "out"), "-q", "--no-plots"]) == 0
    digest = hashlib.sha256(dxf.read_bytes()).hexdigest()
    for name in ("summary.json", "inputs.json"):
        geometry = json.loads((tmp_path / "out" / name).read_text())["geometry"]
        assert geometry == {"units": "mm", "drawing": str(dxf), "drawing_sha256": digest}
