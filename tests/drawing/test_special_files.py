"""A drawing that is a device, a pipe or a huge file is one line, not a read that never
ends (``geometry.drawing = "/dev/zero"`` hung `fvheat check`; found by the fuzz test's
targeted mutations, tests/cli/fuzzing.py)."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

import fvheat.drawing.dxf as dxf
from fvheat.errors import DrawingError


@pytest.mark.skipif(not Path("/dev/zero").exists(), reason="needs /dev/zero")
def test_device():
    with pytest.raises(DrawingError, match="not a regular file"):
        dxf.read_drawing("/dev/zero", 0.1)


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs named pipes")
def test_pipe(tmp_path):
    fifo = tmp_path / "detail.dxf"
    os.mkfifo(fifo)
    with pytest.raises(DrawingError, match="not a regular file"):
        dxf.read_drawing(fifo, 0.1)


def test_too_large(tmp_path, monkeypatch):
    big = tmp_path / "big.dxf"
    big.write_bytes(b"0\nEOF\n" * 1000)
    monkeypatch.setattr(dxf, "MAX_DRAWING_BYTES", 1000)
    with pytest.raises(DrawingError, match="drawings up to"):
        dxf.read_drawing(big, 0.1)
