"""Checks of the output paths a command is given, made before anything is computed or
written: an output folder must be a folder or creatable, an output file must not be a
folder and must go into a folder that exists, and both must be writable.

Each check writes nothing and raises :class:`~fvheat.errors.CaseError` whose key is the
option and the path as given (``--out results: lies under results, which is a file``).
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from pathlib import Path

from fvheat.errors import CaseError


def check_output_folder(path: Path, option: str) -> None:
    """Raise :class:`CaseError` unless ``path`` is a writable folder or can be created (its
    nearest existing ancestor is a writable folder). ``option`` names the command-line
    option in the message (``"--out"``)."""
    where = f"{option} {path}"
    path = Path(path)
    if os.path.exists(path):
        if not path.is_dir():
            raise CaseError("is a file, not a folder", key=where)
        if not _writable(path):
            raise CaseError("the folder is not writable (no permission)", key=where)
        return
    ancestor = _nearest_existing(path)
    if not ancestor.is_dir():
        raise CaseError(f"lies under {ancestor}, which is a file, not a folder", key=where)
    if not _writable(ancestor):
        raise CaseError(f"cannot create it: {ancestor} is not writable (no permission)", key=where)


def check_output_file(path: Path, option: str, *, made: Sequence[Path] = ()) -> None:
    """Raise :class:`CaseError` unless a file can be written at ``path``: not a folder, in
    an existing writable folder, and writable itself if it exists. ``made`` are folders the
    command creates (and checks with :func:`check_output_folder`) before it writes the
    file: a file directly in one of them is accepted even when it does not exist yet."""
    where = f"{option} {path}"
    path = Path(path)
    if path.is_dir():
        raise CaseError("is a folder; give a file name", key=where)
    parent = path.absolute().parent
    if any(_same(parent, Path(m)) for m in made):
        return
    if not os.path.exists(parent):
        ancestor = _nearest_existing(parent)
        if not ancestor.is_dir():
            raise CaseError(f"lies under {ancestor}, which is a file, not a folder", key=where)
        raise CaseError(f"the folder {parent} does not exist", key=where)
    if not parent.is_dir():
        raise CaseError(f"lies under {parent}, which is a file, not a folder", key=where)
    if os.path.exists(path) and not os.access(path, os.W_OK):
        raise CaseError("the file is not writable (no permission)", key=where)
    if not _writable(parent):
        raise CaseError(f"cannot write in {parent} (no permission)", key=where)


def _nearest_existing(path: Path) -> Path:
    """``path`` or its closest ancestor that exists (a file or a folder)."""
    path = path.absolute()
    for candidate in (path, *path.parents):
        if os.path.exists(candidate):
            return candidate
    return Path(path.anchor)


def _writable(folder: Path) -> bool:
    """Whether files can be created in ``folder`` (write and search permission)."""
    return os.access(folder, os.W_OK | os.X_OK)


def _same(a: Path, b: Path) -> bool:
    return os.path.normcase(os.path.abspath(a)) == os.path.normcase(os.path.abspath(b))
