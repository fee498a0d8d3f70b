"""``fvheat validate``: run the reference cases on this installation and print the table."""

from __future__ import annotations


def validate(*, quiet: bool = False) -> int:
    """Print the validation table (unless ``quiet``); exit code 0 when every check passed,
    1 when one failed."""
    from fvheat.validation import run_validation
    from fvheat.validation.table import text_table

    checks = run_validation()
    if not quiet:
        print(text_table(checks))
    return 0 if all(c.passed for c in checks) else 1
