"""Variants files: one variant per row, as CSV (header = dotted key paths) or TOML
(``[[variant]]`` tables)."""

from __future__ import annotations

import csv
import tomllib
from pathlib import Path
from typing import Any

from fvheat.errors import CaseError
from fvheat.sweep.values import toml_text
from fvheat.sweep.variants import Variant, unique


def read_variants_file(path: str | Path) -> tuple[list[str], list[Variant]]:
    """The keys (column order) and variants listed in a ``.csv`` or ``.toml`` file.

    CSV: the header names the dotted key paths, each further row is one variant, cells are
    read as in ``--set`` (an empty cell leaves that key as the case file has it; rows whose
    first cell starts with ``#`` are comments). A UTF-8 byte-order mark, as spreadsheet
    programs write one, is skipped. TOML: each ``[[variant]]`` table is one
    variant; its keys are dotted key paths (``"materials.wool.conductivity" = 0.035``, or
    written as nested tables). Raises :class:`CaseError` naming the file.
    """
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix not in (".csv", ".toml"):
        raise CaseError("expected a .csv or .toml variants file", file=str(path))
    try:
        text = path.read_text(encoding="utf-8-sig")  # a byte-order mark (as Excel saves) is skipped
    except FileNotFoundError:
        raise CaseError("variants file not found", file=str(path)) from None
    except (OSError, UnicodeDecodeError) as err:
        raise CaseError(f"cannot read the variants file: {err}", file=str(path)) from err
    keys, variants = _read_csv(text, path) if suffix == ".csv" else _read_toml(text, path)
    if not variants:
        raise CaseError("lists no variants", file=str(path))
    return keys, unique(variants)


def _read_csv(text: str, path: Path) -> tuple[list[str], list[Variant]]:
    rows = [
        (n, row)
        for n, row in enumerate(csv.reader(text.splitlines()), start=1)
        if row and any(c.strip() for c in row) and not row[0].lstrip().startswith("#")
    ]
    if not rows:
        raise CaseError("empty: expected a header row of dotted key paths", file=str(path))
    _, header = rows[0]
    keys = [h.strip() for h in header]
    for i, k in enumerate(keys):
        if not k:
            raise CaseError(f"header column {i + 1} is empty", file=str(path), key="line 1")
        if k in keys[:i]:
            raise CaseError(f"key {k!r} appears twice in the header", file=str(path))
    variants = []
    for n, row in rows[1:]:
        if len(row) != len(keys):
            raise CaseError(
                f"{len(row)} cells, the header has {len(keys)}", file=str(path), key=f"line {n}"
            )
        params = tuple((k, c.strip()) for k, c in zip(keys, row, strict=True) if c.strip())
        variants.append(Variant(params))
    return keys, variants


def _read_toml(text: str, path: Path) -> tuple[list[str], list[Variant]]:
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as err:
        raise CaseError(f"TOML syntax error: {err}", file=str(path)) from err
    extra = [k for k in data if k != "variant"]
    if extra:
        raise CaseError(
            f"unknown key {extra[0]!r}: list variants as [[variant]] tables", file=str(path)
        )
    entries = data.get("variant", [])
    if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
        raise CaseError("expected [[variant]] tables", file=str(path), key="variant")
    keys: list[str] = []
    variants = []
    for entry in entries:
        params = tuple((k, toml_text(v)) for k, v in _flatten(entry))
        keys.extend(k for k, _ in params if k not in keys)
        variants.append(Variant(params))
    return keys, variants


def _flatten(table: dict[str, Any], prefix: str = "") -> list[tuple[str, Any]]:
    """Nested tables as (dotted path, value) pairs; arrays and other values are leaves."""
    out: list[tuple[str, Any]] = []
    for k, v in table.items():
        path = f"{prefix}.{k}" if prefix else k
        out.extend(_flatten(v, path) if isinstance(v, dict) else [(path, v)])
    return out
