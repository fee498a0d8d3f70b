"""Safe file writing: every output is written to a temporary file and renamed into place,
so an interrupted or failed run never leaves a half-written file behind."""

from __future__ import annotations

import functools
import os
import re
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import IO, Any

#: the name of the temporary file :func:`atomic_write_file` writes before renaming it: "."
#: + the target's stem + "." + 8 random characters (:func:`tempfile.mkstemp`) + its suffix
_TEMPORARY_NAME = re.compile(r"\..+\.[a-z0-9_]{8}(\.[^.]*)?")


def is_temporary(name: str) -> bool:
    """Whether ``name`` is that of a temporary file written by :func:`atomic_write_file`
    (one is left behind only when the process was killed while writing it)."""
    return _TEMPORARY_NAME.fullmatch(name) is not None


@functools.cache
def _file_mode() -> int:
    """Permissions of a newly created file under the process umask (mkstemp makes 0600);
    read once per process."""
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


def atomic_write(
    path: str | Path, write: Callable[[IO[Any]], object], *, binary: bool = False
) -> Path:
    """Call ``write(handle)`` on a temporary file next to ``path``, then rename it to ``path``."""

    def to_file(tmp: Path) -> None:
        kwargs: dict[str, Any] = {} if binary else {"newline": "", "encoding": "utf-8"}
        with open(tmp, "wb" if binary else "w", **kwargs) as fh:
            write(fh)

    return atomic_write_file(path, to_file)


def atomic_write_text(path: str | Path, text: str) -> Path:
    """Write ``text`` (UTF-8) to ``path`` atomically."""
    return atomic_write(path, lambda fh: fh.write(text))


def atomic_write_bytes(path: str | Path, data: bytes) -> Path:
    """Write ``data`` to ``path`` atomically."""
    return atomic_write(path, lambda fh: fh.write(data), binary=True)


def atomic_write_file(path: str | Path, write: Callable[[Path], None]) -> Path:
    """For writers that want a file name (meshio): call ``write(tmp)`` with a temporary path
    next to ``path`` that keeps its suffix, then rename it to ``path``."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.stem}.", suffix=path.suffix, dir=path.parent)
    os.close(fd)
    try:
        write(Path(tmp))
        os.chmod(tmp, _file_mode())
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path
