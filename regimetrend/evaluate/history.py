"""The history decision: keep all history, or keep it from a named period, with the evidence.

Rule: keep the history from a break found on the full sample when (1) that break's own test is
significant at the 5% level (the sequential sup-F step that placed it, else its partial F given
the other breaks; see ``breakinfo.own_test``), (2) the rolling origin can judge that start (at
least half of the origins know ``minimum`` periods after it), and (3) the leak-free truncated
trend forecasts at least as well on the rolling origin (RMSE) as the trend fitted on all
history. The latest break meeting (1) and (2) is the one judged; when (3) fails all history is
kept. A break too recent to judge is named in the sentence, so the analyst can revisit it.

Leak-free means what a forecaster could have done at each origin: re-detect the breaks on the
history up to the origin and fit the trend from the latest of them (from the k-th last when the
break judged has k - 1 judgeable breaks after it). The fits from the full-sample break dates
know those dates in advance; they are shown only as supporting evidence, labelled
"optimistic: in-sample break", and never decide.

The evidence is the history sweep (rolling-origin RMSE of the trend fitted from each start of a
fixed grid, the first being all history), the leak-free fits and the starts they used at each
origin, the optimistic fits from each full-sample break date, each break's own test and 95%
date interval, and the overall sup-F p-value (whether there is any break at all).
"""

from __future__ import annotations

from ..regimes import usable_breaks
from ..words import history_sentence, significance
from .recommend import ALPHA, _p
from .result import HistoryDecision

IN_SAMPLE = "optimistic: in-sample break"

RULE = ("keep the history from the latest full-sample break that the rolling origin can judge "
        "(at least half of the origins know enough periods after it) and that is significant on "
        f"its own at the {ALPHA:.0%} level (the sequential sup-F step that placed it, else its "
        "partial F given the other breaks), when the leak-free truncated trend (refitted at each "
        "origin from the break re-detected on the history up to that origin) forecasts at least "
        "as well (rolling-origin RMSE) as the trend on all history; otherwise keep all history. "
        f"Fits from the full-sample break dates are supporting evidence only ({IN_SAMPLE})")


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


def leak_free_starts(origins, breaks_by_origin, minimum: int, k: int = 1) -> list[int]:
    """At each origin, the start the leak-free truncated trend used: the k-th last break known
    there that leaves ``minimum`` periods (the rule of ``OriginFits.latest_start``), else 0."""
    out = []
    for o, known in zip(origins, breaks_by_origin):
        kept = usable_breaks(known, o, 1, minimum)
        out.append(int(kept[-k]) if len(kept) >= k else 0)
    return out


def _own(own_tests, position) -> dict:
    return dict((own_tests or {}).get(position)
                or {"test": "not available", "statistic": None, "p_value": None})


def decide_history(series, reference, truncated, sweep, from_breaks, breaks, break_p, origins,
                   minimum: int, optimistic: bool = False, breaks_by_origin=None,
                   own_tests=None) -> HistoryDecision:
    """``breaks``: full-sample breaks [{position, ci95}]; ``own_tests``: {position: the break's
    own test (``breakinfo.own_test``)}; ``truncated``: the leak-free results, {k: trend fitted
    from the k-th last break re-detected at each origin} (a single result means k = 1);
    ``from_breaks``: {position: result of the trend fitted from that full-sample date}
    (optimistic); ``breaks_by_origin``: the breaks known at each origin; ``break_p``: the
    overall sup-F p-value (is there any break)."""
    leak = truncated if isinstance(truncated, dict) else {1: truncated}
    leak = {k: c for k, c in leak.items() if c is not None}
    curve = sweep_curve(series, sweep, reference)
    best = min(curve, key=lambda r: r["rmse"])
    rmse_all = reference.metrics["rmse"]
    rows = []
    for b in breaks:
        lo, hi = b["ci95"]
        fit = from_breaks.get(b["position"])
        own = _own(own_tests, b["position"])
        rows.append({"date": series.iso(b["position"]), "label": series.label(b["position"]),
                     "position": b["position"],
                     "ci95": [series.iso(lo), series.iso(hi)],
                     "ci95_labels": [series.label(lo), series.label(hi)],
                     "ci95_positions": [int(lo), int(hi)],
                     "judgeable": judgeable(b["position"], origins, minimum),
                     "own_test": own["test"], "own_statistic": own["statistic"],
                     "own_p_value": own["p_value"],
                     "significant": own["p_value"] is not None and own["p_value"] < ALPHA,
                     "rmse_from_break": fit.metrics["rmse"] if fit is not None else None,
                     "gain_over_all_history": fit.gain if fit is not None else None,
                     "from_break_label": IN_SAMPLE})
    first = leak.get(1)
    evidence = {"rule": RULE, "sweep": curve, "best_sweep_start": best["start"],
                "best_sweep_label": best["label"], "sup_f_p_value": break_p,
                "rmse_all_history": rmse_all,
                "rmse_after_redetected_last_break": (first.metrics["rmse"]
                                                     if first is not None else None),
                "leak_free": {str(k): {"name": c.name, "rmse": c.metrics["rmse"],
                                       "gain_over_all_history": c.gain}
                              for k, c in sorted(leak.items())},
                "breaks": rows, "optimistic": optimistic,
                "note": (f"the decision rests on the leak-free fits; rmse_from_break ({IN_SAMPLE})"
                         " knows the full-sample break date in advance")}
    if not rows:
        return HistoryDecision(None, None,
                               history_sentence(None, "the break search found no break"),
                               evidence)

    def interval(r):
        a, b = r["ci95_labels"]
        return f" (95% date interval {a} to {b})"

    def own_words(r):
        return f"{r['own_test']} {_p(r['own_p_value'])}"

    def supporting(r):
        if r["rmse_from_break"] is None:
            return ""
        return (f"; supporting, {IN_SAMPLE}: the trend fitted from the full-sample date "
                f"{r['label']} had RMSE {r['rmse_from_break']:.4g}")

    tail = " (optimistic: full-sample breaks reused)" if optimistic else ""
    recent = [r for r in rows if not r["judgeable"]]
    recent_note = ""
    if recent:
        r = recent[-1]
        recent_note = (f"; the break at {r['label']}{interval(r)} is too recent to judge on the "
                       f"rolling origin, so revisit it as data arrive")
    judged = [r for r in rows if r["judgeable"]]
    candidates = [r for r in judged if r["significant"]]
    if not candidates:
        if not judged:
            r = rows[-1]
            return HistoryDecision(None, None, history_sentence(
                                   None, f"the break at {r['label']}{interval(r)} is too "
                                   f"recent for the rolling origin to judge ({own_words(r)}), "
                                   f"so revisit it as data arrive{tail}"), evidence)
        r = judged[-1]
        return HistoryDecision(None, None, history_sentence(
                               None, f"the break at {r['label']}{interval(r)} is the latest "
                               f"the rolling origin can judge, and on its own it is "
                               f"{significance(r['own_p_value'])} ({own_words(r)}; any break: "
                               f"sup-F {_p(break_p)}){recent_note}{tail}"), evidence)
    chosen = candidates[-1]
    k = 1 + sum(1 for r in judged if r["position"] > chosen["position"])
    fit = leak.get(k)
    evidence["judged_break"] = chosen["date"]
    evidence["leak_free_candidate"] = fit.name if fit is not None else None
    hits = None
    if breaks_by_origin is not None and fit is not None:
        starts = leak_free_starts(origins, breaks_by_origin, minimum, k)
        lo, hi = chosen["ci95_positions"]
        hits = sum(1 for s in starts if s > 0 and lo <= s <= hi)
        evidence["leak_free_starts"] = [series.iso(s) for s in starts]
        evidence["leak_free_starts_in_interval"] = hits
    which = ("the latest break" if k == 1 else f"break {k} before the end")
    how = ("found on the full sample and reused at each origin (optimistic)" if optimistic
           else "re-detected at each origin from the history up to it (leak-free)")
    where = ("" if hits is None or optimistic else
             f"; at {hits} of {len(origins)} origins the break re-detected there fell in "
             f"that 95% interval")
    significant = (f"the break there{interval(chosen)} is, on its own, "
                   f"{significance(chosen['own_p_value'])} ({own_words(chosen)})")
    if fit is None or not fit.metrics["rmse"] <= rmse_all:
        got = ("was not run" if fit is None else
               f"did not forecast better than all history (RMSE {fit.metrics['rmse']:.4g} "
               f"against {rmse_all:.4g})")
        return HistoryDecision(None, None, history_sentence(
                               None, f"at {chosen['label']} {significant}, but on "
                               f"the rolling origin the trend refitted from {which} {how} "
                               f"{got}{supporting(chosen)}"
                               f"{recent_note}{tail}"), evidence)
    sentence = history_sentence(chosen["label"], f"{significant}, and on the rolling origin the "
                                f"trend refitted from {which} {how} forecast better than all "
                                f"history (RMSE "
                                f"{fit.metrics['rmse']:.4g} against {rmse_all:.4g}){where}"
                                f"{supporting(chosen)}{recent_note}{tail}")
    return HistoryDecision(chosen["date"], chosen["label"], sentence, evidence)
