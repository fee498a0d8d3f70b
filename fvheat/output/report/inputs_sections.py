"""The report's input sections: materials (with where their values come from), boundaries,
probes, mesh and time stepping, as ``inputs.json`` and ``summary.json`` hold them."""

from __future__ import annotations

from typing import Any

from fvheat.output.report.blocks import Para, Section, Table, num, point

#: what a material row says when inputs.json predates material sources
UNKNOWN_SOURCE = "not recorded (results written before sources were kept)"


def input_sections(s: dict[str, Any], inputs: dict[str, Any] | None) -> list[Section]:
    """Materials, boundaries, probes, mesh and time-stepping sections (level 3)."""
    mats = Section("materials", "Materials", 3)
    bnds = Section("boundaries", "Boundaries", 3)
    out = [mats, bnds]
    if inputs is None:
        mats.blocks.append(Para("Material inputs not available for this folder.", "note"))
        bnds.blocks.append(Para("Boundary inputs not available for this folder.", "note"))
    else:
        mats.blocks += _material_blocks(inputs["materials"])
        bnds.blocks += _boundary_blocks(s, inputs)
        if inputs.get("probes"):
            probes = Section("probes", "Probes", 3)
            probes.blocks.append(
                Table(["probe", "at"], [[p["name"], point(p["at"])] for p in inputs["probes"]])
            )
            out.append(probes)
    out.append(_mesh_section(s, inputs))
    if inputs is not None and inputs.get("time"):
        out.append(_time_section(inputs["time"]))
    return out


def _material_blocks(materials: list[dict[str, Any]]) -> list[Para | Table]:
    header = [
        "material",
        "λ W/(m·K)",
        "ρ kg/m³",
        "c J/(kg·K)",
        "latent heat J/kg",
        "cells",
        "area m²",
        "source of the values",
    ]
    rows = [
        [
            m["name"],
            num(m["conductivity"]),
            num(m["density"]),
            num(m["specific_heat"]),
            num(m.get("latent_heat")),
            str(m["cells"]),
            num(m["area"], ".4f"),
            str(m.get("source") or UNKNOWN_SOURCE),
        ]
        for m in materials
    ]
    blocks: list[Para | Table] = [Table(header, rows, [False, *([True] * 6), False])]
    if any("from memory" in str(m.get("source", "")) for m in materials):
        blocks.append(
            Para(
                'Rows whose source says "from memory" hold library values recalled without '
                "the standard at hand: check them against the current edition (and national "
                "annex) or the product's declared value before relying on the results.",
                "caution",
            )
        )
    return blocks


def _boundary_blocks(s: dict[str, Any], inputs: dict[str, Any]) -> list[Para | Table]:
    bsum = s.get("boundaries", {})
    blocks: list[Para | Table] = [
        Table(
            ["boundary", "kind", "condition", "faces", "length m"],
            [
                [
                    b["name"],
                    b["kind"],
                    b["condition"],
                    str(b["faces"]),
                    num(bsum.get(b["name"], {}).get("length", b.get("length")), ".4f"),
                ]
                for b in inputs["boundaries"]
            ],
            [False, False, False, True, True],
        )
    ]
    if inputs.get("adiabatic_faces"):
        blocks.append(
            Para(
                f"{inputs['adiabatic_faces']} exterior faces lie on no boundary and are "
                "adiabatic (cut-off planes of the model)."
            )
        )
    return blocks


#: mesh statistics: summary key -> (label, format, unit)
_MESH_LABELS = {
    "kind": ("mesh", "s", ""),
    "triangles": ("triangles", "d", ""),
    "min_angle_deg": ("smallest triangle angle", ".1f", "°"),
    "cells": ("cells", "d", ""),
    "interior_faces": ("interior faces", "d", ""),
    "boundary_faces": ("exterior faces", "d", ""),
    "columns": ("columns", "d", ""),
    "rows": ("rows", "d", ""),
    "smallest_cell": ("smallest cell edge", ".4g", "m"),
    "largest_cell": ("largest cell edge", ".4g", "m"),
    "max_neighbour_ratio": ("largest neighbour size ratio", ".3f", ""),
}


def _mesh_section(s: dict[str, Any], inputs: dict[str, Any] | None) -> Section:
    stats = s.get("mesh") or {"cells": s.get("cells")}
    rows = []
    for k, v in stats.items():
        label, fmt, unit = _MESH_LABELS.get(k, (k, ".4g", ""))
        rows.append([label, _stat(v, fmt, unit)])
    if inputs is not None and inputs.get("mesh_settings"):
        ms = inputs["mesh_settings"]
        corner = ms.get("corner_cell")
        rows.append(
            [
                "settings",
                f"max_cell {num(ms['max_cell'], 'g', 'm')}, "
                f"min_cell {num(ms['min_cell'], 'g', 'm')}, growth {num(ms['growth'], 'g')}"
                + (f", corner cells {num(corner, 'g', 'm')}" if corner is not None else ""),
            ]
        )
    return Section("mesh", "Mesh", 3, [Table(["mesh", "value"], rows)])


def _stat(v: Any, fmt: str, unit: str) -> str:
    if isinstance(v, str):
        return v
    if isinstance(v, int) and not isinstance(v, bool):
        return str(v)
    return num(v, fmt if fmt != "d" else "g", unit)


def _time_section(t: dict[str, Any]) -> Section:
    initial = str(t["initial_temperature"])
    if t["initial_temperature"] != "steady":
        initial += " °C"
    rows = [
        ["duration", num(t["duration"], "g", "s")],
        ["step", num(t["step"], "g", "s")],
        ["saved every", num(t["save_every"], "g", "s")],
        ["initial temperature", initial],
        ["scheme", str(t["scheme"])],
    ]
    return Section("time", "Time stepping", 3, [Table(["setting", "value"], rows)])
