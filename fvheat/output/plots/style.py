"""The look of fvheat figures: sizes for an A4 page, colours, fonts, and saving.

Figures are plain :class:`matplotlib.figure.Figure` objects (no pyplot, no global backend
state), rendered with Agg, so plotting works headless and inside other programs.
"""

from __future__ import annotations

import io
from collections.abc import Collection, Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from fvheat.output.files import atomic_write_bytes

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

#: width of the text block of an A4 page with 20 mm margins, inches
PAGE_WIDTH = 6.7
#: tallest field plot, inches
MAX_AXES_HEIGHT = 6.4
#: resolution of PNG files, dots per inch
PNG_DPI = 200

#: temperature: perceptually uniform, readable in grey and with colour-vision deficiency
TEMPERATURE_CMAP = "cividis"
#: heat-flux magnitude (log scale)
FLUX_CMAP = "magma"
#: boundary edge colours, in the order of the case's boundaries
BOUNDARY_COLOURS = (
    "#c8553d",
    "#1d7874",
    "#6a4c93",
    "#e07a1f",
    "#3a5a80",
    "#7f8c2a",
    "#b23a6f",
    "#4c4c4c",
)
ADIABATIC_COLOUR = "#9a9a9a"
#: fill colours of materials in the mesh plot
MATERIAL_COLOURS = (
    "#d8c8a0",
    "#a9c6dd",
    "#c7d8a4",
    "#e4b7a6",
    "#c5b8da",
    "#efd98f",
    "#b3d7cb",
    "#d3d3d3",
    "#e8c4d8",
    "#bfcad6",
)
#: qualitative colour maps that extend MATERIAL_COLOURS when a figure has more materials
EXTRA_PALETTES = ("Set3", "Pastel1", "Pastel2", "tab20")


def distinct_colours(
    n: int, first: Sequence[str] = MATERIAL_COLOURS, avoid: Collection[str] = ()
) -> list[str]:
    """``n`` different fill colours (hex): ``first``, then matplotlib's qualitative maps,
    then evenly spaced pale hues; none of them in ``avoid``."""
    from matplotlib import colormaps
    from matplotlib.colors import hsv_to_rgb, to_hex

    taken = {to_hex(c) for c in avoid}
    out: list[str] = []

    def add(colour: str) -> None:
        c = to_hex(colour)
        if c not in taken:
            taken.add(c)
            out.append(c)

    for c in first:
        add(c)
    for name in EXTRA_PALETTES:
        for rgb in list(getattr(colormaps[name], "colors", ())):
            add(_hex(rgb))
    k = 0
    while len(out) < n:  # more than about 60 materials: spaced hues, then lighter rounds
        steps = max(n - len(out), 1) + 1
        for i in range(steps):
            add(_hex(hsv_to_rgb((i / steps, 0.30 + 0.05 * (k % 4), 0.93 - 0.04 * (k % 3)))))
        k += 1
    return out[:n]


def _hex(rgb: Sequence[float] | np.ndarray) -> str:
    """'#rrggbb' of red, green and blue in 0..1 (a fourth, alpha, value is ignored)."""
    r, g, b = (round(255 * min(max(float(v), 0.0), 1.0)) for v in list(rgb)[:3])
    return f"#{r:02x}{g:02x}{b:02x}"


OUTLINE_COLOUR = "#262626"
#: marker of the coldest surface point; not used anywhere else in a figure
COLDEST_COLOUR = "#ff2bd6"
LINE_COLOURS = ("#1d7874", "#c8553d", "#6a4c93", "#e07a1f", "#3a5a80", "#7f8c2a", "#b23a6f")

RC: dict[Any, Any] = {
    "font.size": 8.0,
    "axes.titlesize": 9.0,
    "axes.labelsize": 8.0,
    "xtick.labelsize": 7.5,
    "ytick.labelsize": 7.5,
    "legend.fontsize": 7.5,
    "axes.edgecolor": "#555555",
    "axes.linewidth": 0.6,
    "xtick.color": "#444444",
    "ytick.color": "#444444",
    "xtick.major.width": 0.6,
    "ytick.major.width": 0.6,
    "axes.titlelocation": "left",
    "axes.titleweight": "bold",
    "axes.spines.top": False,
    "axes.spines.right": False,
    "figure.facecolor": "white",
    "savefig.facecolor": "white",
    "svg.hashsalt": "fvheat",
    "path.simplify": True,
    # titles and names are the user's text, never markup: "$" stays a dollar sign
    "text.parse_math": False,
}


@contextmanager
def style() -> Iterator[None]:
    """Context in which fvheat figures are built (fonts, spines, colours)."""
    import matplotlib

    with matplotlib.rc_context(RC):
        yield


def new_figure(width: float, height: float) -> Figure:
    """A Figure (inches) with constrained layout and an Agg canvas."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, height), layout="constrained")
    FigureCanvasAgg(fig)
    return fig


def axes_size(dx: float, dy: float, *, extra_width: float = 1.5) -> tuple[float, float]:
    """Size (in) of a map's axes for a ``dx`` × ``dy`` (m) window at equal aspect."""
    s = min((PAGE_WIDTH - extra_width) / dx, MAX_AXES_HEIGHT / dy)
    return dx * s, dy * s


def field_size(dx: float, dy: float, *, extra_width: float = 1.5) -> tuple[float, float]:
    """Figure size (in) for a map of a ``dx`` × ``dy`` (m) window at equal aspect, with room
    for a colour bar (``extra_width``) and a legend below."""
    w, h = axes_size(dx, dy, extra_width=extra_width)
    return min(PAGE_WIDTH, max(w + extra_width, 3.6)), max(h + 1.6, 2.4)


def legend_columns(fig: Figure, labels: list[str], fontsize: float = 7.5, most: int = 4) -> int:
    """How many legend entries fit side by side across the figure."""
    entry = max((len(t) for t in labels), default=1) * 0.6 * fontsize + 3.5 * fontsize
    return int(max(1, min(most, len(labels), (0.95 * fig.get_figwidth() * 72) // entry)))


def boundary_legend(fig: Figure, handles: list) -> None:
    """The boundaries' legend below the axes (nothing when there are no handles)."""
    if not handles:
        return
    fig.legend(
        handles=handles,
        loc="outside lower center",
        ncols=legend_columns(fig, [h.get_label() for h in handles]),
        frameon=False,
        title="boundaries",
        title_fontsize=7.5,
    )


def wrap(text: str, fig: Figure, fontsize: float = 9.0, share: float = 0.95) -> str:
    """``text`` wrapped to ``share`` of the figure's width (about 0.6 em per character)."""
    import textwrap

    chars = max(20, int(share * fig.get_figwidth() * 72 / (0.6 * fontsize)))
    return "\n".join(textwrap.wrap(text, chars)) if text else text


def headings(fig: Figure, ax: Axes, title: str, subtitle: str = "", note: str = "") -> None:
    """Bold figure title, a plain subtitle above the axes (left) and a small grey note
    (right), wrapped so that they do not run into each other."""
    if title:
        fig.suptitle(wrap(title, fig, 9.5), x=0.02, ha="left", fontsize=9.5, fontweight="bold")
    if subtitle:
        share = 0.5 if note else 0.95
        ax.set_title(
            wrap(subtitle, fig, 8.0, share=share), fontsize=8.0, fontweight="normal", loc="left"
        )
    if note:
        ax.set_title(
            wrap(note, fig, 6.5, share=0.4),
            loc="right",
            fontsize=6.5,
            fontweight="normal",
            color="#555555",
        )


def save(fig: Figure, path: str | Path, *, vector: bool = True) -> list[Path]:
    """Write ``fig`` as ``path`` with suffix .png and, if ``vector``, .svg; atomically
    (see :func:`render`)."""
    return write_rendered(render(fig, vector=vector), path)


def write_rendered(files: dict[str, bytes], path: str | Path) -> list[Path]:
    """Write rendered ``files`` ({suffix: bytes}) as ``path`` with each suffix, atomically."""
    path = Path(path)
    return [atomic_write_bytes(path.with_suffix(k), v) for k, v in files.items()]


def render(fig: Figure, *, vector: bool = True) -> dict[str, bytes]:
    """``fig`` as PNG and, if ``vector``, SVG bytes by suffix. The layout is computed once,
    for the PNG, and reused for the SVG."""
    out = {}
    for suffix, opts in (
        (".png", {"dpi": PNG_DPI}),
        (".svg", {"dpi": PNG_DPI, "metadata": {"Date": None}}),
    ):
        if suffix == ".svg":
            if not vector:
                break
            fig.set_layout_engine("none")
        buf = io.BytesIO()
        with style(), _no_layout_draw(fig, suffix == ".svg"):  # style: e.g. the SVG's id salt
            fig.savefig(buf, format=suffix[1:], **opts)
        out[suffix] = buf.getvalue()
    return out


@contextmanager
def _no_layout_draw(fig: Figure, fixed: bool) -> Iterator[None]:
    """With ``fixed`` (the layout already computed and switched off): hide the figure's
    placeholder layout engine while saving. matplotlib draws the whole figure once more
    (drawing switched off, images resampled all the same) before saving any figure that
    has a layout engine, only to place the axes; with the layout fixed that draw changes
    nothing and costs about 40 % of an SVG of a map."""
    from matplotlib.layout_engine import PlaceHolderLayoutEngine

    engine = getattr(fig, "_layout_engine", None)
    if not fixed or not isinstance(engine, PlaceHolderLayoutEngine):
        yield
        return
    fig._layout_engine = None  # type: ignore[attr-defined]  # private: restored below
    try:
        yield
    finally:
        fig._layout_engine = engine  # type: ignore[attr-defined]
