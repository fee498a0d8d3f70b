"""Value text of sweep parameters: read as in ``--set`` (a TOML value, else plain text), split
at top-level commas, and written back as TOML."""

from __future__ import annotations

import json
import math
from typing import Any

from fvheat.case.overrides import parse_value


def split_values(text: str) -> list[str]:
    """Split ``text`` at commas that are not inside brackets, braces or quotes.

    ``"1, 2"`` -> ``["1", "2"]``; ``"[0, 1],[2, 3]"`` -> ``["[0, 1]", "[2, 3]"]``. Items are
    stripped; an empty item stays empty (the caller rejects it).
    """
    items: list[str] = []
    depth = 0
    quote = ""
    start = 0
    i = 0
    while i < len(text):
        c = text[i]
        if quote:
            if c == "\\" and quote == '"':
                i += 1
            elif c == quote:
                quote = ""
        elif c in "\"'":
            quote = c
        elif c in "[{":
            depth += 1
        elif c in "]}":
            depth -= 1
        elif c == "," and depth == 0:
            items.append(text[start:i].strip())
            start = i + 1
        i += 1
    items.append(text[start:].strip())
    return items


def toml_text(value: Any) -> str:
    """``value`` (as read from TOML) written as a TOML value."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return json.dumps(value, ensure_ascii=False)
    if isinstance(value, list):
        return "[" + ", ".join(toml_text(v) for v in value) + "]"
    if isinstance(value, dict):
        inner = ", ".join(f"{json.dumps(str(k))} = {toml_text(v)}" for k, v in value.items())
        return "{" + inner + "}"
    return str(value)  # dates and times: TOML's own text form


def display_value(text: str) -> str:
    """A parameter value for a table cell: plain text for strings, the TOML text otherwise."""
    value = parse_value(text)
    return value if isinstance(value, str) else text


def canonical_json(params: dict[str, Any]) -> str:
    """One text per set of parameter values, whatever their order and number spelling:
    sorted-key compact JSON, integers written as floats (``2``, ``2.0`` and ``2.00`` are one
    value, as they are to the case validation)."""
    return json.dumps(
        _floats(params), sort_keys=True, separators=(",", ":"), ensure_ascii=False, default=str
    )


def _floats(value: Any) -> Any:
    if isinstance(value, bool):
        return value
    if isinstance(value, int):
        return float(value)
    if isinstance(value, list):
        return [_floats(v) for v in value]
    if isinstance(value, dict):
        return {k: _floats(v) for k, v in value.items()}
    return value
