"""The history decision: keep all history, or keep it from a named period, with the evidence.

Rule: keep the history from the last break found on the full sample when (1) the break search's
sup-F test rejects "no break" at the 5% level and (2) the trend fitted only on the history after
the last break (re-detected at each origin) forecasts at least as well on the rolling origin
(RMSE) as the trend fitted on all history. Otherwise keep all history.

The evidence is the history sweep (rolling-origin RMSE of the trend fitted from each fixed window
start of a grid, the first being all history), the test result and the break's 95% date
interval, so the analyst can see whether accuracy improves as old history is dropped.
"""

from __future__ import annotations

from .recommend import ALPHA, _p
from .result import HistoryDecision


def sweep_curve(series, sweep, reference) -> list[dict]:
    """Accuracy against window start; the first point (all history) is the reference."""
    ref_rmse = reference.metrics["rmse"]
    rows = [{"start": series.iso(0), "label": series.label(0), "position": 0,
             "rmse": ref_rmse, "mae": reference.metrics["mae"], "gain_over_global": 0.0}]
    for c in sweep:
        s = c.strategy.start
        rows.append({"start": series.iso(s), "label": series.label(s), "position": int(s),
                     "rmse": c.metrics["rmse"], "mae": c.metrics["mae"],
                     "gain_over_global": c.gain})
    return rows


def decide_history(series, reference, truncated, sweep, last_break, break_p,
                   optimistic: bool = False) -> HistoryDecision:
    """``last_break`` is a dict with position, ci95 (positions) or None; ``truncated`` the
    rolling-origin result of the trend fitted from the last re-detected break."""
    curve = sweep_curve(series, sweep, reference)
    best = min(curve, key=lambda r: r["rmse"])
    evidence = {"rule": ("keep the history from the last full-sample break when the sup-F test "
                         f"finds a break at the {ALPHA:.0%} level and the trend fitted after "
                         "the break forecasts at least as well (rolling-origin RMSE) as the "
                         "trend on all history; otherwise keep all history"),
                "sweep": curve, "best_sweep_start": best["start"],
                "best_sweep_label": best["label"], "sup_f_p_value": break_p,
                "optimistic": optimistic}
    rmse_all = reference.metrics["rmse"]
    rmse_after = truncated.metrics["rmse"] if truncated is not None else None
    evidence["rmse_all_history"] = rmse_all
    evidence["rmse_after_last_break"] = rmse_after
    if last_break is not None:
        lo, hi = last_break["ci95"]
        evidence["last_break"] = {"date": series.iso(last_break["position"]),
                                  "label": series.label(last_break["position"]),
                                  "ci95": [series.iso(lo), series.iso(hi)] if lo is not None
                                  else None,
                                  "ci95_labels": [series.label(lo), series.label(hi)]
                                  if lo is not None else None}
    significant = break_p is not None and break_p < ALPHA
    if last_break is None:
        return HistoryDecision(None, None, "keep all history: the break search found no break.",
                               evidence)
    label = series.label(last_break["position"])
    interval = ""
    if evidence["last_break"]["ci95_labels"]:
        a, b = evidence["last_break"]["ci95_labels"]
        interval = f" (95% date interval {a} to {b})"
    if not significant:
        return HistoryDecision(None, None,
                               f"keep all history: the break at {label}{interval} is not "
                               f"significant (sup-F p = {_p(break_p)}).", evidence)
    if rmse_after is None or not rmse_after <= rmse_all:
        return HistoryDecision(None, None,
                               f"keep all history: the break at {label}{interval} is significant "
                               f"(sup-F p = {_p(break_p)}), but the trend fitted after it "
                               f"forecast worse on the rolling origin (RMSE {rmse_after:.4g} "
                               f"against {rmse_all:.4g}).", evidence)
    sentence = (f"keep the history from {label}: the break there{interval} is significant "
                f"(sup-F p = {_p(break_p)}) and the trend fitted after it forecast better on the "
                f"rolling origin (RMSE {rmse_after:.4g} against {rmse_all:.4g} with all history)")
    sentence += (" (optimistic: full-sample breaks reused)." if optimistic else ".")
    return HistoryDecision(series.iso(last_break["position"]), label, sentence, evidence)
