"""Bad drawings and bad layer mappings: one line naming the case file, the key, the drawing,
the layer and the entity handle; through the CLI exit code 2 and no traceback."""

from __future__ import annotations

import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path

import pytest
from casefiles import write_case
from drawings import line, new_drawing, rectangle, save

from fvheat.case.load import load_case
from fvheat.errors import CaseError


def case_text(
    drawing: str = "d.dxf",
    units: str = "mm",
    region: str = 'layer = "WALL"',
    boundary: str = 'layer = "IN"',
) -> str:
    return f"""
        [geometry]
        drawing = "{drawing}"
        units = "{units}"
        [mesh]
        max_cell = 50
        [[regions]]
        name = "wall"
        {region}
        material = "clay_brick"
        [[boundaries]]
        name = "in"
        {boundary}
        air_temperature = 20
        resistance = 0.13
        [[boundaries]]
        name = "out"
        edges = [[[200, 0], [200, 1000]]]
        air_temperature = 0
        resistance = 0.04
        """


@dataclass
class Bad:
    """A bad case: its file, the key the message must name and the words it must hold."""

    case: Path
    key: str
    words: tuple[str, ...]


def wall(msp, scale: float = 1.0) -> None:
    """The base drawing: a 200 mm × 1 m wall on WALL and its inside surface on IN."""
    rectangle(msp, "WALL", (0, 0, 200, 1000), scale)
    line(msp, "IN", (0, 0), (0, 1000), scale)


def build(folder: Path) -> dict[str, Bad]:
    """Every bad case in its own folder under ``folder``."""
    out: dict[str, Bad] = {}

    def add(name: str, doc, text: str, key: str, *words: str, dxf: str = "d.dxf") -> None:
        sub = folder / name
        sub.mkdir()
        if doc is not None:
            save(doc, sub / dxf)
        out[name] = Bad(write_case(sub, text), key, words)

    doc, msp = new_drawing()
    a = msp.add_line((0, 0), (200, 0), dxfattribs={"layer": "GAP"})
    msp.add_line((200, 0), (200, 1000), dxfattribs={"layer": "GAP"})
    msp.add_line((200, 1000), (0, 1000), dxfattribs={"layer": "GAP"})
    b = msp.add_line((0, 999.5), (0, 0), dxfattribs={"layer": "GAP"})
    line(msp, "IN", (0, 0), (0, 1000))
    add(
        "open outline",
        doc,
        case_text(region='layer = "GAP"'),
        "regions.0.layer",
        "d.dxf",
        "layer 'GAP'",
        f"#{b.dxf.handle}",
        "is open: gap of 0.5 mm",
        "(0, 999.5) mm",
        "(0, 1000) mm",
    )
    assert a.dxf.handle  # the other loose end's entity is named too (checked by the words)

    doc, msp = new_drawing()
    bow = msp.add_lwpolyline(
        [(0, 0), (200, 1000), (200, 0), (0, 1000)], close=True, dxfattribs={"layer": "WALL"}
    )
    line(msp, "IN", (0, 0), (0, 1000))
    add(
        "self-intersecting",
        doc,
        case_text(),
        "regions.0.layer",
        "d.dxf",
        "layer 'WALL'",
        f"LWPOLYLINE #{bow.dxf.handle}",
        "intersects itself at (100, 500) mm",
    )

    doc, msp = new_drawing()
    for a0, b0 in (((0, 0), (200, 0)), ((200, 0), (0, 1000)), ((200, 0), (200, 1000))):
        line(msp, "FORK", a0, b0)
    first = msp.query("LINE[layer=='FORK']").first
    line(msp, "IN", (0, 0), (0, 1000))
    add(
        "branching lines",
        doc,
        case_text(region='layer = "FORK"'),
        "regions.0.layer",
        "layer 'FORK'",
        f"#{first.dxf.handle}",
        "3 line ends meet at (200, 0) mm",
    )

    doc, msp = new_drawing()
    wall(msp)
    doc.layers.add("CONCRETE")
    add(
        "unknown layer",
        doc,
        case_text(region='layer = "CONCRET"'),
        "regions.0.layer",
        "d.dxf",
        "no layer 'CONCRET'",
        "did you mean 'CONCRETE'?",
        "its layers: 0, Defpoints, CONCRETE, WALL, IN",
    )

    doc, msp = new_drawing()
    wall(msp)
    msp.add_text("note", dxfattribs={"layer": "NOTES"})
    add(
        "region layer without shapes",
        doc,
        case_text(region='layer = "NOTES"'),
        "regions.0.layer",
        "d.dxf",
        "layer 'NOTES' has no closed shapes",
        "TEXT 1",
    )

    doc, msp = new_drawing()
    wall(msp)
    hatch = msp.add_hatch(dxfattribs={"layer": "FILL"})
    hatch.paths.add_polyline_path([(0, 0), (10, 0), (10, 10)], is_closed=True)
    add(
        "boundary layer without lines",
        doc,
        case_text(boundary='layer = "FILL"'),
        "boundaries.0.layer",
        "d.dxf",
        "layer 'FILL' has no lines for a boundary",
        "HATCH 1",
    )

    add(
        "missing drawing",
        None,
        case_text(drawing="details/none.dxf"),
        "geometry.drawing",
        "details/none.dxf",
        "drawing file not found",
    )

    sub = folder / "not dxf"
    sub.mkdir()
    (sub / "d.dxf").write_text("hello, this is not a drawing\n", encoding="utf-8")
    out["not dxf"] = Bad(
        write_case(sub, case_text()), "geometry.drawing", ("d.dxf", "not a DXF drawing")
    )

    doc, msp = new_drawing()
    wall(msp)
    full = folder / "full.dxf"
    save(doc, full)
    text = full.read_text(encoding="utf-8")
    sub = folder / "truncated"
    sub.mkdir()
    (sub / "d.dxf").write_text(text[: len(text) // 2], encoding="utf-8")
    out["truncated"] = Bad(
        write_case(sub, case_text()), "geometry.drawing", ("d.dxf", "damaged or truncated DXF")
    )

    sub = folder / "dwg"
    sub.mkdir()
    (sub / "d.dxf").write_bytes(b"AC1032" + bytes(100))
    out["dwg"] = Bad(write_case(sub, case_text()), "geometry.drawing", ("d.dxf", "DWG"))

    doc, msp = new_drawing()
    wall(msp)
    add(
        "mm drawing read as m",
        doc,
        case_text(units="m").replace("max_cell = 50", "max_cell = 0.05"),
        "regions.0.layer",
        "d.dxf",
        "span 200 m × 1000 m",
        'is the drawing in mm? set [geometry] units = "mm"',
    )

    doc, msp = new_drawing()
    wall(msp, scale=0.001)
    add(
        "m drawing read as mm",
        doc,
        case_text(),
        "regions.0.layer",
        "d.dxf",
        "span 0.0002 m × 0.001 m",
        'is the drawing in m? set [geometry] units = "m"',
    )

    doc, msp = new_drawing()
    thick = msp.add_lwpolyline(
        [(0, 0), (30, 0), (30, 30), (0, 30)], close=True, dxfattribs={"layer": "WALL"}
    )
    line(msp, "IN", (0, 0), (0, 30))
    add(
        "region thicker than 20 m",
        doc,
        case_text(units="m")
        .replace("max_cell = 50", "max_cell = 1")
        .replace("[[200, 0], [200, 1000]]", "[[30, 0], [30, 30]]"),
        "regions.0.layer",
        "d.dxf",
        f"LWPOLYLINE #{thick.dxf.handle}",
        "the shape is 30 m thick",
        'units = "mm"',
    )

    sub = folder / "no drawing"
    sub.mkdir()
    text = case_text().replace('drawing = "d.dxf"\n', "")
    out["no drawing"] = Bad(write_case(sub, text), "regions.0.layer", ("a layer needs a drawing",))

    doc, msp = new_drawing()
    wall(msp)
    add(
        "box and layer",
        doc,
        case_text(region='layer = "WALL"\nbox = [0, 0, 200, 1000]'),
        "regions.0",
        "exactly one of box",
        "got box and layer",
    )
    return out


@pytest.fixture(scope="module")
def bad(tmp_path_factory) -> dict[str, Bad]:
    return build(tmp_path_factory.mktemp("bad"))


NAMES = [
    "open outline",
    "self-intersecting",
    "branching lines",
    "unknown layer",
    "region layer without shapes",
    "boundary layer without lines",
    "missing drawing",
    "not dxf",
    "truncated",
    "dwg",
    "mm drawing read as m",
    "m drawing read as mm",
    "region thicker than 20 m",
    "no drawing",
    "box and layer",
]


@pytest.mark.parametrize("name", NAMES)
def test_message(bad, name):
    """load_case raises one line: CASE: key: ... with the drawing, layer and handle."""
    b = bad[name]
    with pytest.raises(CaseError) as err:
        load_case(b.case)
    text = str(err.value)
    assert "\n" not in text
    assert text.startswith(f"{b.case}: {b.key}: "), text
    for word in b.words:
        assert word in text, (word, text)


@pytest.fixture(scope="module")
def cli_runs(bad) -> dict[str, subprocess.CompletedProcess]:
    """`fvheat check` on every bad case, the processes started together."""
    procs = {
        name: subprocess.Popen(
            [sys.executable, "-m", "fvheat", "check", str(bad[name].case)],
            stdout=subprocess.PIPE,
            stderr=subprocess.PIPE,
            text=True,
        )
        for name in NAMES
    }
    out = {}
    for name, p in procs.items():
        stdout, stderr = p.communicate(timeout=120)
        out[name] = subprocess.CompletedProcess(p.args, p.returncode, stdout, stderr)
    return out


@pytest.mark.parametrize("name", NAMES)
def test_cli_exit_code_2(bad, cli_runs, name):
    """Through the CLI: exit 2, one line on stderr naming file and key, no traceback."""
    run, b = cli_runs[name], bad[name]
    assert run.returncode == 2, run.stderr
    lines = run.stderr.strip().splitlines()
    assert len(lines) == 1, run.stderr
    assert lines[0].startswith(f"fvheat: error: {b.case}: {b.key}: ")
    assert "Traceback" not in run.stderr + run.stdout
