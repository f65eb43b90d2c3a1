"""The self-contained HTML report: one file, charts inline as base64 PNG, no scripts, no fetches.

The page carries a Content-Security-Policy that allows only inline styles and ``data:`` images,
so even a mailed copy opened in a browser makes no network request and runs no script. Every
string that comes from the user's data passes through ``esc`` before it enters the page.
"""

from __future__ import annotations

import base64
from dataclasses import dataclass

from .methods import methods
from .safety import esc
from .tables import Table, fmt

CSP = "default-src 'none'; img-src data:; style-src 'unsafe-inline'; base-uri 'none'; " \
      "form-action 'none'"

STYLE = """
:root { --ink:#1b1b1b; --muted:#555; --rule:#d9d9d9; --accent:#0072B2; --warm:#E69F00; }
* { box-sizing: border-box; }
body { margin:0; font: 15px/1.5 "Segoe UI", Helvetica, Arial, sans-serif; color:var(--ink);
       background:#fafafa; }
main { max-width: 1000px; margin: 0 auto; padding: 0 20px 40px; background:#fff; }
header.top { border-left: 8px solid var(--accent); padding: 18px 20px 10px; margin: 0 -20px 12px;
             background: #f1f6fa; }
header.top h1 { font-size: 1.45em; margin: 0 0 4px; overflow-wrap: anywhere; }
header.top p { margin: 0; color: var(--muted); overflow-wrap: anywhere; }
.facts { display:flex; flex-wrap:wrap; gap:12px; margin: 14px 0; }
.fact { flex: 1 1 200px; border:1px solid var(--rule); border-top:4px solid var(--warm);
        padding: 8px 12px; }
.fact .k { font-size: .8em; text-transform: uppercase; letter-spacing: .04em; color:var(--muted); }
.fact .v { font-size: 1.25em; font-weight: 600; }
.fact .s { font-size: .85em; color: var(--muted); }
h2 { font-size: 1.15em; border-bottom: 2px solid var(--rule); padding-bottom: 3px;
     margin-top: 30px; }
#summary p { margin: 0 0 6px; }
#summary { background:#fffaf0; border:1px solid #f0dcb0; padding: 10px 16px; }
figure { margin: 18px 0; }
figure img { width: 100%; height: auto; border: 1px solid var(--rule); }
figcaption { font-size: .9em; color: var(--muted); }
.scroll { overflow-x: auto; }
table { border-collapse: collapse; font-size: .82em; margin: 6px 0; }
th, td { border-bottom: 1px solid var(--rule); padding: 4px 6px; text-align: right;
         white-space: nowrap; }
th { background: #f4f4f4; vertical-align: bottom; white-space: normal; }
td.t, th.t { text-align: left; }
td.ci { color: #333; font-size: .95em; }
tr.rec td { font-weight: 600; background: #eef5fb; }
p.note { font-size: .85em; color: var(--muted); }
details summary { cursor: pointer; color: var(--accent); font-size: .9em; margin: 4px 0; }
ul.cautions li { margin-bottom: 6px; }
dl.methods dt { font-weight: 600; margin-top: 10px; }
dl.methods dd { margin: 2px 0 0 0; }
dl.methods .src { font-size: .85em; color: var(--muted); }
footer { font-size: .8em; color: var(--muted); margin-top: 30px; border-top: 1px solid var(--rule);
         padding-top: 8px; }
"""


@dataclass(frozen=True)
class Chart:
    """One chart: ``name`` is the PNG file stem and the element id."""

    name: str
    title: str
    caption: str
    png: bytes


@dataclass(frozen=True)
class Fact:
    key: str
    value: str
    sub: str = ""


def _groups(columns) -> list:
    """Columns in display groups: a ``*_low``/``*_high`` pair becomes one interval cell."""
    out: list[tuple] = []
    i = 0
    cols = list(columns)
    while i < len(cols):
        c = cols[i]
        if (c.key.endswith("_low") and i + 1 < len(cols)
                and cols[i + 1].key == c.key[:-4] + "_high"):
            out.append((c, cols[i + 1]))
            i += 2
        else:
            out.append((c,))
            i += 1
    return out


def _value_span(c, row) -> str:
    return f'<span data-key="{esc(c.key)}">{esc(fmt(row.get(c.key), c.kind))}</span>'


def _table_html(table: Table) -> str:
    groups = _groups(c for c in table.columns if c.page)
    head = "".join(f'<th class="{"t" if g[0].kind in ("text", "date") else "n"}" scope="col">'
                   f'{esc("95% interval" if len(g) == 2 else g[0].heading)}</th>'
                   for g in groups)
    # the chosen row is never folded away: the leading rows run down to it at least
    chosen = [i + 1 for i, r in enumerate(table.rows) if r.get("chosen")]
    shown = table.rows if table.fold_after is None else \
        table.rows[:max([table.fold_after, *chosen])]
    rest = table.rows[len(shown):]

    def grid(rows) -> str:
        return (f'<div class="scroll"><table><thead><tr>{head}</tr></thead>'
                f'<tbody>{"".join(_row_html(groups, r) for r in rows)}</tbody></table></div>')

    folded = (f'<details><summary>The other {len(rest)} candidates</summary>{grid(rest)}'
              f'</details>' if rest else "")
    note = f'<p class="note">{esc(table.note)}</p>' if table.note else ""
    return (f'<section class="table" id="table-{esc(table.name)}"><h3>{esc(table.title)}</h3>'
            f'{grid(shown)}{folded}{note}</section>')


def _row_html(groups, row) -> str:
    """One table row; a ``*_low``/``*_high`` pair shows as one interval cell."""
    cls = ' class="rec"' if row.get("chosen") else ""
    cells = []
    for g in groups:
        kind = "t" if g[0].kind in ("text", "date") else "n"
        if len(g) == 2:
            inner = (_value_span(g[0], row) + " to " + _value_span(g[1], row)
                     if row.get(g[0].key) is not None or row.get(g[1].key) is not None
                     else esc(fmt(None, g[0].kind)))
            cells.append(f'<td class="{kind} ci">{inner}</td>')
        else:
            cells.append(f'<td class="{kind}">{_value_span(g[0], row)}</td>')
    return f"<tr{cls}>{''.join(cells)}</tr>"


def _chart_html(chart: Chart) -> str:
    data = base64.b64encode(chart.png).decode("ascii")
    return (f'<figure class="chart" id="chart-{esc(chart.name)}">'
            f'<img src="data:image/png;base64,{data}" alt="{esc(chart.title)}">'
            f"<figcaption><strong>{esc(chart.title)}.</strong> {esc(chart.caption)}"
            f"</figcaption></figure>")


def page(*, title: str, subtitle: str, facts: list[Fact], summary: list[str],
         charts: list[Chart], tables: list[Table], cautions: list[str], missing: list[str],
         footer: str) -> str:
    """The whole HTML page as text. All arguments are plain text; this function escapes them."""
    fact_html = "".join(f'<div class="fact"><div class="k">{esc(f.key)}</div>'
                        f'<div class="v">{esc(f.value)}</div><div class="s">{esc(f.sub)}</div>'
                        f"</div>" for f in facts)
    summary_html = "".join(f"<p>{esc(s)}</p>" for s in summary)
    missing_html = "".join(f'<p class="note">{esc(m)}</p>' for m in missing)
    methods_html = "".join(f"<dt>{esc(h)}</dt><dd>{esc(text)} "
                           f'<span class="src">Source: {esc(src)}</span></dd>'
                           for h, text, src in methods())
    caution_html = "".join(f"<li>{esc(c)}</li>" for c in cautions)
    return f"""<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="{CSP}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="referrer" content="no-referrer">
<title>{esc(title)}</title>
<style>{STYLE}</style>
</head>
<body>
<main>
<header class="top"><h1 id="report-title">{esc(title)}</h1><p>{esc(subtitle)}</p></header>
<div class="facts" id="key-figures">{fact_html}</div>
<section id="summary"><h2>In short</h2>{summary_html}</section>
<section id="charts"><h2>Charts</h2>{"".join(_chart_html(c) for c in charts)}{missing_html}</section>
<section id="tables"><h2>Tables</h2>{"".join(_table_html(t) for t in tables)}</section>
<section id="cautions"><h2>Cautions</h2><ul class="cautions">{caution_html}</ul></section>
<section id="methods"><h2>Methods</h2><dl class="methods">{methods_html}</dl></section>
<footer>{esc(footer)}</footer>
</main>
</body>
</html>
"""
