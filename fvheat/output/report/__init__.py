"""The run report: ``report.html`` (self-contained) and ``report.md`` in the results folder."""

from __future__ import annotations

from pathlib import Path

from fvheat.output.files import atomic_write_text
from fvheat.output.report.document import build_document
from fvheat.output.report.html import render_html
from fvheat.output.report.markdown import render_markdown
from fvheat.output.results import ResultsFolder

HTML_FILE = "report.html"
MARKDOWN_FILE = "report.md"

__all__ = ["HTML_FILE", "MARKDOWN_FILE", "write_report"]


def write_report(folder: ResultsFolder | str | Path) -> list[Path]:
    """Build the report of a results folder and write report.html and report.md into it."""
    folder = folder if isinstance(folder, ResultsFolder) else ResultsFolder.open(folder)
    doc = build_document(folder)
    return [
        atomic_write_text(folder.path / HTML_FILE, render_html(doc, folder.path)),
        atomic_write_text(folder.path / MARKDOWN_FILE, render_markdown(doc)),
    ]
