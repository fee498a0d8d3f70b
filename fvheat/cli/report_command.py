"""``fvheat report DIR``: rebuild report.html and report.md from a results folder."""

from __future__ import annotations

from pathlib import Path


def report_folder(folder: Path, *, quiet: bool = False) -> None:
    """Write the report of ``folder`` and print the file names."""
    from fvheat.output.report import write_report

    for path in write_report(folder):
        if not quiet:
            print(path)
