"""The content of a run report, independent of its format (HTML, Markdown or PDF).

:func:`build_document` reads a results folder (``summary.json``, ``inputs.json``, the
figure index) and returns sections of paragraphs, tables and figures, results first: the
summary (project, key numbers, temperature map, cautions), the inputs, the detailed
results, the figures, and the appendix (provenance, software, validation, the case file
last).
"""

from __future__ import annotations

import logging
from typing import Any

from fvheat.output.report.appendix import (
    case_file_section,
    case_section,
    software_section,
    validation_section,
)
from fvheat.output.report.blocks import Document, Figure, Para, Section, Table
from fvheat.output.report.inputs_sections import input_sections
from fvheat.output.report.results_sections import result_sections
from fvheat.output.report.sensitivities import sensitivity_sections
from fvheat.output.report.summary_page import map_figure, summary_section
from fvheat.output.results import ResultsFolder

__all__ = ["SECTION_IDS", "build_document"]

log = logging.getLogger(__name__)

#: section anchors every report has, in order (the case file closes the appendix when
#: inputs.json holds it; "validation" appears before it when asked for)
SECTION_IDS = (
    "summary",
    "inputs",
    "materials",
    "boundaries",
    "mesh",
    "results",
    "heat-flows",
    "junction",
    "grid-check",
    "energy-balance",
    "plots",
    "appendix",
    "case",
    "software",
)


def build_document(folder: ResultsFolder, validation: tuple[Table, bool] | None = None) -> Document:
    """All sections of the report of ``folder``; ``validation`` (the table of ``fvheat
    validate`` and whether every case passed) adds an appendix section."""
    from fvheat.output.plots.figures import read_index

    s = folder.summary
    inputs = folder.inputs() or _inputs_from_case(s)
    project = s.get("project") or {}
    when = (
        f"transient, results at t = {s.get('time_s', 0.0) / 3600:.4g} h"
        if folder.transient
        else "steady state"
    )
    subtitle = f"2-D heat transfer, {when}"
    if project.get("name") or project.get("reference"):
        named = " · ".join(str(project[k]) for k in ("name", "reference") if project.get(k))
        subtitle = f"{named} — {subtitle}"
    figures = [Figure(r.png, r.caption) for r in read_index(folder)]
    doc = Document(title=str(s.get("title") or "fvheat results"), subtitle=subtitle, sections=[])
    add = doc.sections.append
    add(summary_section(s, figures))
    add(Section("inputs", "Inputs"))
    doc.sections += input_sections(s, inputs)
    add(Section("results", "Results in detail"))
    doc.sections += result_sections(s)
    doc.sections += sensitivity_sections(s)
    plots = Section("plots", "Figures")
    shown = map_figure(figures)
    if figures:
        plots.blocks = [f for f in figures if f is not shown]
        if shown is not None:
            plots.blocks.insert(0, Para("The temperature map is shown in the summary.", "note"))
    else:
        plots.blocks = [
            Para(
                "No figures in this folder (run without --no-plots, or `fvheat plot DIR`).", "note"
            )
        ]
    add(plots)
    add(Section("appendix", "Appendix"))
    add(case_section(s))
    add(software_section(s))
    if validation is not None:
        add(validation_section(*validation))
    listing = case_file_section(inputs)
    if listing is not None:
        add(listing)
    return doc


def _inputs_from_case(s: dict[str, Any]) -> dict[str, Any] | None:
    """Inputs rebuilt from the case file named in the summary (older folders)."""
    from fvheat.case.load import load_case
    from fvheat.errors import FvheatError
    from fvheat.mesh.select import build_mesh
    from fvheat.output.inputs import case_inputs

    path = s.get("case_file")
    if not path:
        return None
    try:
        case = load_case(path, tuple(s.get("overrides") or ()))
        return case_inputs(case, build_mesh(case))
    except (FvheatError, OSError) as err:
        log.warning("inputs not available: %s", err)
        return None
