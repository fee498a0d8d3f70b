"""The run report: ``report.html`` (self-contained) and ``report.md`` in the results folder,
and ``report.pdf`` (A4) when asked for."""

from __future__ import annotations

from pathlib import Path

from fvheat.output.files import atomic_write_text
from fvheat.output.report.blocks import Table
from fvheat.output.report.document import build_document
from fvheat.output.report.html import render_html
from fvheat.output.report.markdown import render_markdown
from fvheat.output.results import ResultsFolder

HTML_FILE = "report.html"
MARKDOWN_FILE = "report.md"
PDF_FILE = "report.pdf"

__all__ = ["HTML_FILE", "MARKDOWN_FILE", "PDF_FILE", "write_report"]


def write_report(
    folder: ResultsFolder | str | Path,
    *,
    pdf: bool = False,
    validation: tuple[Table, bool] | None = None,
) -> list[Path]:
    """Build the report of a results folder and write report.html and report.md into it,
    and report.pdf when ``pdf`` (else an earlier report.pdf is removed: it would no longer
    match). ``validation``: the table of ``fvheat validate`` and whether all passed, added
    to the appendix. Returns the paths written."""
    folder = folder if isinstance(folder, ResultsFolder) else ResultsFolder.open(folder)
    doc = build_document(folder, validation)
    written = [
        atomic_write_text(folder.path / HTML_FILE, render_html(doc, folder.path)),
        atomic_write_text(folder.path / MARKDOWN_FILE, render_markdown(doc)),
    ]
    target = folder.path / PDF_FILE
    if pdf:
        from fvheat.output.report.pdf import render_pdf

        written.append(render_pdf(doc, folder.path, target))
    elif target.is_file() or target.is_symlink():
        target.unlink()
    return written
