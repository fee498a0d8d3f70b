"""``fvheat report DIR``: rebuild report.html and report.md (and report.pdf) from a results
folder, optionally with the validation table of this installation."""

from __future__ import annotations

from pathlib import Path


def report_folder(
    folder: Path, *, pdf: bool = False, validation: bool = False, quiet: bool = False
) -> int:
    """Write the report of ``folder`` and print the file names. Exit code 1 when the
    validation cases were run and one failed (the report, saying so, is still written)."""
    from fvheat.output.report import write_report
    from fvheat.output.results import ResultsFolder

    results = ResultsFolder.open(folder)  # a bad folder is refused before any work
    table = None
    passed = True
    if validation:
        from fvheat.output.report.blocks import Table
        from fvheat.validation import run_validation
        from fvheat.validation.table import HEADER, rows

        checks = run_validation()
        passed = all(c.passed for c in checks)
        body = [[*r, c.source] for r, c in zip(rows(checks), checks, strict=True)]
        table = (
            Table([*HEADER, "source"], body, [False, False, True, True, False, False, False]),
            passed,
        )
    for path in write_report(results, pdf=pdf, validation=table):
        if not quiet:
            print(path)
    return 0 if passed else 1
