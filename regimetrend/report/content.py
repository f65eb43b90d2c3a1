"""Assemble the report's parts from an analysis: facts, summary, charts, tables, cautions."""

from __future__ import annotations

from dataclasses import dataclass
from itertools import pairwise

import numpy as np

from .. import growth_figures as gf
from .. import numformat
from ..cautions import assemble
from . import charts
from .extract import ReportData
from .html import Chart, Fact
from .models import candidate_name, growth_model, recommended_candidate, strategy_words
from .summary import summary_sentences
from .tables import (
    Table,
    break_rows,
    dig,
    forecast_rows,
    growth_rows,
    num,
    ranking_rows,
)


@dataclass(frozen=True)
class Content:
    title: str
    subtitle: str
    facts: list
    summary: list
    charts: list
    tables: list
    cautions: list
    missing: list  # one line per chart that could not be drawn, and why


def _band(label, fc) -> charts.Band:
    p = fc.points
    return charts.Band(label, fc.starts, p.mean, p.lower80, p.upper80, p.lower95, p.upper95)


def _same(a, b) -> bool:
    """Two forecasts with the same dates and means (the global trend recommended, say)."""
    if a is None or b is None:
        return a is b
    return (len(a.starts) == len(b.starts) and bool(np.all(a.starts == b.starts))
            and bool(np.allclose(a.points.mean, b.points.mean)))


def _seasonal(d: ReportData) -> bool:
    return getattr(d.spec, "seasonality", "none") != "none"


def zoom_start(n: int, last_break: int | None, horizon: int, season: int) -> int | None:
    """First position of the zoomed panel: the latest regime with a little context, at least
    three horizons or two seasons, at most six horizons or four seasons; None when that would
    show most of the history anyway."""
    least = max(3 * horizon, 2 * season, 12)
    most = max(6 * horizon, 4 * season, 36)
    span = least if last_break is None else n - last_break + max(season, 4)
    span = min(max(span, least), most)
    return None if span >= 0.8 * n else n - span


def _regime_bands(d: ReportData, line) -> list:
    """The chosen model's trend cut at the breaks it uses (NaN where it was not fitted)."""
    s = d.series
    edges = [0] + [b.position for b in d.model_breaks] + [s.n]
    return [charts.Band("regime", s.starts[a:b], line[a:b]) for a, b in pairwise(edges)
            if b > a and np.isfinite(line[a:b]).any()]


def _trend_words(d: ReportData, at_average: str) -> tuple[str, str]:
    """(legend label, caption words) of the solid blue line: the chosen model's fitted trend,
    or, for a window average (which has no single fit), the trend growth now describes."""
    shape = (d.growth or {}).get("shape") or "trend"
    v = d.verdict
    if v is None:
        label = f"{shape} trend of each regime" if d.breaks else f"{shape} trend"
        return label + at_average, label
    strategy, start = v.model.strategy, v.history.keep_from_label
    if strategy == "window-average":
        label = f"one {shape} trend over all history (growth now)"
        return (label + at_average, f"one {shape} trend over all history, which the growth "
                "figures describe (the chosen average of trends from several starts has no "
                "single fitted line)")
    if strategy == "truncated":
        label = f"chosen: {shape} trend fitted from {start}" if start else \
            f"chosen: one {shape} trend"
    elif strategy == "global":
        label = f"chosen: one {shape} trend over all history"
    elif strategy == "continuous":
        label = f"chosen: {shape} trend joined at the breaks"
    else:
        label = (f"chosen: {shape} trend of each regime" if d.model_breaks
                 else f"chosen: {shape} trend")
    return label + at_average, label.replace("chosen: ", "the chosen model's fitted line, ")


def _series_chart(d: ReportData, log_scale: bool = False) -> Chart:
    """The series with the chosen model: its fitted trend, the breaks it uses and its
    forecast; the global trend of the reference shape for comparison; the search's breaks that
    the chosen model does not use, only as such."""
    s = d.series
    seasonal = _seasonal(d)
    trend = d.regime_trend if d.regime_trend is not None else d.regime_fitted
    regime_bands = _regime_bands(d, trend) if trend is not None else []
    gline = d.global_trend if d.global_trend is not None else d.global_fitted
    chosen_is_global = _same(d.global_forecast, d.forecast)
    # the chosen model is one trend over all history of the reference shape: drawn once, in blue
    global_trend = (charts.Band("global", s.starts, gline)
                    if gline is not None and (not chosen_is_global or not regime_bands)
                    else None)
    seasonal_fit = (charts.Band("seasonal", s.starts, d.regime_fitted)
                    if seasonal and d.regime_fitted is not None and d.regime_trend is not None
                    else None)
    forecast = _band("forecast", d.forecast) if d.forecast is not None else None
    global_forecast = (_band("global", d.global_forecast)
                       if d.global_forecast is not None and not chosen_is_global else None)
    horizon = d.forecast.horizon if d.forecast is not None else 4
    last = d.model_breaks[-1].position if d.model_breaks else (
        d.forecast.fitted_from if d.forecast is not None and d.forecast.fitted_from else None)
    first = zoom_start(s.n, last, horizon, s.frequency.season_length)
    ref_shape = d.global_forecast.spec.shape if d.global_forecast is not None else "global"
    at_average = " (seasons averaged)" if seasonal else ""
    trend_label, trend_caption = _trend_words(d, at_average)
    search_shape = d.verdict.model.search_shape if d.verdict is not None else ""
    labels = {"regime": trend_label, "seasonal": "the blue line with its seasonal pattern",
              "global": (f"one {ref_shape} trend over all history (reference)"
                         if global_trend is not None else
                         f"one {ref_shape} trend's forecast (reference)")
              + (", its forecast on the right" if first is not None and global_trend is not None
                 and global_forecast is not None else ""),
              "breaks": ("break used by the chosen model, 95% interval" if d.verdict is not None
                         else "break date, 95% interval"),
              "search": (f"break found by the {search_shape} search, not used".replace("  ", " ")
                         if d.cited_break is None else "break found by a search, not used"),
              "forecast": ("chosen model's forecast, 80% and 95% intervals"
                           if d.verdict is not None else
                           "recommended forecast, 80% and 95% intervals"),
              "zoom": "latest regime and forecast" if d.model_breaks else
                      "recent periods and forecast"}
    png = charts.series_chart(
        s.starts, s.values, units=d.units, frequency=s.frequency,
        breaks=[s.starts[b.position] for b in d.model_breaks],
        break_spans=[(s.starts[b.low], s.starts[b.high]) for b in d.model_breaks
                     if b.low is not None and b.high is not None],
        search_breaks=[s.starts[b.position] for b in d.unused_breaks]
        + ([s.starts[d.cited_break.position]] if d.cited_break is not None else []),
        regime_trends=regime_bands,
        global_trend=global_trend, seasonal_fit=seasonal_fit, forecast=forecast,
        global_forecast=global_forecast, zoom_from=None if first is None else s.starts[first],
        labels=labels, log_scale=log_scale, title=f"{s.name}: regimes, trends and forecast")
    parts = ["Actual values in black."]
    if regime_bands:
        parts.append(f"Solid blue: {trend_caption}"
                     + (", with the seasonal terms at their average" if seasonal else "") + ".")
    if d.model_breaks:
        parts.append("Orange lines mark the breaks the chosen model uses (the first period of "
                     "a new regime), hatched spans the 95% intervals of their dates.")
    if d.unused_breaks:
        dates = ", ".join(b.label for b in d.unused_breaks)
        parts.append(f"Grey dashed lines: the break search's dates ({dates}), which the chosen "
                     "model does not use.")
    if d.cited_break is not None:
        parts.append(f"Grey dashed line at {d.cited_break.label}: the change the diagnosis "
                     f"names, dated by another shape's break search; the chosen model does not "
                     f"use it.")
    if global_trend is None and global_forecast is not None:
        parts.append(f"Dashed purple: the forecast of one {ref_shape} trend over all history, "
                     "the reference.")
    if global_trend is not None:
        parts.append(f"Dashed purple: one {ref_shape} trend over all history, the reference"
                     + (" (with its forecast in the right panel)." if first is not None
                        and global_forecast is not None else
                        " and its forecast." if global_forecast is not None else "."))
    if forecast is not None and d.forecast is not None:
        if d.verdict is not None:
            from ..verdict import strategy_words as chosen_words

            m = d.verdict.model
            words = chosen_words(m.strategy, m.shape, d.verdict.history.keep_from_label)
            which = "the chosen model's forecast"
        else:
            words = strategy_words(recommended_candidate(d.evaluation)) or d.forecast.model
            which = "the recommended forecast"
        parts.append(f"Vermillion: {which} ({words}) with 80% and 95% "
                     "prediction intervals (darker and lighter bands).")
    if first is not None:
        parts.append(f"The right panel zooms on the periods from {s.label(first)}"
                     + (" and adds the chosen model with its seasonal pattern (dotted)."
                        if seasonal_fit is not None else "."))
    return Chart("series_regimes", "The series, its regimes, trends and forecast",
                 " ".join(parts), png)


def _error_chart(d: ReportData) -> Chart | None:
    t = d.errors
    if t is None or d.reference is None or d.recommended is None:
        return None
    s = d.series
    targets = np.asarray(t.targets)[:, 0]
    lines = {f"reference: {_name(d, d.reference)}": t.errors(d.reference)[:, 0]}
    if d.recommended != d.reference:
        lines[f"chosen: {_name(d, d.recommended)}"] = t.errors(d.recommended)[:, 0]
    png = charts.error_chart(s.starts[targets], lines, units=d.units,
                             frequency=s.frequency, horizon_note=", one period ahead",
                             title="Forecast errors on the rolling origin (actual minus "
                                   "forecast)")
    which = ("of the global trend (dashed purple) and of the chosen model (solid "
             "vermillion)" if len(lines) == 2 else
             "of the global trend, which is also the chosen model")
    return Chart("forecast_errors", "Forecast errors over time",
                 f"One-period-ahead errors (actual minus forecast) {which}, each fitted only on "
                 "the history before the period it forecasts. Errors drifting away from zero "
                 "show a trend that no longer holds.", png)


def _candidate(d: ReportData, name: str | None) -> dict | None:
    for c in (d.evaluation or {}).get("candidates") or ():
        if c.get("name") == name:
            return c
    return None


def _name(d: ReportData, name: str | None) -> str | None:
    """A candidate's readable name (``models.candidate_name``), or its key when unknown."""
    return candidate_name(_candidate(d, name), [b.label for b in d.breaks]) or name


def _cusum_chart(d: ReportData) -> Chart | None:
    c = d.cusum
    if not c or not c.get("path"):
        return None
    s = d.series
    pos = np.asarray(c.get("positions") or range(len(c["path"])), dtype=int)
    path = np.array([np.nan if v is None else v for v in c["path"]], dtype=float)
    lo = np.array([np.nan if v is None else v for v in c["lower"]], dtype=float)
    hi = np.array([np.nan if v is None else v for v in c["upper"]], dtype=float)
    pos = np.clip(pos, 0, s.n - 1)
    ols = c.get("method") == "ols"
    ylabel = ("cumulative sum of residuals,\nscaled by sigma sqrt(n) (no units)" if ols else
              "cumulative sum of standardised\nrecursive residuals (no units)")
    png = charts.cusum_chart(s.starts[pos], path, lo, hi, frequency=s.frequency,
                             ylabel=ylabel, title="CUSUM of the global trend")
    crossing = c.get("first_crossing")
    when = (f" It first leaves the band at {s.label(int(crossing))}." if crossing is not None
            else " It stays inside the band.")
    what = ("the global trend's residuals (OLS-based CUSUM, Ploberger and Kramer, 1992)" if ols
            else "the global trend's standardised one-step-ahead errors (recursive residuals, "
                 "Brown, Durbin and Evans, 1975)")
    return Chart("cusum", "CUSUM path with its 5% band",
                 f"Cumulative sum of {what}. A stable trend keeps the path inside the band."
                 + when, png)


def _history_chart(d: ReportData) -> Chart | None:
    sweep = dig(d.evaluation, "history", "evidence", "sweep")
    if not sweep or len(sweep) < 2:
        return None
    rows = [r for r in sweep if r.get("rmse") is not None]
    dates = [r["start"] for r in rows]
    keep = dig(d.evaluation, "history", "keep_from")
    evidence = dig(d.evaluation, "history", "evidence") or {}
    points = [(b.get("date"), b.get("rmse_from_break"), "start at a full-sample break (optimistic: in-sample break)")
              for b in evidence.get("breaks") or [] if b.get("date")]
    redetected = evidence.get("rmse_after_redetected_last_break",
                              evidence.get("rmse_after_last_break"))
    if redetected is not None and d.breaks:
        points.append((d.breaks[-1].date, redetected,
                       "start at the last break, found again at each origin"))
    png = charts.history_chart(dates, [r["rmse"] for r in rows],
                               metric=f"rolling-origin RMSE ({d.units})",
                               frequency=d.series.frequency, chosen=keep,
                               points=points, title="How much history to keep")
    marks = {label for _, value, label in points if value is not None}
    caption = ("Rolling-origin RMSE of the trend fitted from each fixed start date (blue "
               "line; the first point uses all history)")
    if marks:
        caption += " and from the breaks (separate marks)"
    caption += ". Lower is better."
    if keep is not None:
        caption += (f" The dashed vertical line marks the start the verdict keeps, "
                    f"{d.series.frequency.label(keep)}.")
    else:
        caption += " All history is kept, so no start is marked."
    return Chart("history_sweep", "Accuracy against the history kept", caption, png)


def _horizon_chart(d: ReportData) -> Chart | None:
    """The best-ranked candidates by horizon, always with the chosen model and the reference
    (at most six lines)."""
    cands = (d.evaluation or {}).get("candidates") or []
    must = [n for n in (d.recommended, d.reference) if n]
    lines: dict = {}
    horizons = None
    ordered = [c for c in cands if c.get("name") in must] + \
        [c for c in cands if c.get("name") not in must]
    for c in ordered:
        ph = c.get("per_horizon") or []
        vals = [m.get("rmse") for m in ph]
        if len(lines) >= charts.MAX_LEGEND or not vals or any(v is None for v in vals):
            continue
        horizons = [m.get("horizon", i + 1) for i, m in enumerate(ph)]
        lines[c["name"]] = vals
    lines = {c["name"]: lines[c["name"]] for c in cands if c.get("name") in lines}  # rank order
    if not lines or horizons is None:
        return None
    lines = {_name(d, k): v for k, v in lines.items()}
    png = charts.horizon_chart(horizons, lines, metric=f"RMSE ({d.units})",
                               highlight=_name(d, d.recommended),
                               reference=_name(d, d.reference),
                               title="Accuracy by forecast horizon")
    return Chart("accuracy_by_horizon", "Accuracy by horizon for the candidates",
                 "Rolling-origin RMSE at each horizon for the best-ranked candidates and the "
                 "global trend (dashed purple); the chosen model is drawn thicker in "
                 "vermillion.", png)


def _growth_chart(d: ReportData) -> Chart | None:
    g = d.growth
    if not g or not g.get("segments"):
        return None
    segs = g["segments"]
    labels = [f"{s['start_label']} to {s['end_label']}" for s in segs]
    vals = [s["growth"].get(gf.ANNUALISED_PCT) for s in segs]
    if all(v is None for v in vals):
        return None
    ci = [s["growth"].get(gf.ci95(gf.ANNUALISED_PCT)) or [None, None] for s in segs]
    png = charts.growth_chart(labels, vals, [c[0] for c in ci], [c[1] for c in ci],
                              quantity="growth (% a year)",
                              title="Growth by regime")
    model = growth_model(g)
    model_text = f" Model: {model}, as in the growth table." if model else ""
    return Chart("growth_by_regime", "Annualised growth by regime",
                 f"Bars: {g.get('headline', 'annualised growth')}; whiskers: 95% intervals "
                 "(autocorrelation-robust covariance as the growth table's note says, delta "
                 f"method).{model_text} "
                 "The current regime is coloured.", png)


def _units_suffix(d: ReportData) -> str:
    """' UNITS' when the analyst gave units other than the series name, else ''."""
    return f" {d.units}" if d.units and d.units != d.series.name else ""


def _verdict_facts(v, units: str = "") -> list[Fact]:
    """Headline cards from the verdict: growth now, the latest break used, the first forecast
    period and the chosen model, each from the one chosen model; ``units`` (' UNITS' or '')
    follows every figure in the series' own units."""
    from ..numformat import number, percent
    from ..verdict import interval_words, strategy_words

    facts = []
    g = v.growth_now
    if g is not None and (g.annualised_pct is not None or g.per_year_units is not None):
        since = f"since {g.since_label}" if g.since_label else "over all history"
        lo, hi = g.ci95
        if g.shape == "linear" and g.per_year_units is not None:
            value = f"{number(g.per_year_units)}{units} a year"
            sub = (f"{percent(g.annualised_pct)} a year; " if g.annualised_pct is not None
                   else "") + f"{g.shape} trend"
        else:
            value = f"{percent(g.annualised_pct)} a year"
            sub = (f"95%: {percent(lo)} to {percent(hi)}" if None not in (lo, hi) else "")
        facts.append(Fact(f"growth now, {since}", value, sub))
    if v.breaks:
        b = v.breaks[-1]
        facts.append(Fact("latest change of regime", b.label,
                          "given by the analyst" if b.ci95_labels is None else
                          interval_words(*b.ci95_labels).replace("95% interval ", "95%: ")))
    else:
        facts.append(Fact("change of regime used", "none", f"{v.search_breaks} found by the "
                                                           f"break search"))
    facts.append(Fact("chosen model", f"{v.model.strategy} {v.model.shape}",
                      strategy_words(v.model.strategy, v.model.shape,
                                     v.history.keep_from_label)))
    facts.append(Fact("diagnosis", v.diagnosis.cause, f"stability: {v.stability.status}"))
    return facts


def _facts(d: ReportData) -> list[Fact]:
    if d.verdict is not None:
        units = _units_suffix(d)
        facts = _verdict_facts(d.verdict, units)
        if d.forecast is not None and d.forecast.horizon:
            row = d.forecast.rows()[0]
            facts.insert(2, Fact(f"forecast {row['label']}", num(row["mean"]) + units,
                                 f"95%: {num(row['lower95'])} to {num(row['upper95'])}{units}"))
        return facts
    facts = []
    g = d.growth
    if g and g.get("segments"):
        last = g["segments"][-1]
        v = last["growth"].get(gf.ANNUALISED_PCT)
        ci = last["growth"].get(gf.ci95(gf.ANNUALISED_PCT)) or [None, None]
        if v is not None:
            sub = (f"95%: {numformat.interval(ci[0], ci[1], numformat.percent)}"
                   if None not in ci else "")
            facts.append(Fact(f"growth since {last['start_label']} ({g.get('shape')} trend)",
                              f"{numformat.percent(v)} a year", sub))
    if d.breaks:
        b = d.breaks[-1]
        sub = (f"95%: {d.label(b.low)} to {d.label(b.high)}" if b.low is not None else "")
        facts.append(Fact("last change of regime", b.label, sub))
    else:
        facts.append(Fact("change of regime", "none found", ""))
    if d.forecast is not None and d.forecast.horizon:
        row = d.forecast.rows()[0]
        which = "recommended forecast" if d.recommended else "forecast"
        units = _units_suffix(d)
        facts.append(Fact(f"{which} {row['label']}", num(row["mean"]) + units,
                          f"95%: {num(row['lower95'])} to {num(row['upper95'])}{units}"))
    rec = d.recommended
    if rec:
        facts.append(Fact("recommended strategy", _name(d, rec) or rec, ""))
    return facts


def build(d: ReportData, *, log_scale: bool = False, progress=None) -> Content:
    """Every part of the report; ``log_scale`` draws value axes on a log scale,
    ``progress(done, total)`` is called after each chart."""
    s = d.series
    steps = 7
    made = [_series_chart(d, log_scale)]
    if progress is not None:
        progress(1, steps)
    missing = []
    for name, fn, why in (("forecast errors", _error_chart, "no rolling-origin evaluation"),
                          ("CUSUM path", _cusum_chart, "the break search gave no CUSUM path"),
                          ("history sweep", _history_chart, "no history sweep was run"),
                          ("accuracy by horizon", _horizon_chart, "no candidates were scored"),
                          ("growth by regime", _growth_chart, "no growth figures")):
        chart = fn(d)
        if chart is None:
            missing.append(f"The {name} chart is not shown: {why}.")
        else:
            made.append(chart)
        if progress is not None:
            progress(len(made) + len(missing), steps)
    tables: list[Table] = []
    if d.growth:
        tables.append(growth_rows(d.growth))
    if d.evaluation and d.evaluation.get("candidates"):
        names = {c.get("name"): _name(d, c.get("name"))
                 for c in d.evaluation.get("candidates") or ()}
        tables.append(ranking_rows(d.evaluation, names))
    if d.forecast is not None:
        ft = forecast_rows(d.forecast.to_dict())
        words = strategy_words(recommended_candidate(d.evaluation))
        tables.append(Table(ft.name, ft.title, ft.columns, ft.rows,
                            f"Model: {words}." if words else ft.note))
    if d.breaks_dict and d.breaks_dict.get("breaks"):
        bt = break_rows(d.breaks_dict)
        title, note = bt.title, bt.note
        if d.verdict is not None:  # the search's breaks, said to be the search's
            title = f"Breaks found by the {d.verdict.model.search_shape} break search"
            used = len(d.model_breaks)
            note = (f"{note} The chosen model uses "
                    + ("these breaks." if used and not d.unused_breaks else
                       "none of them; they are shown as the search found them." if not used
                       else f"{used} of them.")).strip()
        bt = Table(bt.name, title, bt.columns,
                   tuple(dict(r, label=b.label, low=d.label(b.low), high=d.label(b.high))
                         if b.low is not None else dict(r, label=b.label)
                         for r, b in zip(bt.rows, d.breaks)), note)
        tables.append(bt)
    cautions = list(assemble(d.cautions))  # the analysis's cautions; standing ones always
    spec_text = d.spec.describe() if d.spec is not None else ""
    source = f"{d.source_name}: " if d.source_name else ""
    subtitle = (f"{source}{s.n} {s.frequency.name} periods, {s.label(0)} to "
                f"{s.label(s.n - 1)}; {spec_text}")
    if progress is not None:
        progress(steps, steps)
    return Content(title=f"{s.name}: growth regimes and forecast", subtitle=subtitle,
                   facts=_facts(d), summary=summary_sentences(d), charts=made, tables=tables,
                   cautions=cautions, missing=missing)
