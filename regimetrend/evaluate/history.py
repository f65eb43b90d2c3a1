"""The history decision: keep all history, or keep it from a named period, with the evidence.

Rule: keep the history from a break found on the full sample when (1) the break search's sup-F
test rejects "no break" at the 5% level, (2) the rolling origin can judge that start (at least
half of the origins know ``minimum`` periods after it), and (3) the trend fitted only on the
history from that break forecasts at least as well on the rolling origin (RMSE) as the trend
fitted on all history. The latest break meeting all three is named; otherwise all history is
kept. A break too recent to judge is named in the sentence, so the analyst can revisit it.

The evidence is the history sweep (rolling-origin RMSE of the trend fitted from each start of a
fixed grid, the first being all history), the fits from each full-sample break date (these
dates come from the full sample, so that comparison is mildly optimistic), the leak-free fit
from the break re-detected at each origin, the test result and the breaks' 95% date intervals.
"""

from __future__ import annotations

from .recommend import ALPHA, _p
from .result import HistoryDecision

RULE = ("keep the history from the latest full-sample break that is significant (sup-F test at "
        f"the {ALPHA:.0%} level), that the rolling origin can judge (at least half of the origins "
        "know enough periods after it) and from which the trend forecasts at least as well "
        "(rolling-origin RMSE) as the trend on all history; otherwise keep all history")


def sweep_curve(series, sweep, reference) -> list[dict]:
    """Accuracy against window start; the first point (all history) is the reference."""
    rows = [{"start": series.iso(0), "label": series.label(0), "position": 0,
             "rmse": reference.metrics["rmse"], "mae": reference.metrics["mae"],
             "gain_over_global": 0.0}]
    for c in sweep:
        s = c.strategy.start
        rows.append({"start": series.iso(s), "label": series.label(s), "position": int(s),
                     "rmse": c.metrics["rmse"], "mae": c.metrics["mae"],
                     "gain_over_global": c.gain})
    return rows


def judgeable(position: int, origins, minimum: int) -> bool:
    """At least half of the origins know ``minimum`` periods from ``position`` on."""
    known = sum(1 for o in origins if o - position >= minimum)
    return 2 * known >= len(origins)


def decide_history(series, reference, truncated, sweep, from_breaks, breaks, break_p, origins,
                   minimum: int, optimistic: bool = False) -> HistoryDecision:
    """``breaks``: full-sample breaks [{position, ci95}]; ``from_breaks``: {position: result of
    the trend fitted from that break date}; ``truncated``: the leak-free result of the trend
    fitted from the break re-detected at each origin."""
    curve = sweep_curve(series, sweep, reference)
    best = min(curve, key=lambda r: r["rmse"])
    rmse_all = reference.metrics["rmse"]
    significant = break_p is not None and break_p < ALPHA
    rows = []
    for b in breaks:
        lo, hi = b["ci95"]
        fit = from_breaks.get(b["position"])
        rows.append({"date": series.iso(b["position"]), "label": series.label(b["position"]),
                     "position": b["position"],
                     "ci95": [series.iso(lo), series.iso(hi)],
                     "ci95_labels": [series.label(lo), series.label(hi)],
                     "judgeable": judgeable(b["position"], origins, minimum),
                     "rmse_from_break": fit.metrics["rmse"] if fit is not None else None,
                     "gain_over_all_history": fit.gain if fit is not None else None})
    evidence = {"rule": RULE, "sweep": curve, "best_sweep_start": best["start"],
                "best_sweep_label": best["label"], "sup_f_p_value": break_p,
                "rmse_all_history": rmse_all,
                "rmse_after_redetected_last_break": (truncated.metrics["rmse"]
                                                     if truncated is not None else None),
                "breaks": rows, "optimistic": optimistic,
                "note": "fits from the full-sample break dates know those dates in advance"}
    if not rows:
        return HistoryDecision(None, None, "keep all history: the break search found no break.",
                               evidence)

    def interval(r):
        a, b = r["ci95_labels"]
        return f" (95% date interval {a} to {b})"

    if not significant:
        last = rows[-1]
        return HistoryDecision(None, None,
                               f"keep all history: the break at {last['label']}{interval(last)} "
                               f"is not significant (sup-F {_p(break_p)}).", evidence)
    chosen = None
    for r in reversed(rows):
        if r["judgeable"] and r["rmse_from_break"] is not None and r["rmse_from_break"] <= rmse_all:
            chosen = r
            break
    recent = [r for r in rows if not r["judgeable"]]
    recent_note = ""
    if recent:
        r = recent[-1]
        recent_note = (f"; the break at {r['label']}{interval(r)} is too recent to judge on the "
                       f"rolling origin, so revisit it as data arrive")
    tail = " (optimistic: full-sample breaks reused)" if optimistic else ""
    if chosen is None:
        return HistoryDecision(None, None,
                               f"keep all history: the breaks are significant (sup-F "
                               f"{_p(break_p)}), but no trend fitted from a break date forecast "
                               f"better than the trend on all history on the rolling origin"
                               f"{recent_note}{tail}.", evidence)
    sentence = (f"keep the history from {chosen['label']}: the break there{interval(chosen)} is "
                f"significant (sup-F {_p(break_p)}) and the trend fitted from it forecast "
                f"better on the rolling origin (RMSE {chosen['rmse_from_break']:.4g} against "
                f"{rmse_all:.4g} with all history){recent_note}{tail}.")
    return HistoryDecision(chosen["date"], chosen["label"], sentence, evidence)
