"""Plots of a transient run: probe temperatures and boundary heat flows against time, and
snapshots of the temperature field at a few saved times."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from fvheat.output.plots import layers, raster, style
from fvheat.output.plots.temperature import time_label
from fvheat.output.triangle_view import AnyFieldView

if TYPE_CHECKING:
    from matplotlib.figure import Figure

#: hour steps for time-axis ticks
HOUR_STEPS = (1, 2, 3, 6, 12, 24)


def time_axis(times: np.ndarray) -> tuple[np.ndarray, str, float]:
    """Times (s) in hours (spans up to four days) or days, the axis label and a tick step."""
    span = float(np.ptp(times)) if np.size(times) else 0.0
    if span <= 4 * 86400:
        hours = span / 3600
        step: float = next((s for s in HOUR_STEPS if hours / s <= 12), 24)
        return np.asarray(times) / 3600, "time (h)", float(step)
    days = span / 86400
    step = max(1.0, float(np.ceil(days / 12)))
    return np.asarray(times) / 86400, "time (d)", step


#: a front that moves by more than this share of its range between two saved times, and
#: by more than JUMP_FACTOR times its typical move, has jumped (the first crossing changes
#: from the frost depth to a thaw front): no line is drawn across the jump
JUMP_SHARE = 0.25
JUMP_FACTOR = 3.0


def with_gaps(t: np.ndarray, values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Times and values with a NaN put between two saved times where the value jumps by
    more than :data:`JUMP_SHARE` of its range and :data:`JUMP_FACTOR` times its median
    move, so that no line joins the two sides."""
    v = np.asarray(values, float)
    finite = v[np.isfinite(v)]
    if finite.size < 3 or np.ptp(finite) == 0.0:
        return np.asarray(t, float), v
    step = np.abs(np.diff(v))
    typical = float(np.median(step[np.isfinite(step)])) if np.isfinite(step).any() else 0.0
    limit = max(JUMP_SHARE * float(np.ptp(finite)), JUMP_FACTOR * typical)
    jumps = np.flatnonzero(step > limit) + 1
    return (
        np.insert(np.asarray(t, float), jumps, np.nan),
        np.insert(v, jumps, np.nan),
    )


def _series_figure(
    times,
    series: dict[str, np.ndarray],
    ylabel: str,
    title: str,
    subtitle: str,
    colours,
    *,
    gaps: bool = False,
):
    from matplotlib.ticker import MultipleLocator

    with style.style():
        fig = style.new_figure(style.PAGE_WIDTH, 3.0)
        ax = fig.add_subplot()
        t, xlabel, step = time_axis(np.asarray(times, float))
        for k, (name, values) in enumerate(series.items()):
            colour = colours[k % len(colours)]
            tk, vk = with_gaps(t, values) if gaps else (t, values)
            ax.plot(tk, vk, color=colour, lw=1.3, label=name)
        ax.set_xlabel(xlabel)
        ax.set_ylabel(ylabel)
        if t.size:
            ax.set_xlim(t[0], t[-1])
        ax.xaxis.set_major_locator(MultipleLocator(step))
        ax.grid(True, color="#e3e3e3", lw=0.6)
        ax.set_axisbelow(True)
        style.headings(fig, ax, title, subtitle)
        if series:
            fig.legend(loc="outside lower center", ncols=min(3, len(series)), frameon=False)
    return fig


def probe_figure(times: np.ndarray, probes: dict[str, np.ndarray], *, title: str = "") -> Figure:
    """Probe temperatures (°C) against time (s on input; hours or days on the axis)."""
    return _series_figure(
        times, probes, "temperature (°C)", title, "probe temperatures", style.LINE_COLOURS
    )


def flow_figure(times: np.ndarray, flows: dict[str, np.ndarray], *, title: str = "") -> Figure:
    """Boundary heat flows (W/m, positive into the body) against time, each boundary in its
    colour of the maps (``flows`` in the case's boundary order)."""
    fig = _series_figure(
        times,
        flows,
        "heat flow (W/m)",
        title,
        "boundary heat flows, positive into the body",
        style.BOUNDARY_COLOURS,
    )
    fig.axes[0].axhline(0.0, color="#777777", lw=0.7, zorder=1)
    return fig


def front_figure(
    times: np.ndarray,
    fronts: dict[str, np.ndarray],
    frozen_area: np.ndarray | None,
    *,
    title: str = "",
) -> Figure:
    """Phase-change front positions along the probe lines (m from each line's start) and
    the frozen area (m², second axis) against time."""
    fig = _series_figure(
        times,
        fronts,
        "front position along the line (m)",
        title,
        "phase-change fronts (first and far crossings of half-frozen) and frozen area",
        style.LINE_COLOURS,
        gaps=True,  # where a front jumps (at a thaw) the line is broken, not drawn vertical
    )
    ax = fig.axes[0]
    ax.set_ylim(bottom=0.0)
    ax.invert_yaxis()  # depth reads downwards
    if frozen_area is not None:
        t, _, _ = time_axis(np.asarray(times, float))
        with style.style():  # the second axis in the same type sizes as the first
            ax2 = ax.twinx()
            ax2.plot(t, frozen_area, color="#777777", lw=1.0, ls="--", label="frozen area")
            ax2.set_ylabel("frozen area (m²)", color="#555555")
            ax2.set_ylim(bottom=0.0)
    return fig


def snapshot_indices(n_saved: int, count: int = 4) -> np.ndarray:
    """``count`` saved-field indices spread evenly from the first to the last."""
    return np.unique(np.round(np.linspace(0, n_saved - 1, min(count, n_saved))).astype(int))


def snapshot_figure(
    views: list[AnyFieldView],
    *,
    title: str = "",
    vrange: tuple[float, float] | None = None,
    zoom: layers.Window | None = None,
) -> Figure:
    """Temperature maps of several saved fields side by side on one colour scale."""
    from matplotlib.colors import Normalize

    with style.style():
        window = layers.window_of(views[0], zoom)
        x0, y0, x1, y1 = window
        n = len(views)
        tall = (y1 - y0) > 1.5 * (x1 - x0)
        rows, cols = (1, n) if tall or n <= 2 else (2, int(np.ceil(n / 2)))
        panel_w = 0.85 * (style.PAGE_WIDTH - 1.6) / cols
        panel_h = min(panel_w * (y1 - y0) / (x1 - x0), style.MAX_AXES_HEIGHT / rows)
        fig = style.new_figure(style.PAGE_WIDTH, rows * (panel_h + 0.45) + 0.9)
        axes = fig.subplots(rows, cols, sharex=True, sharey=True, squeeze=False).ravel()
        if vrange is None:
            lo = min(float(v.temperature.min()) for v in views)
            hi = max(float(v.temperature.max()) for v in views)
            vrange = (lo, hi) if hi > lo else (lo - 0.5, hi + 0.5)
        norm = Normalize(*vrange)
        levels = layers.isotherm_levels(*vrange, n=8)
        quad = None
        for ax, v in zip(axes, views, strict=False):
            quad = layers.draw_cells(
                ax, v, v.temperature, window=window, cmap=style.TEMPERATURE_CMAP, norm=norm
            )
            layers.draw_isotherms(
                ax,
                v,
                v.temperature,
                levels,
                cmap=style.TEMPERATURE_CMAP,
                norm=norm,
                labels=False,
                window=window,
            )
            layers.draw_outlines(ax, v)
            layers.set_window(ax, window)
            ax.set_title(time_label(v.time), fontsize=8, fontweight="normal")
            ax.label_outer()
        for ax in axes[n:]:
            ax.set_visible(False)
        assert quad is not None  # views is not empty
        cbar = fig.colorbar(
            raster.colour_scale(quad), ax=list(axes[:n]), shrink=0.8, pad=0.02, aspect=30
        )
        cbar.set_label("temperature (°C)")
        cbar.outline.set_linewidth(0.5)
        sub = "temperature field at saved times"
        if levels.size > 1:
            sub += f"; isotherms every {levels[1] - levels[0]:g} K"
        style.headings(fig, axes[0], title, "")
        fig.supxlabel(sub, fontsize=7.5, color="#333333", x=0.02, ha="left")
    return fig
