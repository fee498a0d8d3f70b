"""The report as Markdown: the same sections as the HTML report, figures linked by their
relative paths in the results folder."""

from __future__ import annotations

import re

from fvheat.cautions import CAUTION
from fvheat.output.report.blocks import Code, Document, Figure, Para, Table

#: characters that Markdown (and renderers with HTML or maths) would read as markup
_SPECIAL = re.compile(r"([\\`*_{}\[\]<>|$~!#])")
#: a line start that would open a list, a heading or a quote
_LINE_START = re.compile(r"^(\s*)([-+>]|\d+[.)])(?=\s)")


def _text(text: str) -> str:
    """``text`` (titles, names, values, captions) shown literally: markup escaped."""
    one = " ".join(str(text).splitlines())
    return _LINE_START.sub(_escape_start, _SPECIAL.sub(r"\\\1", one))


def _escape_start(m: re.Match[str]) -> str:
    mark = m.group(2)  # "1." becomes "1\.", "-" becomes "\-"
    return m.group(1) + (mark[:-1] + "\\" + mark[-1] if mark[0].isdigit() else "\\" + mark)


def _cell(text: str) -> str:
    return _text(text)


def _table(t: Table) -> list[str]:
    numeric = t.numeric or [False] * len(t.header)
    lines = [
        "| " + " | ".join(_cell(h) for h in t.header) + " |",
        "|" + "|".join("---:" if n else "---" for n in numeric) + "|",
    ]
    lines += ["| " + " | ".join(_cell(c) for c in row) + " |" for row in t.rows]
    return lines


def _para(p: Para) -> str:
    text = _text(p.text)
    if p.kind == "caution":
        return f"> **Caution.** {text}"
    if p.kind == "fail":
        return f"**{text}**"
    if p.kind == "note":
        return f"*{text}*"
    return text


def render_markdown(doc: Document) -> str:
    """The Markdown text of ``doc``."""
    out = [f"# {_text(doc.title)}", "", _text(doc.subtitle), "", f"> **Caution.** {CAUTION}", ""]
    for sec in doc.sections:
        out += [f"{'#' * sec.level} {_text(sec.title)}", ""]
        for b in sec.blocks:
            if isinstance(b, Para):
                out.append(_para(b))
            elif isinstance(b, Table):
                out += _table(b)
            elif isinstance(b, Figure):
                out.append(f"![{_text(b.caption)}](<{b.png}>)")
                out += ["", f"*{_text(b.caption)}*"]
            elif isinstance(b, Code):
                fence = "````" if "```" in b.text else "```"
                out += [f"{b.label}:", "", f"{fence}toml", b.text.rstrip("\n"), fence]
            out.append("")
    return "\n".join(out).rstrip("\n") + "\n"
