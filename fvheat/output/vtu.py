"""VTU files with the arrays appended as raw bytes, uncompressed or zlib-compressed.

meshio writes binary VTU as base64 text inside the XML, which costs about 0.6 s for a
1 M-cell field (encoding, then decoding the text to write it), and its zlib writer 20 ms
for a 9 000-cell field; fvheat writes its fields with this module instead. The layout is
VTK's XML "UnstructuredGrid" with ``<AppendedData encoding="raw">``: before each array a
UInt64 byte count, or, compressed (``compressor="vtkZLibDataCompressor"``), VTK's block
header (number of blocks, block size, size of the last block, compressed size of each)
and the blocks, each compressed on its own at zlib level :data:`ZLIB_LEVEL` (as small as
level 6 on these fields, at less than half its time). VTK viewers read both and meshio
reads both too (``meshio.read``, slowly for large files: it converts the raw bytes to
base64 first); :func:`read_vtu` reads them at disk speed and any other VTU through meshio.
"""

from __future__ import annotations

import itertools
import zlib
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
#: bytes per compressed block (VTK's and meshio's default) and the zlib level
ZLIB_BLOCK = 32_768
ZLIB_LEVEL = 1
_ZLIB_NAME = "vtkZLibDataCompressor"

#: one array's bytes in the appended section: a list of byte strings
Payload = list[bytes | memoryview]


def write_raw_vtu(
    path: str | Path,
    points: np.ndarray,
    blocks: Sequence[tuple[str, np.ndarray]],
    cell_data: Mapping[str, Sequence[np.ndarray]],
    point_data: Mapping[str, np.ndarray] | None = None,
    *,
    compress: bool = False,
) -> Path:
    """Write ``points`` (k, 3) m, cell ``blocks`` [(type, connectivity (n, p))] with types
    of :data:`VTK_TYPES`, ``cell_data`` {name: [array per block, (n,) or (n, c)]} and
    ``point_data`` {name: (k,) or (k, c)} as one VTU file, atomically; zlib-compressed
    with ``compress``. Arrays are stored as float64 / int32 / int64 / uint8,
    little-endian; connectivity and offsets as Int32 while they fit."""
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
    stored = [_payload(a, compress) for _, _, a in arrays]
    header = _header(len(points), len(types), arrays, stored, compress)
    return atomic_write_file(path, lambda tmp: _write(tmp, header, stored))


def _payload(a: np.ndarray, compress: bool) -> Payload:
    """The bytes stored for the contiguous array ``a``: its byte count and its bytes, or
    VTK's zlib block header and the compressed blocks."""
    data = a.data.cast("B")
    if not compress:
        return [np.uint64(a.nbytes).astype("<u8").tobytes(), data]
    blocks = [
        zlib.compress(data[i : i + ZLIB_BLOCK], ZLIB_LEVEL) for i in range(0, a.nbytes, ZLIB_BLOCK)
    ]
    last = a.nbytes - (len(blocks) - 1) * ZLIB_BLOCK if blocks else 0
    head = np.array([len(blocks), ZLIB_BLOCK, last, *map(len, blocks)], dtype="<u8")
    return [head.tobytes(), *blocks]


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


def _header(
    n_points: int,
    n_cells: int,
    arrays: list[tuple[str, str, np.ndarray]],
    stored: list[Payload],
    compress: bool,
) -> str:
    """The XML before the raw data (each array's offset: the bytes ``stored`` before it)."""
    parts: dict[str, list[str]] = {"PointData": [], "CellData": [], "Points": [], "Cells": []}
    offset = 0
    for (where, name, a), chunks in zip(arrays, stored, strict=True):
        parts[where].append("        " + _data_array(name, a, offset))
        offset += sum(len(c) for c in chunks)
    body = "\n".join(
        f"      <{where}>\n" + "\n".join(lines) + f"\n      </{where}>"
        for where, lines in parts.items()
        if lines or where != "PointData"
    )
    return (
        '<?xml version="1.0"?>\n'
        '<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" '
        f'header_type="UInt64"{f" compressor={_ZLIB_NAME!r}" if compress else ""}>\n'
        "  <UnstructuredGrid>\n"
        f'    <Piece NumberOfPoints="{n_points}" NumberOfCells="{n_cells}">\n'
        f"{body}\n"
        "    </Piece>\n"
        "  </UnstructuredGrid>\n"
        '  <AppendedData encoding="raw">\n   _'
    )


def _write(path: Path, header: str, stored: list[Payload]) -> None:
    with open(path, "wb") as f:
        _write_body(f, header, stored)


def _write_body(f: BinaryIO, header: str, stored: list[Payload]) -> None:
    f.write(header.encode("ascii"))
    for chunks in stored:
        for chunk in chunks:
            f.write(chunk)
    f.write(b"\n  </AppendedData>\n</VTKFile>\n")


def read_vtu(path: str | Path) -> meshio.Mesh:
    """A VTU file as a :class:`meshio.Mesh`: one written by :func:`write_raw_vtu` read
    directly (its arrays straight from the file's bytes, or decompressed), any other
    through meshio."""
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
    compressor = root.get("compressor")
    if (
        piece is None
        or compressor not in (None, _ZLIB_NAME)
        or root.get("byte_order") != "LittleEndian"
    ):
        return meshio.read(path)

    def array(tag: ElementTree.Element) -> np.ndarray:
        at = start + int(tag.get("offset", "0"))
        dtype = _DTYPES[tag.get("type", "")]
        if compressor is None:
            nbytes = int(np.frombuffer(data, "<u8", 1, at)[0])
            a = np.frombuffer(data, dtype, nbytes // dtype.itemsize, at + 8)
        else:  # VTK's block header, then the blocks
            n = int(np.frombuffer(data, "<u8", 1, at)[0])
            sizes = np.frombuffer(data, "<u8", n, at + 24).astype(np.int64)
            ends = at + 8 * (3 + n) + np.cumsum(sizes)
            raw = b"".join(
                zlib.decompress(data[e - k : e]) for e, k in zip(ends, sizes, strict=True)
            )
            a = np.frombuffer(raw, dtype)
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
