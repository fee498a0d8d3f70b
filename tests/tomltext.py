"""TOML text from Python values, for tests that build or mutate case files as data.

Written here, not taken from a library, so that it can write what a fuzzer needs: nan and
inf, huge integers, any unicode, arrays mixing types, dates and times. Tables become
``[a.b]`` sections, arrays whose items are all tables ``[[a.b]]`` entries, and tables
inside arrays inline tables.
"""

from __future__ import annotations

import datetime
import json
import math
import re
from typing import Any

_BARE = re.compile(r"[A-Za-z0-9_-]+")


def key_text(key: str) -> str:
    """A key, bare when TOML allows it, else as a basic string."""
    return key if _BARE.fullmatch(key) else string_text(key)


def string_text(s: str) -> str:
    """A TOML basic string: JSON's escapes (which TOML shares), DEL escaped too, and
    lone surrogates (not encodable) replaced."""
    s = s.encode("utf-8", "replace").decode("utf-8")
    return json.dumps(s, ensure_ascii=False).replace("\x7f", "\\u007f")


def value_text(v: Any) -> str:
    """An inline TOML value."""
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if math.isnan(v):
            return "nan"
        if math.isinf(v):
            return "inf" if v > 0 else "-inf"
        return repr(v)
    if isinstance(v, str):
        return string_text(v)
    if isinstance(v, datetime.date | datetime.time):  # datetime is a date too
        return v.isoformat()
    if isinstance(v, dict):
        return "{" + ", ".join(f"{key_text(k)} = {value_text(x)}" for k, x in v.items()) + "}"
    if isinstance(v, list | tuple):
        return "[" + ", ".join(value_text(x) for x in v) + "]"
    raise TypeError(f"no TOML form for {type(v).__name__}")


def _is_table_array(v: Any) -> bool:
    return isinstance(v, list) and bool(v) and all(isinstance(x, dict) for x in v)


def dumps(data: dict[str, Any]) -> str:
    """TOML text for the table ``data``."""
    lines: list[str] = []
    _table(data, [], lines)
    return "\n".join(lines) + "\n"


def _table(tbl: dict[str, Any], path: list[str], lines: list[str]) -> None:
    """Plain keys of ``tbl`` first, then its sub-tables and arrays of tables."""
    nested = []
    for k, v in tbl.items():
        if isinstance(v, dict) or _is_table_array(v):
            nested.append((k, v))
        else:
            lines.append(f"{key_text(k)} = {value_text(v)}")
    for k, v in nested:
        sub = [*path, key_text(k)]
        if isinstance(v, dict):
            lines.append(f"\n[{'.'.join(sub)}]")
            _table(v, sub, lines)
        else:
            for item in v:
                lines.append(f"\n[[{'.'.join(sub)}]]")
                _table(item, sub, lines)
