"""Boundary values: numbers, cosines ``{mean, amplitude, period, phase}`` and CSV columns
``{file, column, scale, period}``."""

from __future__ import annotations

import csv
import io
import math
from pathlib import Path
from typing import Any

import numpy as np

from fvheat.case.fields import (
    ABSOLUTE_ZERO,
    HIGHEST_TEMPERATURE,
    Context,
    Invalid,
    describe,
    join,
    number,
    string,
    table,
    temperature,
    to_number,
)
from fvheat.case.signals import Constant, Cosine, Series, Signal

#: s: the shortest period of a cosine boundary value (1 ms; a building's conditions change
#: over minutes to years, and shorter periods are typing slips)
SHORTEST_PERIOD = 1e-3


def read_signal(value: Any, path: str, ctx: Context, *, is_temperature: bool) -> Signal:
    """A constant, cosine or CSV series value at ``path`` (°C when ``is_temperature``)."""
    if isinstance(value, int | float) and not isinstance(value, bool):
        x = to_number(value, path)
        return Constant(temperature(x, path) if is_temperature else x)
    if not isinstance(value, dict):
        raise Invalid(
            path,
            f"expected a number, a table {{mean, amplitude, period, phase}} or a table "
            f"{{file, column}}, got {describe(value)}",
        )
    if "file" in value:
        return _series(value, path, ctx, is_temperature=is_temperature)
    tbl = table(value, path, allowed=("mean", "amplitude", "period", "phase"), required=("mean",))
    cosine = Cosine(
        mean=number(tbl, "mean", path),
        amplitude=number(tbl, "amplitude", path, required=False, default=0.0),
        period=number(tbl, "period", path, ge=SHORTEST_PERIOD),
        phase=number(tbl, "phase", path, required=False, default=0.0),
    )
    lowest = cosine.mean - abs(cosine.amplitude)
    if is_temperature and lowest <= -273.15:
        raise Invalid(
            path,
            f"falls to {lowest:g} °C (mean - |amplitude|), not above absolute zero (-273.15 °C)",
        )
    highest = cosine.mean + abs(cosine.amplitude)
    if is_temperature and highest > HIGHEST_TEMPERATURE:
        raise Invalid(
            path,
            f"rises to {highest:g} °C (mean + |amplitude|), above {HIGHEST_TEMPERATURE:g} °C",
        )
    if not math.isfinite(highest):
        raise Invalid(path, "mean + |amplitude| is not a finite number")
    return cosine


def _series(value: dict, path: str, ctx: Context, *, is_temperature: bool) -> Series:
    tbl = table(
        value, path, allowed=("file", "column", "scale", "period"), required=("file", "column")
    )
    fname = string(tbl, "file", path)
    column = string(tbl, "column", path)
    scale = number(tbl, "scale", path, required=False, default=1.0)
    period = number(tbl, "period", path, required=False, gt=0)
    csv_path = ctx.folder / fname
    header, rows = _read_csv(csv_path, fname, join(path, "file"), ctx)
    if column not in header:
        raise Invalid(
            join(path, "column"),
            f"no column {column!r} in {fname}; its columns: {', '.join(header)}",
        )
    if not rows:
        raise Invalid(join(path, "file"), f"{fname} has a header row but no data rows")
    col = header.index(column)
    times = np.empty(len(rows))
    values = np.empty(len(rows))
    for k, (line, cells) in enumerate(rows):
        times[k] = _cell(cells, 0, header, fname, line, path)
        values[k] = _cell(cells, col, header, fname, line, path)
        if k and times[k] <= times[k - 1]:
            raise Invalid(
                path,
                f"{fname} line {line}: time {times[k]:g} s is not after the previous row's "
                f"{times[k - 1]:g} s; times must increase strictly",
            )
    if period is not None and period <= times[-1] - times[0]:
        raise Invalid(
            join(path, "period"),
            f"period = {period:g} s must exceed the table's span ({times[-1] - times[0]:g} s): "
            "the last row is followed by the first row of the next period",
        )
    with np.errstate(over="ignore"):  # a huge scale gives inf, refused just below
        values = values * scale
    if is_temperature:  # after the scale, which may turn a sane column into an absurd one
        bad = (values <= ABSOLUTE_ZERO) | (values > HIGHEST_TEMPERATURE)
        if bad.any():
            k = int(np.argmax(bad))
            raise Invalid(
                path,
                f"{fname} line {rows[k][0]}: {values[k]:g} °C in column {column!r}"
                f"{'' if scale == 1.0 else f' (× scale {scale:g})'} is not above absolute "
                f"zero ({ABSOLUTE_ZERO} °C) and at most {HIGHEST_TEMPERATURE:g} °C",
            )
    if not np.isfinite(values).all():
        raise Invalid(join(path, "scale"), "the scaled values are not all finite numbers")
    times.flags.writeable = False
    values.flags.writeable = False
    return Series(times=times, values=values, source=str(csv_path), column=column, period=period)


def _cell(cells: list[str], col: int, header: list[str], fname: str, line: int, path: str) -> float:
    where = f"{fname} line {line}"
    if col >= len(cells):
        raise Invalid(path, f"{where}: no value in column {header[col]!r} (row too short)")
    text = cells[col]
    try:
        x = float(text)
    except ValueError:
        raise Invalid(
            path, f"{where}: {text!r} in column {header[col]!r} is not a number"
        ) from None
    if not np.isfinite(x):
        raise Invalid(path, f"{where}: {text!r} in column {header[col]!r} is not a finite number")
    return x


#: largest CSV series file read, bytes (a year of one-minute values is about 20 MB)
MAX_CSV_BYTES = 200 * 1024**2


def _read_csv(
    csv_path: Path, fname: str, key: str, ctx: Context
) -> tuple[list[str], list[tuple[int, list[str]]]]:
    """Header and (line number, cells) rows of a comma-separated file, cached per run.

    Blank lines and lines starting with ``#`` are skipped; cells are stripped.
    """
    cache_key = ("csv", csv_path.resolve())
    if cache_key in ctx.cache:
        return ctx.cache[cache_key]
    try:
        if csv_path.exists() and not csv_path.is_file():
            raise Invalid(key, f"{fname} is not a regular file (a folder, device or pipe)")
        size = csv_path.stat().st_size
        if size > MAX_CSV_BYTES:
            raise Invalid(
                key,
                f"{fname} is {size / 1024**2:.0f} MB; series files up to "
                f"{MAX_CSV_BYTES // 1024**2} MB are read (thin it out, e.g. hourly values)",
            )
        text = csv_path.read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise Invalid(
            key, f"CSV file {fname!r} not found (looked for {csv_path.absolute()})"
        ) from None
    except UnicodeDecodeError:
        raise Invalid(key, f"{fname} is not UTF-8 text") from None
    except OSError as err:
        raise Invalid(key, f"cannot read {fname}: {err.strerror}") from err
    header: list[str] | None = None
    rows: list[tuple[int, list[str]]] = []
    reader = csv.reader(io.StringIO(text))
    try:
        for row in reader:
            cells = [c.strip() for c in row]
            if not any(cells) or cells[0].startswith("#"):
                continue
            if header is None:
                header = cells
            else:
                rows.append((reader.line_num, cells))
    except csv.Error as err:
        raise Invalid(key, f"{fname} line {reader.line_num}: {err}") from err
    if header is None:
        raise Invalid(key, f"{fname} is empty (expected a header row: time, then column names)")
    if len(header) < 2:
        hint = " (columns must be separated by commas)" if ";" in header[0] else ""
        raise Invalid(key, f"{fname} has only one column{hint}; expected time, then values")
    ctx.cache[cache_key] = header, rows
    return header, rows
