"""What the commands print besides their results: warnings, one line each."""

from __future__ import annotations

import sys


def print_warnings(warnings: list[str]) -> None:
    """The modelling and junction warnings, one line each, on standard error."""
    for w in warnings:
        print(f"fvheat: warning: {w}", file=sys.stderr)
