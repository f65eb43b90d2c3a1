"""One summary row per series: the analysis flattened into plain values.

Every field a row holds is read from the analysis; nothing is computed here beyond picking and
formatting. ``row_from_analysis`` is the one place that knows where each field lives in an
``Analysis``; ``row_from_scan`` does the same for the scan level (breaks and growth only).

The ``recent_change`` flag and the evidence fields (``last_break_f``, ``cusum_crossing``,
``supf_p``) feed the triage ranking (see ``ranking.py``).
"""

from __future__ import annotations

import math

from ..growth_figures import ANNUALISED_PCT

# Columns of the summary, in order (the id columns come first; see summary.py).
COLUMNS = (
    "id", "status", "reason", "level", "n", "calendar", "start", "end", "model",
    "forecast_model", "breaks", "breaks_ci95", "last_break", "last_break_ci95_low",
    "last_break_ci95_high", "last_break_f", "last_break_in_model", "recent_from",
    "recent_change", "keep_history_from",
    "growth_now_pct_a_year", "growth_now_low", "growth_now_high",
    "growth_before_pct_a_year", "growth_before_low", "growth_before_high",
    "growth_change_p", "diagnosis_cause", "diagnosis", "gain_over_global", "gain_reference",
    "stability", "supf_p", "cusum_crossing",
)

GROWTH_FIGURE = ANNUALISED_PCT  # yearly growth in % (see growth.py for its definition)


def recent_window(n: int, periods_per_year: float) -> int:
    """Periods at the end of a series in which a break counts as recent: the last two years,
    at least 8 periods, at most half the series."""
    return int(max(min(max(8, round(2 * periods_per_year)), n // 2), 1))


def _num(v):
    if v is None:
        return None
    v = float(v)
    return v if math.isfinite(v) else None


def _growth(regime) -> tuple:
    est = regime.get(GROWTH_FIGURE) if regime is not None else None
    if est is None:
        return None, None, None
    return _num(est.value), _num(est.lower), _num(est.upper)


def _common(series, spec, breaks, growth, level: str) -> dict:
    freq = series.frequency
    row = dict.fromkeys(COLUMNS)
    row.update({
        "status": "ok", "reason": "", "level": level, "n": int(series.n),
        "calendar": freq.name, "start": series.iso(0), "end": series.iso(series.n - 1),
        "model": spec.describe(),
        "recent_from": series.iso(series.n - recent_window(series.n, freq.periods_per_year)),
        "breaks": "; ".join(b.date for b in breaks.breaks),
        "breaks_ci95": "; ".join(f"{b.ci95_dates[0]} to {b.ci95_dates[1]}" for b in breaks.breaks),
    })
    if breaks.breaks:
        last = breaks.breaks[-1]
        row.update({"last_break": last.date, "last_break_ci95_low": last.ci95_dates[0],
                    "last_break_ci95_high": last.ci95_dates[1],
                    "last_break_f": _num(last.f_statistic),
                    "recent_change": bool(last.date >= row["recent_from"])})
    else:
        row["recent_change"] = False
    now, before = growth.regimes[-1], (growth.regimes[-2] if len(growth.regimes) > 1 else None)
    (row["growth_now_pct_a_year"], row["growth_now_low"], row["growth_now_high"]) = _growth(now)
    (row["growth_before_pct_a_year"], row["growth_before_low"],
     row["growth_before_high"]) = _growth(before)
    if growth.changes:
        row["growth_change_p"] = _num(growth.changes[-1].p_value)
    tests = breaks.tests
    if tests is not None:
        row["supf_p"] = _num(tests.supf.p_value)
        recursive = [c for c in tests.cusum if c.method == "recursive"]
        if recursive and recursive[0].first_crossing is not None:
            row["cusum_crossing"] = series.iso(int(recursive[0].first_crossing))
    return row


def _from_verdict(row: dict, analysis, verdict) -> dict:
    """The verdict's fields (``Verdict.to_dict()``): a portfolio row is a verdict flattened."""
    v = verdict.to_dict()
    model = v.get("model") or {}
    row["model"] = model.get("name") or row["model"]
    breaks = v.get("breaks") or []
    row["breaks"] = "; ".join(b["date"] for b in breaks)
    row["breaks_ci95"] = "; ".join(f"{b['ci95'][0]} to {b['ci95'][1]}" for b in breaks)
    last, in_model = _latest_break(breaks, verdict)
    if last is not None:
        row["last_break"] = last["date"]
        row["last_break_ci95_low"], row["last_break_ci95_high"] = last["ci95"] or (None, None)
        same = [b for b in analysis.breaks.breaks if b.date == last["date"]]
        row["last_break_f"] = _num(same[0].f_statistic) if same else None
        row["last_break_in_model"] = in_model
        row["recent_change"] = bool(last["date"] >= row["recent_from"])
    else:
        for key in ("last_break", "last_break_ci95_low", "last_break_ci95_high",
                    "last_break_f", "last_break_in_model"):
            row[key] = None
        row["recent_change"] = False
    row["keep_history_from"] = v.get("keep_history_from")
    now = v.get("growth_now") or {}
    ci = now.get("ci95") or [None, None]
    row["growth_now_pct_a_year"] = _num(now.get(GROWTH_FIGURE))
    row["growth_now_low"], row["growth_now_high"] = _num(ci[0]), _num(ci[1])
    fm = v.get("forecast_model") or {}
    row["forecast_model"] = " ".join(x for x in (fm.get("strategy"), fm.get("shape")) if x)
    diagnosis = v.get("diagnosis") or {}
    row["diagnosis_cause"], row["diagnosis"] = diagnosis.get("cause"), diagnosis.get("sentence")
    row["stability"] = (v.get("stability") or {}).get("status")
    evidence = getattr(verdict, "evidence", None)
    row["gain_over_global"] = _num(getattr(evidence, "gain", None))
    row["gain_reference"] = getattr(evidence, "reference", None)
    return row


def _latest_break(model_breaks: list, verdict) -> tuple[dict | None, bool | None]:
    """(the latest break the verdict names, whether the forecast model uses it): the model's
    last break, or a later one the diagnosis cites as the regime change that the model does
    not forecast from (too recent to judge, or a break-free model forecast better). The
    triage ranks by it: a change the search dated near the end is evidence of a recent change
    whatever model forecasts best."""
    last = model_breaks[-1] if model_breaks else None
    cited = verdict.diagnosis.cited_break
    if cited is not None and (last is None or cited.date > last["date"]):
        return cited.to_dict(), False
    return last, (True if last is not None else None)


def row_from_analysis(analysis) -> dict:
    """The summary row of a full analysis: the verdict's fields (``analyze`` always builds
    one)."""
    row = _common(analysis.series, analysis.spec, analysis.breaks, analysis.growth, "full")
    return _from_verdict(row, analysis, analysis.verdict)


def row_from_scan(series, breaks, growth) -> dict:
    """The summary row of the scan level (break search and growth; no rolling origin)."""
    return _common(series, breaks.spec, breaks, growth, "scan")


def failed_row(reason: str, level: str, n: int | None = None) -> dict:
    row = dict.fromkeys(COLUMNS)
    row.update({"status": "failed", "reason": reason, "level": level, "n": n})
    return row
