"""The report as an A4 PDF with the same content as the HTML report, drawn with matplotlib
(already a dependency: nothing to install, no browser). Tables never split inside a row
(a table that runs on repeats its header), figures are scaled to fit the page, and text
is embedded as TrueType so that it can be searched and copied."""

from __future__ import annotations

from pathlib import Path

import matplotlib
from matplotlib.backends.backend_pdf import PdfPages
from matplotlib.image import imread

from fvheat.output.files import atomic_write_file
from fvheat.output.report.blocks import Block, Code, Document, Figure, Para, Section, Table
from fvheat.output.report.pdf_layout import MONO, Pages, Style, text_width, wrap

ACCENT = "#1d7874"
BODY = Style()
PARA_STYLES = {
    "text": BODY,
    "note": Style(color="#5c6370", italic=True),
    "caution": BODY,
    "pass": Style(color="#2d7a3e"),
    "fail": Style(color="#b3261e", weight="bold"),
}
BAR_COLOURS = {"caution": "#b5651d", "pass": "#2d7a3e", "fail": "#b3261e"}
CELL = Style(size=7.5)
HEAD = Style(size=7.5, weight="bold")
CODE = Style(size=6.5, family=MONO)
GAP = 0.08  # in, space after a block
PAD = 0.06  # in, space between table columns
SHRINK = 0.5  # a figure is scaled down to this fraction to stay on the current page
KEEP = 1.2  # in, kept free below a heading that opens sections without text of its own


def render_pdf(doc: Document, root: str | Path, path: str | Path) -> Path:
    """Write ``doc`` as a PDF to ``path`` (atomically); figures are read from ``root``."""
    root = Path(root)

    def write(tmp: Path) -> None:
        """Lay out every section into the temporary file ``tmp``."""
        with matplotlib.rc_context({"pdf.fonttype": 42}):
            with PdfPages(tmp, metadata={"Title": doc.title, "Creator": "fvheat"}) as pdf:
                pages = Pages(pdf, doc.title)
                _front(pages, doc)
                for sec in doc.sections:
                    _heading(pages, sec)
                    for block in sec.blocks:
                        _block(pages, block, root)
                pages.finish_page()

    return atomic_write_file(path, write)


def _block(pages: Pages, block: Block, root: Path) -> None:
    if isinstance(block, Para):
        _para(pages, block)
    elif isinstance(block, Table):
        _table(pages, block)
    elif isinstance(block, Figure):
        _figure(pages, block, root)
    elif isinstance(block, Code):
        _code(pages, block)


def _lines(pages: Pages, lines: list[str], style: Style, x: float | None = None) -> None:
    """Lines of text from the top of the free space, each moved to a new page if needed."""
    for line in lines:
        pages.need(style.line_height)
        pages.text(pages.left if x is None else x, pages.y, line, style)
        pages.y -= style.line_height


def _front(pages: Pages, doc: Document) -> None:
    title = Style(size=16, weight="bold")
    _lines(pages, wrap(doc.title, pages.content_width, title), title)
    sub = Style(color="#5c6370")
    _lines(pages, wrap(doc.subtitle, pages.content_width, sub), sub)
    pages.rule(pages.left, pages.right, pages.y - 0.04, width=2.0, color=ACCENT)
    pages.y -= 0.15  # the cautions follow in the summary, the first section


def _heading(pages: Pages, sec: Section) -> None:
    style = Style(size=13 if sec.level == 2 else 10.5, weight="bold", color=ACCENT)
    lines = wrap(sec.title, pages.content_width, style)
    # a heading stays with at least a few lines of what follows it
    keep = 4 * BODY.line_height + (0.0 if sec.blocks else KEEP)
    pages.need(0.12 + len(lines) * style.line_height + keep)
    if not pages.empty:
        pages.y -= 0.12
    _lines(pages, lines, style)
    if sec.level == 2:
        pages.rule(pages.left, pages.right, pages.y + 0.02)
    pages.y -= 0.04


def _para(pages: Pages, p: Para) -> None:
    style = PARA_STYLES.get(p.kind, BODY)
    indent = 0.12 if p.kind in BAR_COLOURS else 0.0
    lines = wrap(p.text, pages.content_width - indent, style)
    for line in lines:
        pages.need(style.line_height)
        top = pages.y
        pages.text(pages.left + indent, top, line, style)
        pages.y -= style.line_height
        if indent:
            pages.bar(pages.left + 0.03, pages.y, top, BAR_COLOURS[p.kind])
    pages.y -= GAP


def column_widths(t: Table, avail: float) -> list[float]:
    """Column widths (in) summing to at most ``avail``: each column's widest cell when that
    fits, else the space shared out so that narrow columns keep their width and wide ones
    wrap (never below their longest word)."""
    cells = [t.header, *t.rows]
    n = len(t.header)
    natural = [
        max(text_width(r[i] if i < len(r) else "", HEAD if r is t.header else CELL) for r in cells)
        + PAD
        for i in range(n)
    ]
    least = [
        max(
            text_width(w, HEAD if r is t.header else CELL)
            for r in cells
            if i < len(r)
            for w in r[i].split(" ")
        )
        + PAD
        for i in range(n)
    ]
    if sum(natural) <= avail:
        return natural
    widths = [min(least[i], natural[i]) for i in range(n)]  # no word cut where avoidable
    if sum(widths) >= avail:
        return [w * avail / sum(widths) for w in widths]
    # the rest of the width goes to the columns in proportion to what they still lack
    lack = [natural[i] - widths[i] for i in range(n)]
    spare = avail - sum(widths)
    return [w + spare * d / sum(lack) for w, d in zip(widths, lack, strict=True)]


def _row(cells: list[str], widths: list[float], style: Style) -> tuple[list[list[str]], float]:
    """The cells wrapped to their columns, and the row's height (in)."""
    wrapped = [wrap(c, max(w - PAD, 0.1), style) for c, w in zip(cells, widths, strict=False)]
    height = max(len(w) for w in wrapped) * style.line_height + 0.04
    return wrapped, height


def _table(pages: Pages, t: Table) -> None:
    widths = column_widths(t, pages.content_width)
    numeric = t.numeric or [False] * len(t.header)
    head, head_h = _row(t.header, widths, HEAD)
    first = True
    for cells in t.rows:
        lines, h = _row(cells, widths, CELL)
        if first or h > pages.free:
            pages.need((head_h if any(t.header) else 0.0) + h)  # never a header alone
            if any(t.header):
                _draw_row(pages, head, widths, numeric, HEAD, head_h)
                pages.rule(
                    pages.left, pages.left + sum(widths), pages.y, width=1.0, color="#1f2328"
                )
            first = False
        _draw_row(pages, lines, widths, numeric, CELL, h)
        pages.rule(pages.left, pages.left + sum(widths), pages.y)
    pages.y -= GAP + 0.04


def _draw_row(
    pages: Pages,
    lines: list[list[str]],
    widths: list[float],
    numeric: list[bool],
    style: Style,
    height: float,
) -> None:
    x = pages.left
    for cell, w, right in zip(lines, widths, numeric, strict=False):
        y = pages.y - 0.02
        for line in cell:
            if right:
                pages.text(x + w - PAD, y, line, style, align="right")
            else:
                pages.text(x, y, line, style)
            y -= style.line_height
        x += w
    pages.y -= height


def _figure(pages: Pages, f: Figure, root: Path) -> None:
    image = imread(root / f.png)
    h_px, w_px = image.shape[:2]
    caption = Style(size=7.5, color="#5c6370")
    width = pages.content_width
    cap_lines = wrap(f.caption, width, caption)
    cap_h = len(cap_lines) * caption.line_height
    room = pages.top - pages.bottom - cap_h - 0.1  # the most an image may take on a page
    height = width * h_px / w_px
    if height > room:
        width, height = width * room / height, room
    fits = pages.free - cap_h - 0.1  # shrink a little rather than leave half a page empty
    if height > fits >= SHRINK * height:
        width, height = width * fits / height, fits
    pages.need(height + cap_h + 0.1)
    fig = pages.page()
    ax = fig.add_axes(
        (
            pages.left / pages.width,
            (pages.y - height) / pages.height,
            width / pages.width,
            height / pages.height,
        )
    )
    ax.imshow(image, interpolation="antialiased")
    ax.set_axis_off()
    pages.y -= height + 0.05
    _lines(pages, cap_lines, caption)
    pages.y -= GAP


def _code(pages: Pages, c: Code) -> None:
    _lines(pages, wrap(c.label + ":", pages.content_width, BODY), BODY)
    per_line = max(int(pages.content_width / text_width("M", CODE)), 20)
    lines: list[str] = []
    for raw in c.text.rstrip("\n").split("\n"):
        raw = raw.replace("\t", "    ")
        lines += [raw[i : i + per_line] for i in range(0, max(len(raw), 1), per_line)]
    _lines(pages, lines, CODE)
    pages.y -= GAP
