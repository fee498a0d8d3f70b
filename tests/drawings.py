"""Drawings written by tests with ezdxf (independent of fvheat's reader)."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

import ezdxf

Point = tuple[float, float]


def new_drawing() -> tuple[ezdxf.document.Drawing, object]:
    """A new R2010 drawing and its model space."""
    doc = ezdxf.new("R2010")
    return doc, doc.modelspace()


def rectangle(msp, layer: str, box: Sequence[float], scale: float = 1.0) -> None:
    """A closed LWPOLYLINE around ``box`` = (x0, y0, x1, y1), times ``scale``."""
    x0, y0, x1, y1 = (scale * v for v in box)
    msp.add_lwpolyline(
        [(x0, y0), (x1, y0), (x1, y1), (x0, y1)], close=True, dxfattribs={"layer": layer}
    )


def line(msp, layer: str, a: Point, b: Point, scale: float = 1.0) -> None:
    """A LINE from ``a`` to ``b``, times ``scale``."""
    msp.add_line(
        (scale * a[0], scale * a[1]), (scale * b[0], scale * b[1]), dxfattribs={"layer": layer}
    )


def save(doc: ezdxf.document.Drawing, path: Path) -> Path:
    doc.saveas(path)
    return path
