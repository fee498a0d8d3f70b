"""The report as Markdown: the same sections as the HTML report, figures linked by their
relative paths in the results folder."""

from __future__ import annotations

from fvheat.cautions import CAUTION
from fvheat.output.report.document import Code, Document, Figure, Para, Table


def _cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def _table(t: Table) -> list[str]:
    numeric = t.numeric or [False] * len(t.header)
    lines = [
        "| " + " | ".join(_cell(h) for h in t.header) + " |",
        "|" + "|".join("---:" if n else "---" for n in numeric) + "|",
    ]
    lines += ["| " + " | ".join(_cell(c) for c in row) + " |" for row in t.rows]
    return lines


def _para(p: Para) -> str:
    if p.kind == "caution":
        return f"> **Caution.** {p.text}"
    if p.kind == "fail":
        return f"**{p.text}**"
    if p.kind == "note":
        return f"*{p.text}*"
    return p.text


def render_markdown(doc: Document) -> str:
    """The Markdown text of ``doc``."""
    out = [f"# {doc.title}", "", doc.subtitle, "", f"> **Caution.** {CAUTION}", ""]
    for sec in doc.sections:
        out += [f"{'#' * sec.level} {sec.title}", ""]
        for b in sec.blocks:
            if isinstance(b, Para):
                out.append(_para(b))
            elif isinstance(b, Table):
                out += _table(b)
            elif isinstance(b, Figure):
                out.append(f"![{_cell(b.caption)}]({b.png})")
                out += ["", f"*{b.caption}*"]
            elif isinstance(b, Code):
                fence = "````" if "```" in b.text else "```"
                out += [f"{b.label}:", "", f"{fence}toml", b.text.rstrip("\n"), fence]
            out.append("")
    return "\n".join(out).rstrip("\n") + "\n"
