"""``--set dotted.path=value`` overrides applied to a parsed case file before validation."""

from __future__ import annotations

import copy
import re
import tomllib
from collections.abc import Sequence
from typing import Any

from fvheat.case.fields import describe
from fvheat.errors import CaseError

_INDEX = re.compile(r"\d+")


def apply_overrides(data: dict, overrides: Sequence[str], source: str) -> dict:
    """A deep copy of the case ``data`` with each ``path=value`` override applied in order.

    ``path`` is dotted; list items are addressed by 0-based index (``regions.2.material``) or
    by the ``name`` they carry (``boundaries.outside.air_temperature``), and keys containing
    dots may be quoted as in TOML (``materials."glass.wool".conductivity``).
    ``value`` is read as a TOML value (``0.3``, ``true``, ``[1, 2]``, ``{mean = 0, ...}``),
    or taken as plain text when it is not one (``title=My wall``). Missing keys and tables are
    created (validation then rejects unknown ones). ``source`` names the case file in errors.
    """
    result = copy.deepcopy(data)
    for override in overrides:
        path, sep, text = override.partition("=")
        path = path.strip()
        where = f"--set {path or override.strip()}"
        if not sep:
            raise CaseError("expected dotted.path=value", file=source, key=where)
        if not path:
            raise CaseError("empty key path before '='", file=source, key=where)
        _set(result, _segments(path), parse_value(text.strip()), source, where)
    return result


def _segments(path: str) -> list[str]:
    """The keys of a dotted path, read as a TOML dotted key so that quoted keys work."""
    try:
        parsed: Any = tomllib.loads(f"{path} = 0")
    except tomllib.TOMLDecodeError:
        return [s.strip() for s in path.split(".")]
    keys = []
    while isinstance(parsed, dict) and len(parsed) == 1:
        key, parsed = next(iter(parsed.items()))
        keys.append(key)
    if parsed != 0 or isinstance(parsed, bool):
        return [s.strip() for s in path.split(".")]
    return keys


def parse_value(text: str) -> Any:
    """``text`` as a TOML value (``0.035``, ``true``, ``[1, 2]``), else as plain text: how
    ``--set`` and ``--vary`` read their values."""
    try:
        parsed = tomllib.loads(f"v = {text}")
    except tomllib.TOMLDecodeError:
        return text
    return parsed["v"] if list(parsed) == ["v"] else text


def _set(data: dict, keys: list[str], value: Any, source: str, where: str) -> None:
    node: Any = data
    for depth, key in enumerate(keys):
        last = depth == len(keys) - 1
        here = ".".join(keys[:depth]) or "the top level"
        if isinstance(node, dict):
            if last:
                node[key] = value
            else:
                node = node.setdefault(key, {})
        elif isinstance(node, list):
            index = _index(node, key, here, source, where)
            if index >= len(node):
                span = f"indices 0 to {len(node) - 1}" if node else "it is empty"
                raise CaseError(
                    f"index {index} is out of range: {here} has {len(node)} "
                    f"item{'' if len(node) == 1 else 's'} ({span})",
                    file=source,
                    key=where,
                )
            if last:
                node[index] = value
            else:
                node = node[index]
        else:
            raise CaseError(
                f"{here} is a single value ({describe(node)}), not a table or array, "
                f"so it has no {key!r}",
                file=source,
                key=where,
            )


def _index(items: list, key: str, here: str, source: str, where: str) -> int:
    """The position in ``items`` that ``key`` addresses: a 0-based index, or the ``name``
    of one of its tables (a name made of digits only is read as an index)."""
    if _INDEX.fullmatch(key):
        return int(key)
    named = [i for i, v in enumerate(items) if isinstance(v, dict) and v.get("name") == key]
    if len(named) == 1:
        return named[0]
    names = [v["name"] for v in items if isinstance(v, dict) and isinstance(v.get("name"), str)]
    if named:
        raise CaseError(
            f"{len(named)} entries of {here} are named {key!r}; use a 0-based index",
            file=source,
            key=where,
        )
    listed = f"names: {', '.join(names)}" if names else "its entries have no names"
    span = f"0 to {len(items) - 1}" if items else "it is empty"
    raise CaseError(
        f"{here} is an array with no entry named {key!r} ({listed}); give a name or a "
        f"0-based index ({span})",
        file=source,
        key=where,
    )


def read_value(data: dict, path: str, source: str) -> Any:
    """The value at dotted ``path`` of the case ``data`` (the addressing of ``--set``);
    :class:`CaseError` naming ``path`` when there is none."""
    node: Any = data
    keys = _segments(path)
    for depth, key in enumerate(keys):
        here = ".".join(keys[:depth]) or "the top level"
        if isinstance(node, dict) and key in node:
            node = node[key]
        elif isinstance(node, list):
            index = _index(node, key, here, source, path)
            if index >= len(node):
                raise CaseError(f"index {index} is out of range in {here}", file=source, key=path)
            node = node[index]
        else:
            raise CaseError(f"{here} has no key {key!r}", file=source, key=path)
    return node


def created_names(data: dict, overrides: Sequence[str]) -> list[tuple[str, str, str]]:
    """(``--set`` path, table, name) of each override that sets a property of a material,
    or a parameter, the case ``data`` (before the overrides) does not define: a mistyped
    name, most likely (a whole material given as a table, ``materials.x={...}``, is a
    definition and not listed)."""
    out = []
    for override in overrides:
        path = override.partition("=")[0].strip()
        keys = _segments(path)
        depth = {"materials": 3, "parameters": 2}.get(keys[0], 0)
        if not depth or len(keys) < depth:
            continue
        have = data.get(keys[0])
        if not isinstance(have, dict) or keys[1] not in have:
            out.append((path, keys[0], keys[1]))
    return out


def check_created_used(
    created: list[tuple[str, str, str]], materials: set[str], parameters: set[str], source: str
) -> None:
    """Refuse (:class:`CaseError`) an override that created a material no region uses or a
    parameter nothing refers to: it would change nothing, and a sweep over it would show
    the same result in every row."""
    for path, section, name in created:
        used = materials if section == "materials" else parameters
        if name in used:
            continue
        what = "no region uses it" if section == "materials" else "nothing refers to it"
        raise CaseError(
            f"the case file defines no {section[:-1]} {name!r} and {what}, so this changes "
            "nothing: check the name",
            file=source,
            key=f"--set {path}",
        )
