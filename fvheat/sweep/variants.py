"""Sweep variants from ``--vary key=v1,v2`` specs: the full grid, or the lists zipped."""

from __future__ import annotations

import hashlib
import itertools
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from typing import Any

from fvheat.errors import CaseError
from fvheat.sweep.values import canonical_json, parse_value, split_values


@dataclass(frozen=True)
class Variant:
    """One variant: each varied key path (dotted, as given) with its value text (TOML)."""

    params: tuple[tuple[str, str], ...]

    @property
    def overrides(self) -> tuple[str, ...]:
        """The ``--set`` overrides that make this variant: ``key=value``."""
        return tuple(f"{k}={v}" for k, v in self.params)

    @property
    def key(self) -> str:
        """Canonical JSON of the parsed values: equal for equal variants, in any key order."""
        return canonical_json({k: parse_value(v) for k, v in self.params})

    @property
    def digest(self) -> str:
        """First 8 hex digits of the SHA-256 of :attr:`key`."""
        return hashlib.sha256(self.key.encode()).hexdigest()[:8]


def parse_vary(spec: str) -> tuple[str, list[str]]:
    """``"key=v1,v2"`` -> ``("key", ["v1", "v2"])``; commas inside ``[]``, ``{}`` or quotes
    do not split. Raises :class:`CaseError` naming the ``--vary`` argument."""
    path, sep, text = spec.partition("=")
    path = path.strip()
    where = f"--vary {path or spec.strip()}"
    if not sep:
        raise CaseError("expected dotted.path=value1,value2,...", key=where)
    if not path:
        raise CaseError("empty key path before '='", key=where)
    if not text.strip():
        raise CaseError("no values after '=': expected dotted.path=value1,value2,...", key=where)
    values = split_values(text)
    if any(not v for v in values):
        raise CaseError(f"empty value in {text.strip()!r} (values are comma-separated)", key=where)
    return path, values


def vary_variants(specs: Sequence[str], *, zipped: bool = False) -> tuple[list[str], list[Variant]]:
    """The varied keys (in the order given) and the variants of ``--vary`` ``specs``.

    Full grid by default, the last key varying fastest; with ``zipped`` the i-th values of
    every list form the i-th variant (all lists must have the same length). Repeated
    variants are kept once.
    """
    if not specs:
        raise CaseError("give at least one --vary key=v1,v2,... or --variants FILE", key="--vary")
    keys: list[str] = []
    lists: list[list[str]] = []
    for spec in specs:
        path, values = parse_vary(spec)
        if path in keys:
            raise CaseError("key given in two --vary options", key=f"--vary {path}")
        keys.append(path)
        lists.append(values)
    if zipped:
        lengths = {len(v) for v in lists}
        if len(lengths) > 1:
            detail = ", ".join(f"{k}: {len(v)}" for k, v in zip(keys, lists, strict=True))
            raise CaseError(f"--zip needs lists of equal length, got {detail}", key="--zip")
        combos: Iterator[tuple[Any, ...]] = zip(*lists, strict=True)
    else:
        combos = itertools.product(*lists)
    variants = [Variant(tuple(zip(keys, combo, strict=True))) for combo in combos]
    return keys, unique(variants)


def unique(variants: Sequence[Variant]) -> list[Variant]:
    """``variants`` without repeats (same :attr:`Variant.key`), first occurrence kept."""
    seen: set[str] = set()
    out = []
    for v in variants:
        if v.key not in seen:
            seen.add(v.key)
            out.append(v)
    return out
