#!/usr/bin/env python3
"""Check that VTK itself (the library VTK viewers are built on) reads fvheat's field files:
the raw-appended VTU of large fields and the zlib-compressed one of small fields. Not a test
(VTK is a 500 MB install): run it by hand after changing ``fvheat/output/vtu.py``.

    python3 -m pip install vtk
    python3 scripts/check_vtk_reading.py

Prints, for both files, the point and cell counts, the cell arrays, the cell types and
whether the cell temperatures VTK reads equal the solver's bit for bit; exit 1 otherwise.
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]


def main() -> int:
    try:
        import vtk
        from vtkmodules.util.numpy_support import vtk_to_numpy
    except ImportError:
        print("needs VTK: python3 -m pip install vtk", file=sys.stderr)
        return 2
    from fvheat.case.load import load_case
    from fvheat.output.fields import write_vtu
    from fvheat.output.view import field_view
    from fvheat.simulate import simulate

    view = field_view(simulate(load_case(ROOT / "cases" / "balcony_slab.toml")))
    ok = True
    with tempfile.TemporaryDirectory() as work:
        for compress in (False, True):
            path = write_vtu(Path(work) / f"field_{compress}.vtu", view, compress=compress)
            reader = vtk.vtkXMLUnstructuredGridReader()
            reader.SetFileName(str(path))
            reader.Update()
            grid = reader.GetOutput()
            data = grid.GetCellData()
            names = [data.GetArrayName(i) for i in range(data.GetNumberOfArrays())]
            temp = vtk_to_numpy(data.GetArray("temperature"))[: view.n_cells]
            same = bool(np.array_equal(temp, view.temperature))
            types = sorted({grid.GetCellType(i) for i in range(grid.GetNumberOfCells())})
            ok &= same and reader.GetErrorCode() == 0 and types == [3, 9]
            print(
                f"{'zlib' if compress else 'raw '}: {grid.GetNumberOfPoints()} points, "
                f"{grid.GetNumberOfCells()} cells (types {types}), arrays {names}, "
                f"temperatures equal: {same}"
            )
    print("VTK reads both" if ok else "VTK disagrees")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
