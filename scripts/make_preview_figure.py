#!/usr/bin/env python3
"""Regenerate docs/balcony_slab_preview.png, the geometry preview shown in the README: the
demo balcony junction (cases/balcony_slab.toml) as the mesher painted it, before any solve,
exactly as

    fvheat check cases/balcony_slab.toml --plot docs/balcony_slab_preview.png

draws it. Run ``python scripts/make_preview_figure.py``. Deterministic for a given
matplotlib version (no time stamp or software tag in the PNG).
"""

from __future__ import annotations

from pathlib import Path

from fvheat.case.load import load_case
from fvheat.mesh.rectilinear import build_mesh
from fvheat.output.plots.preview import write_preview

ROOT = Path(__file__).resolve().parents[1]
CASE = ROOT / "cases" / "balcony_slab.toml"
OUT = ROOT / "docs" / "balcony_slab_preview.png"


def main() -> Path:
    case = load_case(CASE)
    return write_preview(case, build_mesh(case), OUT)


if __name__ == "__main__":
    print(main())
