#!/usr/bin/env python3
"""Regenerate cases/details/kestrel_undercroft_edge.dxf, the demo drawing that
cases/undercroft_slab_edge.toml takes its geometry from.

    python scripts/make_demo_drawing.py [--out FILE]

An invented junction of the invented Kestrel Quay scheme: the ground-floor slab of block C
at its edge over the open undercroft car park, in vertical section, drawn in millimetres
(room at x < 0, outside at x > 360, y upwards). Layers:

- CONCRETE: the slab with its edge beam as a HATCH (outline with a rounded arris, a
  bulged polyline segment of radius 60; two round holes where the service ducts run) and
  the wall above as a closed polyline;
- MINERAL_WOOL: the façade insulation (160) and the soffit lining (120) that follows the
  edge beam round its arris (bulged polyline);
- EPS, SCREED: the floor build-up (60 + 65);
- DUCT: two 110 mm cast-in service ducts, one block (a circle on layer 0) INSERTed twice;
- SURF_IN, SURF_FLOOR, SURF_OUT, SURF_UNDER: the surfaces (lines, one open polyline);
- NOTES, DIMS: a label and a dimension, which the case does not use.

Deterministic: fixed metadata and string hashing (ezdxf orders some objects by set
iteration), so the same ezdxf version writes the same bytes.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
from pathlib import Path

import ezdxf
from ezdxf import units

ROOT = Path(__file__).resolve().parents[1]
OUT = ROOT / "cases" / "details" / "kestrel_undercroft_edge.dxf"

#: bulge of a quarter-circle polyline segment (DXF: tan of a quarter of the included angle)
QUARTER = math.tan(math.pi / 8)
#: mm: the service ducts' centres and radius
DUCTS = ((-40.0, -170.0), (90.0, -170.0))
DUCT_RADIUS = 55.0


def build() -> ezdxf.document.Drawing:
    """The drawing, in mm."""
    doc = ezdxf.new("R2010")
    doc.units = units.MM
    for name, colour in (
        ("CONCRETE", 8),
        ("MINERAL_WOOL", 2),
        ("EPS", 3),
        ("SCREED", 9),
        ("DUCT", 4),
        ("SURF_IN", 1),
        ("SURF_FLOOR", 1),
        ("SURF_OUT", 5),
        ("SURF_UNDER", 5),
        ("NOTES", 7),
        ("DIMS", 7),
    ):
        doc.layers.add(name, color=colour)
    msp = doc.modelspace()

    # slab and edge beam, hatched; the arris at (-150, -300) rounded to r = 60
    slab = msp.add_hatch(color=8, dxfattribs={"layer": "CONCRETE"})
    slab.paths.add_polyline_path(
        [
            (-1500, 0, 0),
            (-150, 0, 0),
            (-150, -240, QUARTER),  # counter-clockwise quarter arc to the next vertex
            (-90, -300, 0),
            (200, -300, 0),
            (200, 250, 0),
            (-1500, 250, 0),
        ],
        is_closed=True,
    )
    for centre in DUCTS:  # the ducts are holes in the hatch
        slab.paths.add_edge_path().add_arc(centre, DUCT_RADIUS, 0, 360)
    wall = [(0, 250), (200, 250), (200, 1800), (0, 1800)]
    msp.add_lwpolyline(wall, close=True, dxfattribs={"layer": "CONCRETE"})

    facade = [(200, -420), (360, -420), (360, 1800), (200, 1800)]
    msp.add_lwpolyline(facade, close=True, dxfattribs={"layer": "MINERAL_WOOL"})
    lining = [
        (-1500, -120, 0),
        (-270, -120, 0),
        (-270, -420, 0),
        (200, -420, 0),
        (200, -300, 0),
        (-90, -300, -QUARTER),  # clockwise round the arris
        (-150, -240, 0),
        (-150, 0, 0),
        (-1500, 0, 0),
    ]
    msp.add_lwpolyline(lining, format="xyb", close=True, dxfattribs={"layer": "MINERAL_WOOL"})
    msp.add_lwpolyline(
        [(-1500, 250), (0, 250), (0, 310), (-1500, 310)], close=True, dxfattribs={"layer": "EPS"}
    )
    msp.add_lwpolyline(
        [(-1500, 310), (0, 310), (0, 375), (-1500, 375)],
        close=True,
        dxfattribs={"layer": "SCREED"},
    )

    duct = doc.blocks.new("DUCT110")
    duct.add_circle((0, 0), DUCT_RADIUS)  # layer 0: takes the INSERT's layer
    for centre in DUCTS:
        msp.add_blockref("DUCT110", centre, dxfattribs={"layer": "DUCT"})

    msp.add_line((0, 375), (0, 1800), dxfattribs={"layer": "SURF_IN"})
    msp.add_line((-1500, 375), (0, 375), dxfattribs={"layer": "SURF_FLOOR"})
    msp.add_line((360, -420), (360, 1800), dxfattribs={"layer": "SURF_OUT"})
    msp.add_lwpolyline(
        [(-1500, -120), (-270, -120), (-270, -420), (360, -420)],
        dxfattribs={"layer": "SURF_UNDER"},
    )

    msp.add_text(
        "KESTREL QUAY BLOCK C - SLAB EDGE OVER UNDERCROFT (INVENTED DEMO)",
        height=40,
        dxfattribs={"layer": "NOTES", "insert": (-1500, 1900)},
    )
    dim = msp.add_linear_dim(
        base=(0, 2000), p1=(0, 1800), p2=(360, 1800), dxfattribs={"layer": "DIMS"}
    )
    dim.render()
    return doc


def main(argv: list[str] | None = None) -> Path:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=OUT, help=f"DXF file (default: {OUT})")
    out = parser.parse_args(argv).out
    ezdxf.options.write_fixed_meta_data_for_testing = True
    out.parent.mkdir(parents=True, exist_ok=True)
    build().saveas(out)
    return out


def _fixed_hash_seed() -> None:
    """Run again with PYTHONHASHSEED=0 unless it is set so: ezdxf writes some objects in
    the order of a set of strings, which string hashing otherwise varies from run to run."""
    if os.environ.get("PYTHONHASHSEED") != "0":
        env = {**os.environ, "PYTHONHASHSEED": "0"}
        os.execve(
            sys.executable, [sys.executable, str(Path(__file__).resolve()), *sys.argv[1:]], env
        )


if __name__ == "__main__":
    _fixed_hash_seed()
    print(main())
