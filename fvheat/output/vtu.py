"""Uncompressed VTU files with the arrays appended as raw bytes: written at disk speed.

meshio writes binary VTU as base64 text inside the XML, which costs about 0.6 s for a
1 M-cell field (encoding, then decoding the text to write it); fvheat writes large,
uncompressed fields with this module instead. The layout is VTK's XML "UnstructuredGrid"
with ``<AppendedData encoding="raw">`` and a UInt64 byte count before each array, which
VTK viewers read and meshio reads too (``meshio.read``); small fields are still written
zlib-compressed through meshio (:mod:`fvheat.output.fields`).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import BinaryIO

import numpy as np

from fvheat.output.files import atomic_write_file

#: VTK cell type numbers of the cells fvheat writes
VTK_TYPES = {"line": 3, "triangle": 5, "quad": 9}

_VTK_NAMES = {
    np.dtype(np.float64): "Float64",
    np.dtype(np.int32): "Int32",
    np.dtype(np.int64): "Int64",
    np.dtype(np.uint8): "UInt8",
}


def write_raw_vtu(
    path: str | Path,
    points: np.ndarray,
    blocks: Sequence[tuple[str, np.ndarray]],
    cell_data: Mapping[str, Sequence[np.ndarray]],
) -> Path:
    """Write ``points`` (k, 3) m, cell ``blocks`` [(type, connectivity (n, p))] with types
    of :data:`VTK_TYPES`, and ``cell_data`` {name: [array per block, (n,) or (n, c)]}
    as one VTU file, atomically. Arrays are stored as float64 / int32 / int64 / uint8,
    little-endian."""
    conn = np.concatenate([np.asarray(c, np.int64).ravel() for _, c in blocks])
    sizes = np.concatenate([np.full(len(c), np.shape(c)[1], np.int64) for _, c in blocks])
    types = np.concatenate([np.full(len(c), VTK_TYPES[k], np.uint8) for k, c in blocks])
    offsets = np.cumsum(sizes)
    arrays: list[tuple[str, str, np.ndarray]] = [("Points", "", np.asarray(points, float))]
    arrays += [("Cells", "connectivity", conn), ("Cells", "offsets", offsets)]
    arrays += [("Cells", "types", types)]
    for name, parts in cell_data.items():
        arrays.append(("CellData", name, np.concatenate([np.asarray(p) for p in parts])))
    arrays = [(where, name, _little_endian(a)) for where, name, a in arrays]
    header = _header(len(points), len(types), arrays)
    return atomic_write_file(path, lambda tmp: _write(tmp, header, arrays))


def _little_endian(a: np.ndarray) -> np.ndarray:
    """``a`` as a contiguous little-endian array of a type VTK names."""
    kind = a.dtype.kind
    dtype = np.dtype(np.float64 if kind == "f" else np.uint8 if kind == "u" else a.dtype)
    if kind == "i" and dtype.itemsize not in (4, 8):
        dtype = np.dtype(np.int64)
    return np.ascontiguousarray(a, dtype=dtype.newbyteorder("<"))


def _data_array(name: str, a: np.ndarray, offset: int) -> str:
    comps = f' NumberOfComponents="{a.shape[1]}"' if a.ndim == 2 else ""
    label = f' Name="{name}"' if name else ""
    kind = _VTK_NAMES[a.dtype.newbyteorder("=")]
    return f'<DataArray type="{kind}"{label}{comps} format="appended" offset="{offset}"/>'


def _header(n_points: int, n_cells: int, arrays: list[tuple[str, str, np.ndarray]]) -> str:
    """The XML before the raw data (offsets count each array's 8-byte length too)."""
    parts: dict[str, list[str]] = {"Points": [], "Cells": [], "CellData": []}
    offset = 0
    for where, name, a in arrays:
        parts[where].append("        " + _data_array(name, a, offset))
        offset += 8 + a.nbytes
    body = "\n".join(
        f"      <{where}>\n" + "\n".join(lines) + f"\n      </{where}>"
        for where, lines in parts.items()
    )
    return (
        '<?xml version="1.0"?>\n'
        '<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" '
        'header_type="UInt64">\n'
        "  <UnstructuredGrid>\n"
        f'    <Piece NumberOfPoints="{n_points}" NumberOfCells="{n_cells}">\n'
        f"{body}\n"
        "    </Piece>\n"
        "  </UnstructuredGrid>\n"
        '  <AppendedData encoding="raw">\n   _'
    )


def _write(path: Path, header: str, arrays: list[tuple[str, str, np.ndarray]]) -> None:
    with open(path, "wb") as f:
        _write_body(f, header, arrays)


def _write_body(f: BinaryIO, header: str, arrays: list[tuple[str, str, np.ndarray]]) -> None:
    f.write(header.encode("ascii"))
    for _, _, a in arrays:
        f.write(np.uint64(a.nbytes).astype("<u8").tobytes())
        f.write(a.data.cast("B"))
    f.write(b"\n  </AppendedData>\n</VTKFile>\n")
