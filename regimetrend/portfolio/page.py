"""The portfolio page (``portfolio.html``): one self-contained HTML file, no scripts.

Parts: what was analysed; counts by cause; small multiples of the leading series (inline SVG:
the values, the regime fit, the breaks); the triage table ranked by evidence of a recent change,
with the ranking rule written above it; the cautions. Every string from the data is escaped.
The page holds no time stamp, so the same results give the same bytes.
"""

from __future__ import annotations

from collections import Counter

from ..output import write_atomic
from ..report.safety import esc
from ..numformat import number, percent
from .ranking import RULE, evidence
from .store import file_id

SMALL_MULTIPLES = 12
TABLE_ROWS = 500
INK, FIT, BREAK = "#000000", "#0072B2", "#D55E00"  # Okabe-Ito black, blue, vermillion
UNUSED = "#888888"  # a break the search found that the chosen model does not use
CAUTIONS = (
    ("A forecast from the regime that holds now assumes that regime goes on; a new change "
     "would make it wrong."),
    ("A break near the end of a series rests on few points: its date and the new regime's "
     "growth are uncertain, so revisit it as data arrive."),
    ("The ranking points to series worth a look; pair every finding with what you know "
     "happened in the business before acting on it."),
)

STYLE = """
body{font-family:system-ui,-apple-system,Segoe UI,Roboto,sans-serif;margin:24px;color:#111;
max-width:1400px}
h1{font-size:22px;margin:0 0 4px}h2{font-size:17px;margin:28px 0 8px}
p.sub{color:#444;margin:0 0 12px}
table{border-collapse:collapse;font-size:13px}
th,td{border-bottom:1px solid #ddd;padding:4px 8px;text-align:left;vertical-align:top}
th{background:#f3f3f3}td.num{text-align:right;font-variant-numeric:tabular-nums}
.grid{display:flex;flex-wrap:wrap;gap:12px}
figure{margin:0;border:1px solid #ddd;padding:6px;width:260px}
figcaption{font-size:12px;margin-bottom:4px;overflow-wrap:anywhere}
.rule{background:#f7f7f7;border-left:4px solid #0072B2;padding:8px 12px;font-size:14px}
.failed{color:#8a1c00}
"""


def _fmt(v, digits=1, suffix=""):
    if v is None:
        return "-"
    if suffix == "%":  # the number rule: one decimal, no "-0.0"
        return percent(v, sign=True)
    return f"{v:.{digits}f}{suffix}"


def _interval(lo, hi, digits=1):
    if lo is None or hi is None:
        return ""
    return f" ({percent(lo, sign=True, symbol=False)} to {percent(hi, sign=True, symbol=False)})"


def sparkline(chart: dict, width=248, height=120) -> str:
    """An inline SVG of one series: values (black), regime fit (blue, dashed), the breaks the
    chosen model uses (vermillion) and other breaks the search found (grey, dotted)."""
    values, fitted = chart.get("values") or [], chart.get("fitted") or []
    n = len(values)
    if n < 2:
        return ""
    left, right, top, bottom = 50, 6, 6, 22
    pool = [v for v in values + fitted if v is not None]
    lo, hi = min(pool), max(pool)
    if hi == lo:
        hi = lo + 1.0
    def x(i):
        return left + (width - left - right) * i / (n - 1)

    def y(v):
        return top + (height - top - bottom) * (hi - v) / (hi - lo)

    def line(vals, colour, dash=""):
        pts = " ".join(f"{x(i):.1f},{y(v):.1f}" for i, v in enumerate(vals) if v is not None)
        extra = f' stroke-dasharray="{dash}"' if dash else ""
        return (f'<polyline points="{pts}" fill="none" stroke="{colour}" '
                f'stroke-width="1.3"{extra}/>')

    mid_y = (top + height - bottom) / 2
    parts = [
        (f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
         f'role="img" aria-label="series values, regime fit and breaks">'),
        f'<line x1="{left}" y1="{top}" x2="{left}" y2="{height - bottom}" stroke="#999"/>',
        (f'<line x1="{left}" y1="{height - bottom}" x2="{width - right}" '
         f'y2="{height - bottom}" stroke="#999"/>'),
        (f'<text x="{left - 3}" y="{top + 8}" font-size="9" text-anchor="end">'
         f'{esc(number(hi))}</text>'),
        (f'<text x="{left - 3}" y="{height - bottom}" font-size="9" text-anchor="end">'
         f'{esc(number(lo))}</text>'),
        (f'<text x="{left}" y="{height - 10}" font-size="9">'
         f'{esc(chart.get("start_label"))}</text>'),
        (f'<text x="{width - right}" y="{height - 10}" font-size="9" text-anchor="end">'
         f'{esc(chart.get("end_label"))}</text>'),
        (f'<text x="{(left + width) / 2:.0f}" y="{height - 1}" font-size="9" '
         f'text-anchor="middle">period</text>'),
        (f'<text x="9" y="{mid_y:.0f}" font-size="9" text-anchor="middle" '
         f'transform="rotate(-90 9 {mid_y:.0f})">value (series units)</text>'),
    ]
    found = chart.get("breaks") or []
    used = chart.get("used", found)  # results stored before "used" existed: every break
    for b in sorted(set(found) | set(used)):
        style = (f'stroke="{BREAK}" stroke-width="1.2"' if b in used else
                 f'stroke="{UNUSED}" stroke-width="1" stroke-dasharray="2 2"')
        parts.append(f'<line x1="{x(b):.1f}" y1="{top}" x2="{x(b):.1f}" y2="{height - bottom}" '
                     f'{style}/>')
    parts.append(line(values, INK))
    if len(fitted) == n:
        parts.append(line(fitted, FIT, "4 2"))
    parts.append("</svg>")
    return "".join(parts)


def cause_counts(recs) -> list[tuple[str, int]]:
    def cause(r):
        if r.get("status") != "ok":
            return "could not be analysed"
        if r.get("diagnosis_cause"):
            return r["diagnosis_cause"]
        if r.get("recent_change"):
            return "recent break"
        return "older break" if r.get("breaks") else "no break"
    counts = Counter(cause(r) for r in recs)
    return sorted(counts.items(), key=lambda kv: (-kv[1], kv[0]))


def gain_note(recs) -> str:
    """What the gain column compares, naming the reference model(s) the rows were scored
    against (one trend over all history, of the first shape evaluated)."""
    refs = sorted({str(r["gain_reference"]) for r in recs if r.get("gain_reference")})
    named = " or ".join(refs) if refs else "one trend over all history"
    return ("Forecast gain over the reference: how much smaller the forecast model's "
            "rolling-origin RMSE is than that of the reference, one trend over all history "
            f"({named}), on the same origins; 0% where the forecast model is the reference. "
            "A positive gain says the model forecast past periods better; it does not "
            "promise the next ones.")


def _table(recs, order, store, tasks) -> str:
    head = ["rank", "id", "n", "calendar", "why this rank (rule step: evidence)",
            "latest break (95% interval)", "F of latest break", "growth now, % a year (95%)", "growth before, % a year",
            "cause", "forecast model", "forecast gain over the reference", "status"]
    out = ["<table><thead><tr>" + "".join(f"<th>{esc(h)}</th>" for h in head) +
           "</tr></thead><tbody>"]
    for k in order[:TABLE_ROWS]:
        r = recs[k]
        ident = esc(r["id"])
        report = store.reports_dir / file_id(tasks[k].id) / "report.html"
        if report.exists():
            ident = f'<a href="reports/{esc(file_id(tasks[k].id))}/report.html">{ident}</a>'
        last = r.get("last_break") or ""
        if last and r.get("last_break_ci95_low"):
            last += f" ({r['last_break_ci95_low']} to {r['last_break_ci95_high']})"
        if last and r.get("last_break_in_model") is False:
            last += "; not used by the forecast model"
        status = ("ok" if r.get("status") == "ok"
                  else f'<span class="failed">{esc(r.get("reason"))}</span>')
        gain = r.get("gain_over_global")
        cells = [f'<td class="num">{r["rank"]}</td>', f"<td>{ident}</td>",
                 f'<td class="num">{"" if r.get("n") is None else r["n"]}</td>',
                 f"<td>{esc(r.get('calendar') or '')}</td>",
                 f"<td>{esc(evidence(r))}</td>", f"<td>{esc(last)}</td>",
                 f'<td class="num">{_fmt(r.get("last_break_f")) if last else ""}</td>',
                 (f'<td class="num">{_fmt(r.get("growth_now_pct_a_year"), 1, "%")}'
                  f'{_interval(r.get("growth_now_low"), r.get("growth_now_high"))}</td>'),
                 f'<td class="num">{_fmt(r.get("growth_before_pct_a_year"), 1, "%")}</td>',
                 f"<td>{esc(r.get('diagnosis_cause') or '')}</td>",
                 f"<td>{esc(r.get('forecast_model') or '')}</td>",
                 f'<td class="num">{"" if gain is None else f"{100 * gain:+.0f}%"}</td>',
                 f"<td>{status}</td>"]
        out.append("<tr>" + "".join(cells) + "</tr>")
    out.append("</tbody></table>")
    out.append(f"<p>{esc(gain_note(recs))}</p>")
    if len(order) > TABLE_ROWS:
        out.append(f"<p>The first {TABLE_ROWS} of {len(order)} series are shown; every series "
                   f"is in summary.csv, with its rank.</p>")
    return "".join(out)


def build_page(recs, order, store, tasks, level: str) -> str:
    ok = sum(1 for r in recs if r.get("status") == "ok")
    lead = [k for k in order if recs[k].get("status") == "ok"][:SMALL_MULTIPLES]
    figures = []
    for k in lead:
        chart = store.read_result(tasks[k].id).get("chart") or {}
        r = recs[k]
        caption = f"#{r['rank']} {r['id']}"
        if r.get("last_break"):
            caption += f" - latest break {r['last_break']}"
        figures.append(f"<figure><figcaption>{esc(caption)}</figcaption>"
                       f"{sparkline(chart)}</figure>")
    counts = "".join(f"<tr><td>{esc(c)}</td><td class=\"num\">{n}</td></tr>"
                     for c, n in cause_counts(recs))
    what = ("the full analysis (break search, rolling-origin comparison, growth)" if level ==
            "full" else "the scan level (break search and growth only)")
    cautions = "".join(f"<li>{esc(c)}</li>" for c in CAUTIONS)
    return (
        "<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\">"
        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
        "<title>Portfolio triage</title><style>" + STYLE + "</style></head><body>"
        "<h1>Portfolio triage</h1>"
        f"<p class=\"sub\">{len(recs)} series: {ok} analysed, {len(recs) - ok} could not be "
        f"analysed (each with its reason in the table). Each series had {esc(what)}.</p>"
        "<h2>Counts by cause</h2><table><thead><tr><th>cause</th><th>series</th></tr></thead>"
        f"<tbody>{counts}</tbody></table>"
        f"<h2>Leading series</h2><p>The first {len(lead)} series in triage order: values in "
        "black, the regime fit dashed blue, the breaks the chosen model uses as solid orange "
        "lines and other breaks the search found as dotted grey lines.</p>"
        f"<div class=\"grid\">{''.join(figures)}</div>"
        "<h2>Triage table</h2>"
        f"<p class=\"rule\">{esc(RULE)}</p>"
        + _table(recs, order, store, tasks) +
        f"<h2>Cautions</h2><ul>{cautions}</ul>"
        "</body></html>\n")


def write_page(folder, recs, order, store, tasks, level):
    return write_atomic(folder / "portfolio.html", build_page(recs, order, store, tasks, level),
                        "--output")
