"""Serialise the report's blocks (:func:`content.page`) as one self-contained HTML page or Markdown.

Neither writer computes: values come from the report dict through :class:`content.V`. In the
HTML every value is a ``<span data-path="...">`` naming its place in the JSON, images are
embedded as ``data:`` URIs and nothing is fetched (no scripts, fonts or links out).
"""

from __future__ import annotations

import base64
import html

from ..sections.readfile import printable
from .content import Bullets, Figure, Heading, Para, Table, V, page
from .content import text as _text


def text(data, v) -> str:
    """A report value as text, without control characters (the spec refuses them; this keeps
    any that reach the data by another road out of the HTML and Markdown)."""
    return printable(_text(data, v), 100_000)

CSS = """
body{font-family:system-ui,-apple-system,"Segoe UI",Roboto,"DejaVu Sans",sans-serif;max-width:1180px;margin:1.2em auto;
padding:0 1em;color:#111;line-height:1.45}
h1{font-size:1.6em;margin-bottom:.3em}h2{border-bottom:2px solid #333;padding-bottom:.15em;margin-top:1.8em}
.caution{border:3px solid #000;background:#fff4d6;padding:.7em 1em;font-weight:600;font-size:1.05em}
.ok{border-left:6px solid #1b7a2e;padding-left:.8em}
.bad{border-left:6px double #b3141c;padding-left:.8em;font-weight:600}
.note{color:#333;font-size:.92em}
table{border-collapse:collapse;margin:.6em 0 .3em;font-size:.86em}
th,td{border:1px solid #999;padding:.18em .45em;vertical-align:top}th{background:#eee;text-align:left}
td.num{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
tr.bad td{background:#ffd9d9;font-weight:700;border-top:2px solid #000;border-bottom:2px solid #000}
tr.bad td:last-child{text-decoration:underline}
.caption{font-size:.88em;color:#333;margin:.2em 0 1em}
figure{margin:1em 0}figure img{max-width:100%;height:auto;border:1px solid #ccc}
@media print{body{max-width:none}h2{page-break-after:avoid}figure,table{page-break-inside:avoid}}
"""


def _h(data, parts) -> str:
    out = []
    for p in parts:
        if isinstance(p, V):
            out.append(f'<span class="v" data-path="{html.escape(p.key)}">{html.escape(text(data, p))}</span>')
        else:
            out.append(html.escape(p))
    return "".join(out)


def _m(data, parts, cell: bool = False) -> str:
    s = "".join(text(data, p) if isinstance(p, V) else p for p in parts)
    if cell:
        s = s.replace("|", "\\|").replace("\n", " ")
    return s


def to_html(data, images: dict) -> str:
    """The page; ``images``: key -> PNG bytes (embedded as base64)."""
    title = html.escape(f"Design report: {data['spec']['name']}")
    body = []
    for b in page(data):
        if isinstance(b, Heading):
            anchor = f' id="{b.anchor}"' if b.anchor else ""
            body.append(f"<h{b.level}{anchor}>{_h(data, b.parts)}</h{b.level}>")
        elif isinstance(b, Para):
            tag = "div" if b.kind == "caution" else "p"
            role = ' role="alert"' if b.kind == "caution" else ""
            body.append(f'<{tag} class="{b.kind}"{role}>{_h(data, b.parts)}</{tag}>')
        elif isinstance(b, Bullets):
            items = "".join(f"<li>{_h(data, it)}</li>" for it in b.items)
            body.append(f'<ul class="{b.kind}">{items}</ul>')
        elif isinstance(b, Table):
            head = "".join(f"<th>{_h(data, c)}</th>" for c in b.header)
            rows = []
            for i, row in enumerate(b.rows):
                bad = i < len(b.bad) and b.bad[i]
                cells = "".join(f'<td{" class=num" if j in b.numeric else ""}>{_h(data, c)}</td>'
                                for j, c in enumerate(row))
                rows.append(f'<tr{" class=bad" if bad else ""}>{cells}</tr>')
            cap = f'<p class="caption">{_h(data, b.caption)}</p>' if b.caption else ""
            body.append(f"<table><thead><tr>{head}</tr></thead><tbody>{''.join(rows)}</tbody></table>{cap}")
        elif isinstance(b, Figure):
            src = "data:image/png;base64," + base64.b64encode(images[b.key]).decode("ascii")
            body.append(f'<figure><img src="{src}" alt="{html.escape(b.alt)}">'
                        f'<figcaption class="caption">{_h(data, b.caption)}</figcaption></figure>')
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
            f"<title>{title}</title><style>{CSS}</style></head>\n<body>\n" + "\n".join(body) + "\n</body></html>\n")


def to_markdown(data, image_files: dict) -> str:
    """The same page as Markdown; ``image_files``: key -> file name of the PNG beside it."""
    out = []
    for b in page(data):
        if isinstance(b, Heading):
            out += ["#" * b.level + " " + _m(data, b.parts), ""]
        elif isinstance(b, Para):
            s = _m(data, b.parts)
            if b.kind == "caution":
                s = "> **" + s + "**"
            elif b.kind == "bad":
                s = "**✗ " + s + "**"
            out += [s, ""]
        elif isinstance(b, Bullets):
            mark = "**✗** " if b.kind == "bad" else ""
            out += [f"- {mark}{_m(data, it)}" for it in b.items] + [""]
        elif isinstance(b, Table):
            out.append("| " + " | ".join(_m(data, c, True) for c in b.header) + " |")
            out.append("|" + "|".join("---:" if j in b.numeric else "---" for j in range(len(b.header))) + "|")
            for i, row in enumerate(b.rows):
                bad = i < len(b.bad) and b.bad[i]
                cells = [_m(data, c, True) for c in row]
                if bad:
                    cells = [f"**{c}**" if c else c for c in cells]
                out.append("| " + " | ".join(cells) + " |")
            out.append("")
            if b.caption:
                out += [_m(data, b.caption), ""]
        elif isinstance(b, Figure):
            out += [f"![{b.alt}]({image_files[b.key]})", "", _m(data, b.caption), ""]
    return "\n".join(out)
