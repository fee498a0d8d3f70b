"""Case files written by tests: TOML text into a temporary folder, loaded through the whole
validation path (:func:`fvheat.case.load.load_case`, with optional ``--set`` overrides)."""

from __future__ import annotations

import textwrap
from collections.abc import Sequence
from pathlib import Path

from fvheat.case.load import load_case
from fvheat.case.model import Case


def write_case(folder: Path, text: str, name: str = "case.toml") -> Path:
    """Write the (dedented) TOML ``text`` to ``folder/name`` and return the path."""
    path = Path(folder) / name
    path.write_text(textwrap.dedent(text), encoding="utf-8")
    return path


def load(folder: Path, text: str, overrides: Sequence[str] = (), name: str = "case.toml") -> Case:
    """Write the TOML ``text`` and load it as a validated :class:`Case`."""
    return load_case(write_case(folder, text, name), overrides)
