"""The validation table as text (for the terminal) and as rows (for the report)."""

from __future__ import annotations

import platform
import textwrap

from fvheat import __version__
from fvheat.validation.check import Check

HEADER = ["case", "quantity", "reference", "computed", "tolerance", "pass"]


def rows(checks: list[Check]) -> list[list[str]]:
    """One row of strings per check, in the order of :data:`HEADER`."""
    return [
        [
            c.case,
            f"{c.quantity} ({c.unit})" if c.unit else c.quantity,
            f"{c.reference:.6g}",
            f"{c.computed:.6g}",
            c.tolerance_text(),
            "yes" if c.passed else "NO",
        ]
        for c in checks
    ]


def sources(checks: list[Check]) -> list[tuple[str, str]]:
    """(case, source) pairs, each once, in table order."""
    seen: dict[tuple[str, str], None] = {}
    for c in checks:
        seen[(c.case, c.source)] = None
    return list(seen)


def text_table(checks: list[Check]) -> str:
    """The table, the sources of the references and the verdict, as printed by
    ``fvheat validate``."""
    body = rows(checks)
    widths = [max(len(r[i]) for r in [HEADER, *body]) for i in range(len(HEADER))]
    right = {2, 3}

    def line(cells: list[str]) -> str:
        """One row, columns padded to their widths (numbers on the right)."""
        return "  ".join(
            c.rjust(w) if i in right else c.ljust(w)
            for i, (c, w) in enumerate(zip(cells, widths, strict=True))
        ).rstrip()

    out = [
        f"fvheat {__version__} reference cases (Python {platform.python_version()})",
        "",
        line(HEADER),
        line(["-" * w for w in widths]),
        *(line(r) for r in body),
        "",
        "Sources of the references:",
        *(
            textwrap.fill(f"{case}: {src}", 78, initial_indent="  ", subsequent_indent="    ")
            for case, src in sources(checks)
        ),
        "",
    ]
    failed = sum(not c.passed for c in checks)
    if failed:
        out.append(f"{failed} of {len(checks)} checks FAILED: do not rely on this installation.")
    else:
        out.append(f"All {len(checks)} checks passed.")
    return "\n".join(out)
