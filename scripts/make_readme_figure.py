#!/usr/bin/env python3
"""Regenerate docs/balcony_slab_temperature.png, the figure shown in the README: the
temperature map of the demo balcony junction (cases/balcony_slab.toml), zoomed on the slab
edge, with the θ_si,min of the junction evaluation marked.

    python scripts/make_readme_figure.py

Deterministic for a given matplotlib version (no time stamp or software tag in the PNG).
"""

from __future__ import annotations

import io
from pathlib import Path

from fvheat.case.load import load_case
from fvheat.output.files import atomic_write
from fvheat.output.plots.temperature import coldest_point, temperature_figure
from fvheat.output.summary import build_summary
from fvheat.output.view import field_view
from fvheat.study import run_study

ROOT = Path(__file__).resolve().parents[1]
CASE = ROOT / "cases" / "balcony_slab.toml"
OUT = ROOT / "docs" / "balcony_slab_temperature.png"
#: the junction and a metre of slab and wall around it, m
WINDOW = (-0.7, -0.7, 1.1, 0.95)
DPI = 150


def main() -> Path:
    case = load_case(CASE)
    study = run_study(case)
    fig = temperature_figure(
        field_view(study.solution),
        title=case.title,
        subtitle="steady state, detail at the slab edge (demo case)",
        marked=coldest_point(build_summary(study)),
        zoom=WINDOW,
        caption="Screening result: to be checked by a competent person.",
    )
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=DPI, metadata={"Software": None})
    return atomic_write(OUT, lambda fh: fh.write(buf.getvalue()), binary=True)


if __name__ == "__main__":
    print(main())
