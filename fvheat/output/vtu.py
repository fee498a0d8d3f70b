"""Uncompressed VTU files with the arrays appended as raw bytes: written at disk speed.

meshio writes binary VTU as base64 text inside the XML, which costs about 0.6 s for a
1 M-cell field (encoding, then decoding the text to write it); fvheat writes large,
uncompressed fields with this module instead. The layout is VTK's XML "UnstructuredGrid"
with ``<AppendedData encoding="raw">`` and a UInt64 byte count before each array, which
VTK viewers read and meshio reads too (``meshio.read``, slowly: it converts the raw bytes
to base64 first); :func:`read_vtu` reads such files at disk speed and any other VTU through
meshio. Small fields are still written zlib-compressed through meshio
(:mod:`fvheat.output.fields`).
"""

from __future__ import annotations

import itertools
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, BinaryIO
from xml.etree import ElementTree

import numpy as np

from fvheat.output.files import atomic_write_file

if TYPE_CHECKING:
    import meshio

#: VTK cell type numbers of the cells fvheat writes
VTK_TYPES = {"line": 3, "triangle": 5, "quad": 9}

_VTK_NAMES: dict[np.dtype, str] = {
    np.dtype(np.float64): "Float64",
    np.dtype(np.int32): "Int32",
    np.dtype(np.int64): "Int64",
    np.dtype(np.uint8): "UInt8",
}
_DTYPES = {name: dtype.newbyteorder("<") for dtype, name in _VTK_NAMES.items()}
_CELL_NAMES = {number: name for name, number in VTK_TYPES.items()}
_RAW_MARK = b'<AppendedData encoding="raw">'


def write_raw_vtu(
    path: str | Path,
    points: np.ndarray,
    blocks: Sequence[tuple[str, np.ndarray]],
    cell_data: Mapping[str, Sequence[np.ndarray]],
    point_data: Mapping[str, np.ndarray] | None = None,
) -> Path:
    """Write ``points`` (k, 3) m, cell ``blocks`` [(type, connectivity (n, p))] with types
    of :data:`VTK_TYPES`, ``cell_data`` {name: [array per block, (n,) or (n, c)]} and
    ``point_data`` {name: (k,) or (k, c)} as one VTU file, atomically. Arrays are stored
    as float64 / int32 / int64 / uint8, little-endian; connectivity and offsets as Int32
    while they fit."""
    ids = _id_type(len(points), sum(np.size(c) for _, c in blocks))
    conn = np.concatenate([np.asarray(c, ids).ravel() for _, c in blocks])
    sizes = np.concatenate([np.full(len(c), np.shape(c)[1], ids) for _, c in blocks])
    types = np.concatenate([np.full(len(c), VTK_TYPES[k], np.uint8) for k, c in blocks])
    offsets = np.cumsum(sizes, dtype=ids)
    arrays: list[tuple[str, str, np.ndarray]] = [("Points", "", np.asarray(points, float))]
    arrays += [("Cells", "connectivity", conn), ("Cells", "offsets", offsets)]
    arrays += [("Cells", "types", types)]
    for name, values in (point_data or {}).items():
        arrays.append(("PointData", name, np.asarray(values)))
    for name, parts in cell_data.items():
        arrays.append(("CellData", name, np.concatenate([np.asarray(p) for p in parts])))
    arrays = [(where, name, _little_endian(a)) for where, name, a in arrays]
    header = _header(len(points), len(types), arrays)
    return atomic_write_file(path, lambda tmp: _write(tmp, header, arrays))


def _id_type(n_points: int, n_entries: int) -> type[np.signedinteger]:
    """Connectivity and offsets as Int32 while every value fits (half the bytes of Int64,
    the cells' largest share of a file; VTK and meshio read either), else Int64."""
    return np.int32 if max(n_points, n_entries) < 2**31 else np.int64


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
    parts: dict[str, list[str]] = {"PointData": [], "CellData": [], "Points": [], "Cells": []}
    offset = 0
    for where, name, a in arrays:
        parts[where].append("        " + _data_array(name, a, offset))
        offset += 8 + a.nbytes
    body = "\n".join(
        f"      <{where}>\n" + "\n".join(lines) + f"\n      </{where}>"
        for where, lines in parts.items()
        if lines or where != "PointData"
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


def read_vtu(path: str | Path) -> meshio.Mesh:
    """A VTU file as a :class:`meshio.Mesh`: one written by :func:`write_raw_vtu` read
    directly (its arrays straight from the file's bytes), any other through meshio."""
    import meshio

    path = Path(path)
    with open(path, "rb") as f:
        head = f.read(1 << 16)
    if _RAW_MARK not in head or b'header_type="UInt64"' not in head:
        return meshio.read(path)
    data = bytearray(path.stat().st_size)
    with open(path, "rb") as f:
        f.readinto(data)
    mark = data.find(_RAW_MARK)
    root = ElementTree.fromstring(bytes(data[:mark]) + b"</VTKFile>")
    start = data.index(b"_", mark) + 1
    piece = root.find("UnstructuredGrid/Piece")
    if piece is None or root.get("compressor") or root.get("byte_order") != "LittleEndian":
        return meshio.read(path)

    def array(tag: ElementTree.Element) -> np.ndarray:
        at = start + int(tag.get("offset", "0"))
        nbytes = int(np.frombuffer(data, "<u8", 1, at)[0])
        dtype = _DTYPES[tag.get("type", "")]
        a = np.frombuffer(data, dtype, nbytes // dtype.itemsize, at + 8)
        comps = int(tag.get("NumberOfComponents", "1"))
        return a.reshape(-1, comps) if comps > 1 else a

    def arrays(where: str) -> dict[str, np.ndarray]:
        return {t.get("Name", ""): array(t) for t in piece.findall(f"{where}/DataArray")}

    points = array(piece.findall("Points/DataArray")[0])
    cells = arrays("Cells")
    types, offsets, conn = cells["types"], cells["offsets"], cells["connectivity"]
    starts = np.concatenate([[0], offsets[:-1]])
    runs = np.concatenate([[0], np.flatnonzero(np.diff(types)) + 1, [types.size]])
    cell_data = arrays("CellData")
    blocks = []
    data_blocks: dict[str, list[np.ndarray]] = {name: [] for name in cell_data}
    for a, b in itertools.pairwise(runs.tolist()):
        width = int(offsets[a] - starts[a])
        nodes = conn[int(starts[a]) : int(offsets[b - 1])].reshape(-1, width)
        blocks.append((_CELL_NAMES[int(types[a])], nodes))
        for name, values in cell_data.items():
            data_blocks[name].append(values[a:b])
    return meshio.Mesh(points, blocks, point_data=arrays("PointData"), cell_data=data_blocks)
