"""Output paths checked before any work: a results folder must be a folder fvheat can write,
and a table file must not be a folder. Raise :class:`~fvheat.errors.CaseError` (exit 2)."""

from __future__ import annotations

import os
from pathlib import Path

from fvheat.errors import CaseError


def check_output_folder(path: Path, option: str) -> None:
    """``path`` is, or can be created as, a writable folder (given with ``option``)."""
    path = Path(path)
    if path.exists() and not path.is_dir():
        raise CaseError(
            "is a file, not a folder: give a folder for the results", key=f"{option} {path}"
        )
    parent = path
    while not parent.exists():
        if parent.parent == parent:
            break
        parent = parent.parent
    if parent.exists() and not parent.is_dir():
        raise CaseError(
            f"cannot be created: {parent} is a file, not a folder", key=f"{option} {path}"
        )
    if parent.exists() and not os.access(parent, os.W_OK | os.X_OK):
        raise CaseError(
            f"cannot be written: no write permission in {parent}", key=f"{option} {path}"
        )


def check_output_file(path: Path, option: str) -> None:
    """``path`` can be written as a file (given with ``option``): not a folder, and its
    folder can be created and written."""
    path = Path(path)
    if path.is_dir():
        raise CaseError("is a folder: give a file name", key=f"{option} {path}")
    check_output_folder(path.parent if str(path.parent) else Path("."), option)
