"""A sweep result against one varied parameter, one line per value of another (matplotlib,
imported here only, with the non-interactive Agg backend)."""

from __future__ import annotations

import math
import textwrap
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from fvheat.cautions import CAUTION
from fvheat.errors import CaseError
from fvheat.output.files import atomic_write
from fvheat.sweep.table import Table
from fvheat.sweep.values import parse_value


@dataclass(frozen=True)
class Line:
    """One plotted line: its label (the series value, or "" for a single line) and points
    sorted by x."""

    label: str
    x: tuple[float, ...]
    y: tuple[float, ...]


def plot_lines(
    table: Table,
    x: str,
    y: str,
    series: str | None = None,
    where: Sequence[str] = (),
) -> list[Line]:
    """The lines to draw: done rows matching every ``where`` (``key=value``), ``y`` against
    the numeric parameter ``x``, grouped by the value of ``series``. Raises
    :class:`CaseError` for an unknown column, a non-numeric x or y, or rows that do not
    differ in x and series (a further varied key: pick its value with ``where``)."""
    _known(x, table.params, "--x", "varied key")
    _known(y, table.results, "--y", "result")
    if series is not None:
        _known(series, table.params, "--series", "varied key")
    filters = [_filter(w, table.params) for w in where]
    rows = [
        r
        for r in table.rows
        if r["status"] == "done" and all(parse_value(str(r.get(k))) == v for k, v in filters)
    ]
    groups: dict[str, dict[float, float]] = {}
    for r in rows:
        xv = _number(r.get(x), f"--x {x}")
        yv = _number(r.get(y), f"--y {y}")
        label = "" if series is None else str(r.get(series, ""))
        points = groups.setdefault(label, {})
        if xv in points:
            others = [k for k in table.params if k not in (x, series)]
            raise CaseError(
                f"several rows at {x} = {xv:g}{f' and {series} = {label}' if series else ''}: "
                f"choose a value of {', '.join(others) or 'the other keys'} with --where key=value",
                key="--where",
            )
        points[xv] = yv
    if not groups:
        raise CaseError("no finished variants to plot", key="--where" if where else "sweep-plot")
    return [
        Line(label, tuple(sorted(pts)), tuple(pts[k] for k in sorted(pts)))
        for label, pts in sorted(groups.items(), key=lambda item: _sort_key(item[0]))
    ]


def sweep_title(y: str, x: str, series: str | None, where: Sequence[str] = ()) -> str:
    """What the plot shows: 'psi against materials.wool.conductivity, one line per ...'."""
    text = f"{y} against {x}"
    if series is not None:
        text += f", one line per {series}"
    if where:
        text += f" ({', '.join(where)})"
    return text


def draw(
    lines: Sequence[Line],
    x: str,
    y: str,
    series: str | None,
    title: str,
    out: Path,
    *,
    subtitle: str = "",
    length_unit: str = "m",
) -> Path:
    """Draw ``lines`` into a PNG at ``out`` (written atomically), the cautions underneath.
    ``title`` says what the sweep shows, ``subtitle`` which case was swept; the axes carry
    the units of the varied key (lengths in ``length_unit``) and of the result."""
    import matplotlib

    from fvheat.sweep.labels import key_unit, result_unit, with_unit

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from matplotlib.layout_engine import ConstrainedLayoutEngine

    fig, ax = plt.subplots(figsize=(7.0, 5.0), layout="constrained")
    try:
        for line in lines:
            ax.plot(line.x, line.y, marker="o", label=line.label or None)
        ax.set_xlabel(with_unit(x, key_unit(x, length_unit)), parse_math=False)
        ax.set_ylabel(with_unit(y, result_unit(y)), parse_math=False)
        heading = "\n".join(textwrap.wrap(title, 90))
        if subtitle:
            heading += "\n" + "\n".join(textwrap.wrap(subtitle, 110))
        ax.set_title(heading, fontsize="medium", loc="left", parse_math=False)
        ax.grid(True, alpha=0.3)
        if series is not None:
            legend = ax.legend(
                title=with_unit(series, key_unit(series, length_unit)), fontsize="small"
            )
            for text in [legend.get_title(), *legend.get_texts()]:
                text.set_parse_math(False)
        engine = fig.get_layout_engine()
        assert isinstance(engine, ConstrainedLayoutEngine)
        engine.set(rect=(0, 0.08, 1, 0.92))
        fig.text(0.01, 0.01, "\n".join(textwrap.wrap(CAUTION, 130)), fontsize=6, color="0.35")
        return atomic_write(out, lambda fh: fig.savefig(fh, format="png", dpi=120), binary=True)
    finally:
        plt.close(fig)


def _known(name: str, names: Sequence[str], option: str, what: str) -> None:
    if name not in names:
        raise CaseError(
            f"unknown {what} {name!r}; this sweep has: {', '.join(names) or 'none'}",
            key=f"{option}",
        )


def _filter(spec: str, params: Sequence[str]) -> tuple[str, Any]:
    key, sep, value = spec.partition("=")
    key = key.strip()
    if not sep:
        raise CaseError("expected key=value", key=f"--where {spec}")
    _known(key, params, "--where", "varied key")
    return key, parse_value(value.strip())


def _number(value: Any, where: str) -> float:
    v = parse_value(value) if isinstance(value, str) else value
    if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(v):
        raise CaseError(f"not a finite number: {value!r}", key=where)
    return float(v)


def _sort_key(label: str) -> tuple[int, float, str]:
    v = parse_value(label)
    if isinstance(v, int | float) and not isinstance(v, bool):
        return (0, float(v), label)
    return (1, 0.0, label)
