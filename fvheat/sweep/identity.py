"""What a sweep's results depend on besides the overrides: the case file's bytes and the
bytes of every other file the case reads (:func:`fvheat.case.inputs.case_inputs`).

Input files are named relative to the case file's folder (absolute when outside it), so a
project folder moved as a whole keeps its sweeps, and recorded with their SHA-256.
"""

from __future__ import annotations

import hashlib
from collections.abc import Mapping
from pathlib import Path

from fvheat.case.inputs import case_inputs
from fvheat.case.model import Case


def file_sha256(path: Path) -> str:
    """SHA-256 of a file's bytes (hex)."""
    h = hashlib.sha256()
    with Path(path).open("rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def input_name(path: Path, case_file: Path) -> str:
    """``path`` relative to the case file's folder (POSIX separators), or absolute when it
    lies elsewhere."""
    path = Path(path).absolute()
    try:
        return path.relative_to(Path(case_file).absolute().parent).as_posix()
    except ValueError:
        return path.as_posix()


def input_hashes(case: Case) -> dict[str, str]:
    """Every file ``case`` reads besides the case file itself, by :func:`input_name`, with
    its SHA-256."""
    files = case_inputs(case)[1:]
    return {input_name(p, case.source): file_sha256(p) for p in files}


class InputCheck:
    """Compares recorded input hashes with the files as they are now, hashing each file
    once however many variants recorded it."""

    def __init__(self, case_file: Path):
        self.folder = Path(case_file).absolute().parent
        self._now: dict[str, str | None] = {}

    def path(self, name: str) -> Path:
        """The file an input name stands for."""
        return self.folder / name

    def changed(self, recorded: Mapping[str, str]) -> list[str]:
        """The names in ``recorded`` whose file now has other contents (a file that is gone
        changed nothing that was computed, and is not listed)."""
        return [n for n, sha in recorded.items() if self._sha(n) not in (sha, None)]

    def _sha(self, name: str) -> str | None:
        if name not in self._now:
            try:
                self._now[name] = file_sha256(self.path(name))
            except OSError:
                self._now[name] = None
        return self._now[name]
