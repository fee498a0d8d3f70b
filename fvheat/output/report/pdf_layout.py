"""A small page-layout engine for the PDF report, on matplotlib's PDF backend (no system
libraries, no browser): A4 pages filled from the top, text wrapped by measured widths,
lengths in inches from the page's bottom-left corner."""

from __future__ import annotations

import functools
from collections.abc import Iterator
from dataclasses import dataclass

from matplotlib.backends.backend_pdf import PdfPages
from matplotlib.figure import Figure
from matplotlib.font_manager import FontProperties
from matplotlib.lines import Line2D
from matplotlib.textpath import TextToPath

A4 = (8.27, 11.69)  # in
MARGIN = 0.7  # in
SANS = "DejaVu Sans"  # shipped with matplotlib: the PDF looks the same on every machine
MONO = "DejaVu Sans Mono"
LEADING = 1.3  # line height / font size


@dataclass(frozen=True)
class Style:
    """Font size (pt), weight, colour, family and slant of a run of text."""

    size: float = 9.0
    weight: str = "normal"
    color: str = "#1f2328"
    family: str = SANS
    italic: bool = False

    @property
    def line_height(self) -> float:
        """Height of one line of this text, in."""
        return self.size * LEADING / 72.0


_MEASURE = TextToPath()


@functools.lru_cache(maxsize=65536)
def _width_pt(text: str, size: float, weight: str, family: str, italic: bool) -> float:
    prop = FontProperties(
        family=family, size=size, weight=weight, style="italic" if italic else "normal"
    )
    return float(_MEASURE.get_text_width_height_descent(text, prop, ismath=False)[0])


def text_width(text: str, style: Style) -> float:
    """Width of ``text`` set in ``style``, in."""
    if not text:
        return 0.0
    return _width_pt(text, style.size, style.weight, style.family, style.italic) / 72.0


def wrap(text: str, width: float, style: Style) -> list[str]:
    """``text`` broken into lines no wider than ``width`` in (a word longer than a line is
    cut); explicit line breaks kept."""
    out: list[str] = []
    for paragraph in text.split("\n"):
        line = ""
        for word in paragraph.split(" "):
            trial = f"{line} {word}" if line else word
            if text_width(trial, style) <= width + 1e-6:
                line = trial
                continue
            if line:
                out.append(line)
            pieces = list(_cut(word, width, style)) or [""]
            out.extend(pieces[:-1])
            line = pieces[-1]
        out.append(line)
    return out


def _cut(word: str, width: float, style: Style) -> Iterator[str]:
    """Pieces of ``word`` that fit ``width``; the last piece may be shorter."""
    while word:
        n = len(word)
        while n > 1 and text_width(word[:n], style) > width + 1e-6:
            n -= 1
        if n == len(word) or text_width(word, style) <= width + 1e-6:
            yield word
            return
        yield word[:n]
        word = word[n:]


class Pages:
    """A4 pages written one after the other into a PDF file; ``y`` is the top of the free
    space on the current page (in from the bottom)."""

    def __init__(self, pdf: PdfPages, footer: str) -> None:
        self.pdf = pdf
        self.footer = footer
        self.width, self.height = A4
        self.left = MARGIN
        self.right = self.width - MARGIN
        self.top = self.height - MARGIN
        self.bottom = MARGIN + 0.25  # room for the footer
        self.number = 0
        self.fig: Figure | None = None
        self.y = self.top

    @property
    def content_width(self) -> float:
        """Width between the margins, in."""
        return self.right - self.left

    @property
    def free(self) -> float:
        """Height left on the current page, in."""
        return self.y - self.bottom

    @property
    def empty(self) -> bool:
        """True when nothing has been placed on the current page yet."""
        return self.y >= self.top - 1e-9

    def page(self) -> Figure:
        """The current page (a new one if none is open)."""
        if self.fig is None:
            self.number += 1
            self.fig = Figure(figsize=A4)
            self.y = self.top
            foot = Style(size=7.0, color="#5c6370")
            self.text(self.left, MARGIN, f"{self.footer} · page {self.number}", foot)
        return self.fig

    def finish_page(self) -> None:
        """Write the current page into the PDF."""
        if self.fig is not None:
            self.pdf.savefig(self.fig)
            self.fig = None

    def need(self, height: float) -> None:
        """Start a new page unless ``height`` in fit on this one (or it is still empty)."""
        self.page()
        if height > self.free and not self.empty:
            self.finish_page()
            self.page()

    def text(self, x: float, y: float, s: str, style: Style, *, align: str = "left") -> None:
        """One line of text with its top at (x, y) in; no mathtext, no wrapping."""
        fig = self.page()
        fig.text(
            x / self.width,
            y / self.height,
            s,
            fontsize=style.size,
            fontweight=style.weight,
            fontfamily=style.family,
            fontstyle="italic" if style.italic else "normal",
            color=style.color,
            ha=align,
            va="top",
            parse_math=False,
        )

    def rule(
        self, x0: float, x1: float, y: float, *, width: float = 0.5, color: str = "#d7dbe0"
    ) -> None:
        """A horizontal line at height y from x0 to x1 (in)."""
        fig = self.page()
        fig.add_artist(
            _line([x0 / self.width, x1 / self.width], [y / self.height] * 2, width, color)
        )

    def bar(self, x: float, y0: float, y1: float, color: str) -> None:
        """A vertical bar at x from y0 to y1 (in), marking a caution or a verdict."""
        fig = self.page()
        fig.add_artist(_line([x / self.width] * 2, [y0 / self.height, y1 / self.height], 3, color))


def _line(xs: list[float], ys: list[float], width: float, color: str) -> Line2D:
    return Line2D(xs, ys, linewidth=width, color=color)
