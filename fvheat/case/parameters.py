"""The ``[parameters]`` table: named numbers substituted into the rest of the case file.

```toml
[parameters]
break_length = 0.08          # in the case's length unit when used as a coordinate

[[regions]]
material = "thermal_break"
box = [0.2, 0.0, { parameter = "break_length", offset = 0.2 }, 0.22]
```

Anywhere outside ``[parameters]`` a value may be

- the string ``"${NAME}"`` (the whole string): the parameter's value, or
- the inline table ``{ parameter = "NAME", offset = A, scale = B }`` (``offset`` and
  ``scale`` optional, default 0 and 1): A + B × value — so one thickness can move several
  coordinates. This is plain substitution, not an expression language.

Substitution happens after ``--set`` overrides (``--set parameters.break_length=0.1``,
sweeps and ``fvheat target --vary parameters.break_length`` vary it) and before lengths
are converted to metres by ``[geometry] units``.
"""

from __future__ import annotations

import re
from typing import Any

from fvheat.case.fields import Context, Invalid, describe, join, to_number

SECTION = "parameters"
_STRING = re.compile(r"\$\{\s*([A-Za-z0-9_.-]+)\s*\}")
_FORM_KEYS = {"parameter", "offset", "scale"}


def parse_parameters(value: Any, ctx: Context) -> dict[str, float]:
    """The parameter values (the substitution itself is :func:`substitute`)."""
    return _values(value)


def _values(value: Any) -> dict[str, float]:
    if value is None:
        return {}
    if not isinstance(value, dict):
        raise Invalid(SECTION, f"expected a table of named numbers, got {describe(value)}")
    return {k: to_number(v, join(SECTION, k)) for k, v in value.items()}


def substitute(data: dict[str, Any]) -> dict[str, Any]:
    """``data`` with every parameter reference replaced by its number (a new dictionary;
    ``data`` itself is unchanged). :class:`Invalid` names the key of a bad reference."""
    values = _values(data.get(SECTION))
    return {k: (v if k == SECTION else _walk(v, k, values)) for k, v in data.items()}


def _walk(value: Any, path: str, values: dict[str, float]) -> Any:
    if isinstance(value, str):
        m = _STRING.fullmatch(value.strip())
        return _lookup(m.group(1), path, values) if m else value
    if isinstance(value, list):
        return [_walk(v, join(path, i), values) for i, v in enumerate(value)]
    if isinstance(value, dict):
        if "parameter" in value and set(value) <= _FORM_KEYS:
            name = value["parameter"]
            if not isinstance(name, str):
                raise Invalid(join(path, "parameter"), f"expected a name, got {describe(name)}")
            offset = to_number(value.get("offset", 0.0), join(path, "offset"))
            scale = to_number(value.get("scale", 1.0), join(path, "scale"))
            return offset + scale * _lookup(name, join(path, "parameter"), values)
        return {k: _walk(v, join(path, k), values) for k, v in value.items()}
    return value


def _lookup(name: str, path: str, values: dict[str, float]) -> float:
    if name not in values:
        known = ", ".join(values) or "none is defined"
        raise Invalid(path, f"no parameter {name!r} in [parameters] ({known})")
    return values[name]


def referenced(data: Any) -> set[str]:
    """The parameter names referred to anywhere in ``data`` outside ``[parameters]``."""
    out: set[str] = set()
    stack = [v for k, v in data.items() if k != SECTION] if isinstance(data, dict) else [data]
    while stack:
        value = stack.pop()
        if isinstance(value, str):
            m = _STRING.fullmatch(value.strip())
            if m:
                out.add(m.group(1))
        elif isinstance(value, list):
            stack.extend(value)
        elif isinstance(value, dict):
            if "parameter" in value and isinstance(value["parameter"], str):
                out.add(value["parameter"])
            stack.extend(value.values())
    return out
