"""The report as one self-contained HTML file: styles inline, figures embedded as base64 PNG,
no external links."""

from __future__ import annotations

import base64
from html import escape
from pathlib import Path

from fvheat.cautions import CAUTION
from fvheat.output.report.blocks import Code, Document, Figure, Para, Table

CSS = """
:root { --ink: #1f2328; --muted: #5c6370; --rule: #d7dbe0; --accent: #1d7874;
        --warn: #b5651d; --ok: #2d7a3e; --bad: #b3261e; }
body { font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, sans-serif;
       color: var(--ink); max-width: 62rem; margin: 2rem auto; padding: 0 1.2rem; }
header { border-bottom: 3px solid var(--accent); margin-bottom: 1.2rem; }
h1 { font-size: 1.6rem; margin: 0 0 .2rem; }
header p { color: var(--muted); margin: 0 0 .8rem; }
h2 { font-size: 1.25rem; margin-top: 2.2rem; color: var(--accent);
     border-bottom: 1px solid var(--rule); padding-bottom: .2rem; }
h3 { font-size: 1.05rem; margin-top: 1.4rem; }
nav { font-size: .9rem; color: var(--muted); }
nav a { color: var(--accent); margin-right: .8rem; text-decoration: none; }
table { border-collapse: collapse; margin: .6rem 0; font-size: .92rem; }
th, td { padding: .25rem .7rem; border-bottom: 1px solid var(--rule); text-align: left;
         vertical-align: top; overflow-wrap: anywhere; }
th { border-bottom: 2px solid var(--ink); font-weight: 600; }
td.n { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
p.note { color: var(--muted); font-style: italic; }
p.caution { border-left: 4px solid var(--warn); background: #fbf4ec; padding: .5rem .8rem; }
p.pass { border-left: 4px solid var(--ok); padding-left: .8rem; color: var(--ok); }
p.fail { border-left: 4px solid var(--bad); padding-left: .8rem; color: var(--bad);
         font-weight: 600; }
figure { margin: 1.2rem 0 1.8rem; }
figure img { max-width: 100%; height: auto; border: 1px solid var(--rule); }
figcaption { font-size: .9rem; color: var(--muted); margin-top: .3rem; }
details pre { background: #f5f6f7; padding: .7rem; overflow-x: auto; font-size: .82rem; }
footer { margin-top: 3rem; font-size: .85rem; color: var(--muted);
         border-top: 1px solid var(--rule); padding-top: .6rem; }
@media print { body { max-width: none; margin: 0; } figure, tr { break-inside: avoid; }
               thead { display: table-header-group; } }
"""


def _table(t: Table) -> str:
    numeric = t.numeric or [False] * len(t.header)
    head = "".join(f"<th>{escape(h)}</th>" for h in t.header)
    body = "".join(
        "<tr>"
        + "".join(
            f'<td class="n">{escape(c)}</td>' if n else f"<td>{escape(c)}</td>"
            for c, n in zip(row, numeric, strict=False)
        )
        + "</tr>"
        for row in t.rows
    )
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def _figure(f: Figure, root: Path) -> str:
    data = base64.b64encode((root / f.png).read_bytes()).decode("ascii")
    return (
        f'<figure><img src="data:image/png;base64,{data}" alt="{escape(f.caption)}">'
        f"<figcaption>{escape(f.caption)}</figcaption></figure>"
    )


def render_html(doc: Document, root: str | Path) -> str:
    """The HTML text of ``doc``; figure files are read from the results folder ``root``."""
    root = Path(root)
    parts = []
    nav = " ".join(
        f'<a href="#{s.ident}">{escape(s.title)}</a>' for s in doc.sections if s.level == 2
    )
    for sec in doc.sections:
        tag = f"h{sec.level}"
        parts.append(f'<{tag} id="{escape(sec.ident)}">{escape(sec.title)}</{tag}>')
        for b in sec.blocks:
            if isinstance(b, Para):
                parts.append(f'<p class="{b.kind}">{escape(b.text)}</p>')
            elif isinstance(b, Table):
                parts.append(_table(b))
            elif isinstance(b, Figure):
                parts.append(_figure(b, root))
            elif isinstance(b, Code):
                parts.append(
                    f"<details><summary>{escape(b.label)}</summary>"
                    f"<pre>{escape(b.text)}</pre></details>"
                )
    body = "\n".join(parts)
    return (
        "<!DOCTYPE html>\n"
        '<html lang="en">\n<head>\n<meta charset="utf-8">\n'
        '<meta name="viewport" content="width=device-width, initial-scale=1">\n'
        f"<title>{escape(doc.title)}</title>\n<style>{CSS}</style>\n</head>\n<body>\n"
        f"<header><h1>{escape(doc.title)}</h1><p>{escape(doc.subtitle)}</p>"
        f'<p class="caution">{escape(CAUTION)}</p><nav>{nav}</nav></header>\n'
        f"<main>\n{body}\n</main>\n"
        f"<footer>{escape(doc.title)} · written by fvheat · {escape(CAUTION)}</footer>\n"
        "</body>\n</html>\n"
    )
