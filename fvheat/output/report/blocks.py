"""The pieces a report is made of, independent of its format (HTML, Markdown, PDF), and the
number formats every section shares."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any


@dataclass(frozen=True)
class Para:
    """A paragraph; ``kind`` is "text", "note", "caution", "pass" or "fail"."""

    text: str
    kind: str = "text"


@dataclass(frozen=True)
class Table:
    """A table of strings; ``numeric`` marks columns of numbers (aligned on the right)."""

    header: list[str]
    rows: list[list[str]]
    numeric: list[bool] | None = None


@dataclass(frozen=True)
class Figure:
    """An image file relative to the results folder, with its caption."""

    png: str
    caption: str


@dataclass(frozen=True)
class Code:
    """Preformatted text shown folded, e.g. the case file."""

    text: str
    label: str


Block = Para | Table | Figure | Code


@dataclass
class Section:
    """A headed section: ``ident`` is its anchor, ``level`` 2 or 3."""

    ident: str
    title: str
    level: int = 2
    blocks: list[Block] = field(default_factory=list)


@dataclass
class Document:
    """A whole report: its title, a one-line subtitle and the sections in reading order."""

    title: str
    subtitle: str
    sections: list[Section]


def num(v: Any, fmt: str = ".4g", unit: str = "") -> str:
    """A number formatted with ``fmt`` and ``unit``, or '–' for None; booleans as yes/no."""
    if v is None:
        return "–"
    if isinstance(v, bool):
        return "yes" if v else "no"
    return f"{v:{fmt}}" + (f" {unit}" if unit else "")


def point(p: Sequence[float] | None) -> str:
    """'(x, y) m' with millimetre resolution (m), or '–' for None."""
    return "–" if p is None else f"({p[0]:.3f}, {p[1]:.3f}) m"


def hours(seconds: float) -> str:
    """A time in s shown in hours: '6 h'."""
    return num(seconds / 3600, ".4g", "h")
