"""The ``[project]`` table: who the work is for and who did it, shown at the top of the
report and in ``summary.json`` (all keys optional, free text):

```toml
[project]
name = "Harbour Row, block C"
reference = "HR-C-2026-014"
client = "..."
author = "..."
checker = "..."
date = 2026-12-01        # a TOML date or any text
notes = "..."
```
"""

from __future__ import annotations

import datetime as dt
from typing import Any

from fvheat.case.fields import Context, Invalid, describe, join, table
from fvheat.case.model import Project

KEYS = ("name", "reference", "client", "author", "checker", "date", "notes")
#: longest text accepted per key (characters); the report is not a document store
MAX_LENGTH = 2000


def parse_project(value: Any, ctx: Context) -> Project | None:
    """Validate ``[project]``; None when the table is absent."""
    if value is None:
        return None
    tbl = table(value, "project", allowed=KEYS)
    return Project(**{key: _text(tbl[key], join("project", key)) for key in tbl})


def _text(value: Any, path: str) -> str:
    """A text value; whole numbers and TOML dates are taken as written."""
    if isinstance(value, dt.date | dt.time):  # datetime is a date
        text = value.isoformat()
    elif isinstance(value, int) and not isinstance(value, bool):
        text = str(value)
    elif isinstance(value, str):
        text = value.strip()
    else:
        raise Invalid(path, f"expected text, got {describe(value)}")
    if len(text) > MAX_LENGTH:
        raise Invalid(path, f"longer than {MAX_LENGTH} characters ({len(text)})")
    return text
