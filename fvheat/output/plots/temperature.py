"""The temperature map: field over the real geometry, isotherms, boundaries, coldest point."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from fvheat.output.plots import layers, raster, style
from fvheat.output.triangle_view import AnyFieldView

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

COLDEST_GID = "coldest-point"


@dataclass(frozen=True)
class Marked:
    """A point to mark on a map: position (m), value (°C) and its label."""

    x: float
    y: float
    value: float
    label: str


def coldest_point(summary: dict[str, Any]) -> Marked | None:
    """The coldest inside-surface point of a run summary: the junction's θ_si,min when a
    junction is declared, otherwise the lowest ``min_temperature`` over all boundaries."""
    j = summary.get("junction")
    if j is not None and "theta_si_min_at" in j:
        x, y = j["theta_si_min_at"]
        return Marked(float(x), float(y), float(j["theta_si_min"]), "θ_si,min")
    bounds = summary.get("boundaries") or {}
    if not bounds:
        return None
    name = min(bounds, key=lambda n: bounds[n]["min_temperature"])
    x, y = bounds[name]["min_at"]
    return Marked(float(x), float(y), float(bounds[name]["min_temperature"]), f"min θ_s {name}")


def time_label(t: float) -> str:
    """'t = 36 h' style label of a time in s (days beyond four days)."""
    if t >= 4 * 86400:
        return f"t = {t / 86400:.4g} d"
    return f"t = {t / 3600:.4g} h"


def temperature_figure(
    view: AnyFieldView,
    *,
    title: str = "",
    subtitle: str = "",
    marked: Marked | None = None,
    vrange: tuple[float, float] | None = None,
    zoom: layers.Window | None = None,
    caption: str = "",
) -> Figure:
    """The temperature map of ``view`` (°C) as a Figure.

    ``vrange`` fixes the colour range (°C), ``zoom`` the window (x0, y0, x1, y1) m;
    ``marked`` is drawn as a diamond labelled with its value (gid ``coldest-point``).
    """
    with style.style():
        window = layers.window_of(view, zoom)
        x0, y0, x1, y1 = window
        fig = style.new_figure(*style.field_size(x1 - x0, y1 - y0))
        ax = fig.add_subplot()
        lo, hi = vrange if vrange is not None else _range(view, window)
        from matplotlib.colors import Normalize

        norm = Normalize(lo, hi)
        quad = layers.draw_cells(
            ax, view, view.temperature, window=window, cmap=style.TEMPERATURE_CMAP, norm=norm
        )
        levels = layers.isotherm_levels(lo, hi)
        cs = layers.draw_isotherms(
            ax,
            view,
            view.temperature,
            levels,
            cmap=style.TEMPERATURE_CMAP,
            norm=norm,
            window=window,
        )
        layers.draw_outlines(ax, view)
        handles = layers.draw_boundaries(ax, view)
        layers.set_window(ax, window)
        cbar = fig.colorbar(
            raster.colour_scale(quad),
            ax=ax,
            shrink=0.85,
            pad=0.02,
            aspect=30,
            extend=_extend(view, lo, hi),
        )
        cbar.set_label("temperature (°C)")
        cbar.outline.set_linewidth(0.5)
        if cs is not None:
            cbar.add_lines(cs)
            cbar.set_ticks(list(levels[:: max(1, int(np.ceil(levels.size / 11)))]))
        if marked is not None:
            mark_point(ax, view, marked, window)
        layers.add_scale_bar(ax, view, window)
        style.headings(fig, ax, title, subtitle, caption)
        style.boundary_legend(fig, handles)
    return fig


def _range(view: AnyFieldView, window: layers.Window) -> tuple[float, float]:
    """Colour range (°C): the field's range including surfaces, within the window."""
    x0, y0, x1, y1 = window
    c = view.centres
    sel = (c[:, 0] >= x0) & (c[:, 0] <= x1) & (c[:, 1] >= y0) & (c[:, 1] <= y1)
    vals = np.concatenate(
        [view.temperature[sel] if sel.any() else view.temperature, view.face_temperature]
    )
    lo, hi = float(vals.min()), float(vals.max())
    if hi - lo < 1e-9:
        lo, hi = lo - 0.5, hi + 0.5
    return lo, hi


def _extend(view: AnyFieldView, lo: float, hi: float) -> str:
    below = bool(view.temperature.min() < lo - 1e-12)
    above = bool(view.temperature.max() > hi + 1e-12)
    return {(False, False): "neither", (True, False): "min", (False, True): "max"}.get(
        (below, above), "both"
    )


def mark_point(ax: Axes, view: AnyFieldView, marked: Marked, window: layers.Window) -> None:
    """A diamond at the point and a boxed label with its value and position."""
    ax.plot(
        [marked.x],
        [marked.y],
        ls="none",
        marker="D",
        ms=6.5,
        mfc=style.COLDEST_COLOUR,
        mec="black",
        mew=0.7,
        zorder=8,
        clip_on=False,
        gid=COLDEST_GID,
    )
    x0, y0, x1, y1 = window
    w_in, h_in = style.axes_size(x1 - x0, y1 - y0)
    per_inch = max((x1 - x0) / w_in, (y1 - y0) / h_in)  # m per inch on the page
    at = layers.label_position(
        view, (marked.x, marked.y), window, (1.5 * per_inch, 0.42 * per_inch)
    )
    ax.annotate(
        f"{marked.label} = {marked.value:.2f} °C\nat ({marked.x:.3f}, {marked.y:.3f}) m",
        xy=(marked.x, marked.y),
        xytext=(float(at[0]), float(at[1])),
        ha="center",
        va="center",
        fontsize=7,
        bbox={"boxstyle": "round,pad=0.35", "fc": "white", "ec": "#333333", "lw": 0.6},
        arrowprops={"arrowstyle": "-", "color": "#222222", "lw": 0.8, "shrinkB": 5},
        zorder=9,
    )
