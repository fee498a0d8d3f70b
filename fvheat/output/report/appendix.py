"""The report's appendix: the case and its provenance, the software, the validation table
(when asked for) and, last, the case file as run."""

from __future__ import annotations

import platform
from typing import Any

from fvheat import __version__
from fvheat.output.report.blocks import Code, Para, Section, Table, num


def case_section(s: dict[str, Any]) -> Section:
    """Which case file (with its SHA-256 and overrides) and which version made the results."""
    rows = [
        ["case file", str(s.get("case_file", "–"))],
        ["SHA-256 (file and overrides)", str(s.get("case_sha256") or "–")],
        ["overrides", ", ".join(s.get("overrides") or []) or "none"],
        ["computed with", f"fvheat {s.get('fvheat_version', '?')}"],
    ]
    geometry = s.get("geometry") or {}
    if geometry.get("drawing"):
        rows.append(
            ["drawing", f"{geometry['drawing']} (SHA-256 {geometry.get('drawing_sha256')})"]
        )
    if geometry.get("units") and geometry["units"] != "m":
        rows.append(["length unit of the case file", str(geometry["units"])])
    if s.get("solve_seconds") is not None:
        rows.append(["solve time", num(s["solve_seconds"], ".2f", "s")])
    return Section("case", "Case and provenance", 3, [Table(["item", "value"], rows)])


def software_section(s: dict[str, Any]) -> Section:
    """Versions of fvheat and the libraries it stands on, and the method in one paragraph."""
    import numpy
    import scipy

    from fvheat.versions import package_version  # without importing what a run did not need

    rows = [
        ["computed with", f"fvheat {s.get('fvheat_version', '?')}"],
        ["report written with", f"fvheat {__version__}"],
        ["Python", platform.python_version()],
        ["NumPy / SciPy", f"{numpy.__version__} / {scipy.__version__}"],
        ["matplotlib / meshio", f"{package_version('matplotlib')} / {package_version('meshio')}"],
    ]
    return Section(
        "software",
        "Software",
        3,
        [
            Table(["component", "version"], rows),
            Para(
                (
                    "Vertex-centred finite volumes (box method) on a conforming triangle mesh, "
                    "each triangle's own conductivity in its edge coefficients"
                    if (s.get("mesh") or {}).get("kind") == "triangles"
                    else "Cell-centred finite volumes on a rectilinear grid, harmonic-mean face "
                    "conductances"
                )
                + "; heat flows, surface temperatures and heat-flux vectors come from "
                "the same face fluxes the solver balanced."
            ),
        ],
    )


def validation_section(table: Table, passed: bool) -> Section:
    """The table of ``fvheat validate`` (run when the report was written) and its verdict."""
    verdict = (
        "Every reference case passed on this machine with this version."
        if passed
        else "At least one reference case FAILED: do not rely on results of this installation."
    )
    return Section(
        "validation",
        "Validation on this installation",
        3,
        [
            Para(
                f"fvheat {__version__} ran its own reference cases (`fvheat validate`) when this "
                f"report was written, on Python {platform.python_version()}. Each row names the "
                "source of its reference value."
            ),
            table,
            Para(verdict, "pass" if passed else "fail"),
        ],
    )


def case_file_section(inputs: dict[str, Any] | None) -> Section | None:
    """The case file's text as run (None when inputs.json does not hold it)."""
    if inputs is None or not inputs.get("case_text"):
        return None
    label = f"case file as run: {inputs.get('case_file', '')}"
    return Section("case-file", "Case file", 3, [Code(inputs["case_text"], label)])
