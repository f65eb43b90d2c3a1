"""Plain-text summaries of the results, for the terminal and the notebook.

``BreakSet.summary()``, ``GrowthTable.summary()``, ``Evaluation.summary()`` and
``Analysis.summary()`` call these functions; the ``scan`` and ``compare`` commands print them, so
the notebook and the command line read alike. Numbers are rounded by ``numformat``; decisions
are worded by ``words``. Nothing is computed here.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from . import growth_figures as gf
from . import numformat, words

if TYPE_CHECKING:
    from .analysis import Analysis
    from .breaks.result import BreakSet
    from .evaluate.result import Evaluation
    from .growth import GrowthTable
    from .series import Series


def fmt(x, digits: int | None = None) -> str:
    """A number for reading (``numformat``'s rule, or ``digits`` fixed decimals); '-' if none."""
    if digits is None:
        return numformat.number(x, missing="-")
    if x is None or not math.isfinite(float(x)):
        return "-"
    text = f"{float(x):,.{digits}f}"
    return "0" if text.lstrip("-").strip("0.,") == "" else text


def table(header: list[str], rows: list[list[str]]) -> str:
    """Left-aligned first column, right-aligned others, two spaces apart."""
    cells = [header] + [[str(c) for c in row] for row in rows]
    widths = [max(len(r[i]) for r in cells) for i in range(len(header))]
    out = []
    for j, row in enumerate(cells):
        parts = [row[0].ljust(widths[0])] + [c.rjust(w) for c, w in zip(row[1:], widths[1:])]
        out.append("  ".join(parts).rstrip())
        if j == 0:
            out.append("  ".join("-" * w for w in widths))
    return "\n".join(out)


def _label(series: Series | None, position: int, iso: str) -> str:
    return series.label(int(position)) if series is not None else iso


def _interval(g: dict, key: str) -> str:
    lo, hi = g.get(gf.ci95(key)) or (None, None)
    return numformat.interval(lo, hi, numformat.percent, missing="-")


def _slope_text(x, log: bool) -> str:
    """The growth change at break ``x``: percentage points a period on the log scale."""
    if log and x.slope_change_pct is not None:
        return f"{numformat.points(x.slope_change_pct, '-')} pp/period"
    return f"{numformat.signed(x.slope_change, '-')}/period"


def kind_note(kind: str, log: bool) -> str | None:
    """What a break of ``kind`` leaves unchanged, said once under the break table."""
    if kind == "level":
        shared = "growth rate" if log else "slope (growth in units a period)"
        return (f"level-only breaks: the level shifts at each break and all regimes share one "
                f"{shared}, so no growth change is shown")
    if kind == "slope":
        return ("slope-only breaks: the trend bends at each break without a jump, so no level "
                "shift is shown")
    return None


def _change_columns(kind: str, log: bool):
    """The headings and cells of what a break of ``kind`` changes: the level shift (in units)
    and the growth change; a level-only break changes no growth, a slope-only one no level."""
    shift = ("level shift (units)", lambda x: numformat.signed(x.jump, "-"))
    growth = ("growth change", lambda x: _slope_text(x, log))
    parts = [shift] if kind == "level" else [growth] if kind == "slope" else [shift, growth]
    return [h for h, _ in parts], (lambda x: [f(x) for _, f in parts])


def series_line(series: Series) -> str:
    return (f"{series.name}: {series.n} {series.frequency.name} periods, {series.label(0)} to "
            f"{series.label(series.n - 1)}")


def breaks_text(b: BreakSet, series: Series | None = None,
                growth: GrowthTable | None = None) -> str:
    """The breaks with their intervals, the tests, the regimes (with growth when given), the
    notes and the near-end caution."""
    spec = b.spec
    log = spec.shape == "exponential"
    lines = [series_line(series)] if series is not None else []
    how = ("break dates given by the analyst (no search)" if b.given
           else f"number chosen by {b.criterion}")
    lines += [f"model: {spec.describe()}; breaks of kind '{b.kind}' (asked: {b.kind_requested}); "
              f"{how}; shortest regime {b.trim_periods} periods", ""]
    heads, cells = _change_columns(b.kind, log)
    if b.breaks and b.given:
        rows = [[x.label, *cells(x), numformat.statistic(x.f_statistic, "-"),
                 words.p_phrase(x.p_value)] for x in b.breaks]
        lines.append(f"breaks given by the analyst: {len(b.breaks)} (each is the first period "
                     f"of a new regime; dates not estimated, so no date interval applies)")
        lines.append(table(["break", *heads, "F, given the others", "p"], rows))
    elif b.breaks:
        rows = []
        for x in b.breaks:
            lo90, hi90 = (_label(series, p, d) for p, d in zip(x.ci90, x.ci90_dates))
            lo95, hi95 = (_label(series, p, d) for p, d in zip(x.ci95, x.ci95_dates))
            rows.append([x.label, f"{lo90} to {hi90}", f"{lo95} to {hi95}", *cells(x),
                         numformat.statistic(x.f_statistic, "-")])
        lines.append(f"breaks found: {len(b.breaks)} (each is the first period of a new regime)")
        lines.append(table(["break", "90% interval", "95% interval", *heads, "F"], rows))
    if b.breaks and kind_note(b.kind, log):
        lines.append(str(kind_note(b.kind, log)))
    if not b.breaks:
        lines.append("breaks found: none")
    t = b.tests
    if t is not None:
        lines += ["", "tests:"]
        if t.joint is not None:
            lines.append(f"  F test of the given break dates together against one trend: "
                         f"F = {numformat.statistic(t.joint.statistic)} on {t.joint.df1} and "
                         f"{t.joint.df2} degrees of freedom, {words.p_phrase(t.joint.p_value)}")
        elif not b.given:
            lines.append(f"  sup-F, no break against one: "
                         f"F = {numformat.statistic(t.supf.statistic)}, "
                         f"{words.p_phrase(t.supf.p_value)} (shortest regime "
                         f"{t.supf.trim_share:.0%} of the series)")
        for step in t.sequential:
            where = (f" (best at {_label(series, step.position, f'position {step.position}')})"
                     if step.position is not None else "")
            lines.append(f"  sup-F({step.breaks_before + 1}|{step.breaks_before}): "
                         f"F = {numformat.statistic(step.statistic)}, "
                         f"{words.p_phrase(step.p_value)}{where}")
        for ev in t.chow:
            lines.append(f"  Chow test at event {ev.event} ({ev.label}): "
                         f"F = {numformat.statistic(ev.statistic)}, {words.p_phrase(ev.p_value)}")
        for c in t.cusum:
            where = (f"leaves its {words.level_text()} band at "
                     f"{_label(series, c.first_crossing, f'position {c.first_crossing}')}"
                     if c.first_crossing is not None
                     else f"stays inside its {words.level_text()} band")
            lines.append(f"  CUSUM ({c.method}) of the global trend: {where}, "
                         f"{words.p_phrase(c.p_value)}")
    if b.drift is not None:
        lines.append(f"  the global trend started to drift at {b.drift.label} ({b.drift.method})")
    if getattr(b, "is_wandering", False):
        w = b.wandering
        lines.append(f"  wandering: the series moves around its trend like a random walk "
                     f"(KPSS {numformat.statistic(w.kpss)}, 5% value {w.kpss_critical:g}; "
                     f"AR(1) {numformat.statistic(w.ar1)}); the breaks are descriptive only")
    g = growth.to_dict() if growth is not None else {}
    lines += ["", "regimes (growth with 95% intervals from autocorrelation-robust errors):"]
    rows = []
    per_regime = g.get("segments") or [{} for _ in b.segments]
    for s, gs in zip(b.segments, per_regime):
        gr = gs.get("growth", {})
        step_text = (numformat.percent(s.growth_pct, sign=True) if s.growth_pct is not None
                     else numformat.signed(s.slope, "-"))
        year = gr.get(gf.ANNUALISED_PCT)
        rows.append([f"{s.start_label} to {s.end_label}", str(s.n), fmt(s.level), step_text,
                     numformat.percent(year, "-", sign=True), _interval(gr, gf.ANNUALISED_PCT)])
    lines.append(table(["regime", "periods", "trend level at start",
                        "growth per period" if log else "slope per period",
                        "growth a year", "95% interval (%)"], rows))
    for c in g.get("changes", []):
        ch = c.get(gf.CHANGE_PCT)
        if ch is not None:
            lines.append(f"  growth change at {c['label']}: {numformat.points(ch)} points a year "
                         f"(95% interval {_interval(c, 'annualised_pct_change')}), Wald "
                         f"{words.p_phrase(c.get('p_value'))}")
    notes = list(b.notes)
    if series is not None and b.breaks:
        last = b.breaks[-1]
        caution = words.near_end(series, last.position, None if last.given else last.ci95[1])
        if caution:
            notes.append(caution)
    notes.append("pair these findings with what you know happened in the business")
    lines.append("")
    lines += [f"note: {n}" for n in notes]
    return "\n".join(lines)


def growth_text(g: GrowthTable) -> str:
    """Growth a year by regime with 95% intervals, and the Wald test of each change."""
    d = g.to_dict()
    lines = [f"growth by regime ({d['shape']} trend, {d['headline']}); {d['intervals']}"]
    rows = []
    for s in d["segments"]:
        gr = s["growth"]
        rows.append([f"{s['start_label']} to {s['end_label']}", str(s["periods"]),
                     numformat.percent(gr.get(gf.ANNUALISED_PCT), "-", sign=True),
                     _interval(gr, gf.ANNUALISED_PCT)])
    lines.append(table(["regime", "periods", "growth a year", "95% interval (%)"], rows))
    for c in d["changes"]:
        lines.append(f"  change at {c['label']}: {numformat.points(c['annualised_pct_change'], '-')} points a "
                     f"year (95% interval {_interval(c, 'annualised_pct_change')}), Wald "
                     f"{words.p_phrase(c.get('p_value'))}")
    return "\n".join(lines)


def _pct(x) -> str:
    return numformat.percent(None if x is None else 100 * x, "-")


def _seasonal_words(model: dict) -> str:
    kind = model["seasonality"]
    if kind == "none":
        return "no seasonal terms"
    word = "seasonal dummies" if kind == "dummies" else "seasonal adjustment"
    return f"{word}, season length {model['season_length']}"


def evaluation_text(ev: Evaluation, series: Series | None = None) -> str:
    """The ranking on the rolling origin, the recommendation and its rule, accuracy by horizon,
    the history decision and sweep, the diagnosis and the cautions."""
    plan = ev.plan

    def origin(position: int, iso_key: str) -> str:
        return series.label(position - 1) if series is not None else str(plan.get(iso_key))

    lines = [series_line(series)] if series is not None else []
    if ev.optimistic:
        lines += ["", "*** OPTIMISTIC RESULTS: breaks found on the full sample were reused at "
                      "every origin ***"]
    lines += [f"rolling origin: {plan['count']} origins, last period known "
              f"{origin(plan['first_origin'], 'first_origin_date')} to "
              f"{origin(plan['origins'][-1], 'last_origin_date')}, every {plan['step']} "
              f"period(s); horizons 1..{plan['horizon']}; breaks {plan['breaks']}",
              f"reference: {ev.reference} trend ({_seasonal_words(ev.model)}); errors in "
              f"original units, point forecast = mean", ""]
    rows = []
    for c in ev.candidates:
        m, vs = c.metrics, c.vs_global
        rows.append([c.name, "chosen" if c.name == ev.recommended.name else "", str(c.rank),
                     fmt(m["rmse"]), fmt(m["mae"]),
                     fmt(m["mape"]) if m["mape"] is not None else "-", fmt(m["mase"]),
                     fmt(m["me"]), _pct(m["coverage80"]), _pct(m["coverage95"]),
                     _pct(c.gain) if c.name != ev.reference else "reference",
                     numformat.pvalue(vs.get("p_value_better"), "-")])
    lines.append(table(["candidate", "verdict", "rank by RMSE", "RMSE", "MAE", "MAPE %", "MASE", "ME",
                        "80% cover", "95% cover", "gain vs global", "DM p (better)"], rows))
    if ev.same_as:
        lines.append("not ranked (same forecasts as another candidate): " + "; ".join(
            f"{a} = {b}" for a, b in ev.same_as.items()))
    from .strategy_table import strategy_kinds

    used = dict.fromkeys(c.strategy.name for c in ev.candidates)
    lines += ["", "gain vs global: 1 - RMSE / RMSE of the reference; DM p: one-sided "
                  "Diebold-Mariano (HLN) p-value that the candidate is more accurate",
              "strategies: " + " ".join(f"{k.name}: {k.summary}" for k in strategy_kinds()
                                        if k.name in used), "",
              f"recommendation: {ev.recommended.reason}",
              f"rule: {ev.recommended.rule}", ""]
    rec = ev.candidate(ev.recommended.name)
    ref = ev.candidate(ev.reference)
    if rec.name != ref.name:
        rows = [[str(a["horizon"]), fmt(b["rmse"]), fmt(a["rmse"]),
                 numformat.pvalue(dm.get("p_value_better"), "-")]
                for a, b, dm in zip(rec.per_horizon, ref.per_horizon,
                                    rec.vs_global.get("per_horizon", []))]
        lines.append(table(["horizon", f"RMSE {ref.name}", f"RMSE {rec.name}",
                            "DM p (better)"], rows))
        lines.append("")
    lines.append(f"history: {ev.history.sentence}")
    sweep = ev.history.evidence.get("sweep", [])
    if len(sweep) > 1:
        lines.append(table(["fit from", "RMSE", "MAE", "gain vs all history"],
                           [[r["label"], fmt(r["rmse"]), fmt(r["mae"]),
                             _pct(r["gain_over_global"])] for r in sweep]))
    lines += ["", f"diagnosis: {ev.diagnosis.sentence}", ""]
    lines += [f"caution: {c}" for c in ev.cautions]
    return "\n".join(lines)


def analysis_text(a: Analysis) -> str:
    """The whole analysis: breaks and regimes with growth, the recommendation, history and
    diagnosis, the forecast with its intervals, and the cautions."""
    ev = a.evaluation
    lines = [breaks_text(a.breaks, a.series, a.growth), "",
             f"recommended forecast: {ev.recommended.name} ({ev.recommended.reason})",
             f"history: {ev.history.sentence}", f"diagnosis: {ev.diagnosis.sentence}", "",
             f"forecast ({a.forecast.model}; mean with 80% and 95% intervals):"]
    lines.append(table(["period", "mean", "80% interval", "95% interval"],
                       [[r["label"], fmt(r["mean"]),
                         f"{fmt(r['lower80'])} to {fmt(r['upper80'])}",
                         f"{fmt(r['lower95'])} to {fmt(r['upper95'])}"]
                        for r in a.forecast.rows()]))
    lines.append("")
    lines += [f"caution: {c}" for c in a.cautions]
    return "\n".join(lines)
