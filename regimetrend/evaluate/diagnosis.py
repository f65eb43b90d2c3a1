"""The late-failure diagnosis of the global trend: how it misses the last periods, and why.

Errors are actual minus the global trend's in-sample fit (fitted on all history; the median for
the exponential shape), over the last ``window`` periods: their mean in units and as % of the
mean actual level there, and the share with the dominant sign (a trend that still fits leaves
about half its errors on each side). The CUSUM crossing (the first period where the global
trend's recursive-residual CUSUM left its 5% band, from the break search) dates when the
misfit began; the break that explains it is the one whose 95% date interval holds the
crossing, else the latest break before it, else the first break after it. A later break that
falls in (or just before) the last periods is named as well.

Evidence the verdict reads to name the cause (``verdict.diagnose``):
- ``residual_lag1``: lag-1 autocorrelation of the global trend's residuals over all history
  (near 1 for a series that wanders like a random walk around any trend);
- ``outlier``: the largest error of the window when it is at least ``OUTLIER_SIZE`` robust
  standard deviations (1.4826 times the median absolute residual over all history) and
  ``explains`` whether, without it, the window's errors look like noise (fewer than 70% on one
  side and a mean under 2% of the level).
"""

from __future__ import annotations

import numpy as np

from .result import Diagnosis

OUTLIER_SIZE = 4.0  # robust standard deviations (common practice for a gross outlier)


def default_window(n: int, horizon: int, season_length: int) -> int:
    """The last max(H, one season, 6) periods, at most a quarter of the series (at least 3)."""
    return int(max(3, min(max(horizon, season_length, 6), n // 4)))


def explaining_break(crossing, breaks):
    """``breaks``: list of dicts with position and ci95 (lo, hi) positions."""
    if not breaks:
        return None
    if crossing is None:
        return breaks[-1]
    for b in breaks:
        lo, hi = b["ci95"]
        if lo is not None and lo <= crossing <= hi:
            return b
    before = [b for b in breaks if b["position"] <= crossing]
    if before:
        return before[-1]
    return breaks[0]


def diagnose(series, reference_name: str, fitted: np.ndarray, window: int, crossing,
             breaks) -> Diagnosis:
    n = series.n
    k = min(int(window), n)
    actual = series.values[n - k:]
    err = actual - np.asarray(fitted)[n - k:]
    me = float(err.mean())
    level = float(np.mean(np.abs(actual)))
    pct = 100.0 * me / level if level > 0 else None
    pos = int(np.sum(err > 0))
    neg = int(np.sum(err < 0))
    dominant = "positive" if pos >= neg else "negative"
    share = max(pos, neg) / k
    cause = explaining_break(crossing, breaks)
    resid = series.values - np.asarray(fitted)
    data = {"model": reference_name, "window": k, "from": series.iso(n - k),
            "to": series.iso(n - 1), "mean_error": me, "mean_error_percent": pct,
            "mean_abs_error": float(np.mean(np.abs(err))),
            "positive_errors": pos, "negative_errors": neg, "dominant_sign": dominant,
            "share_one_sign": share,
            "cusum_crossing": series.iso(crossing) if crossing is not None else None,
            "cusum_crossing_label": series.label(crossing) if crossing is not None else None,
            "cusum_crossing_position": int(crossing) if crossing is not None else None,
            "residual_lag1": lag1(resid), "outlier": outlier(series, resid, err, k),
            "explaining_break": None,
            "errors_are": "actual minus the global trend's in-sample fit"}
    if cause is not None:
        lo, hi = cause["ci95"]
        data["explaining_break"] = {"date": series.iso(cause["position"]),
                                    "label": series.label(cause["position"]),
                                    "ci95": [series.iso(lo), series.iso(hi)] if lo is not None
                                    else None}
    direction = "below" if me > 0 else "above"
    pct_text = f" ({abs(pct):.1f}% of the level)" if pct is not None else ""
    sentence = (f"Over the last {k} periods ({series.label(n - k)} to {series.label(n - 1)}) the "
                f"{reference_name} trend fitted to all history ran {direction} the actual values "
                f"by {abs(me):.4g} on average{pct_text}, with {max(pos, neg)} of {k} errors "
                f"(actual minus trend) {dominant}")
    if crossing is not None:
        sentence += f"; its CUSUM left the 5% band at {series.label(crossing)}"
    else:
        sentence += "; its CUSUM stayed inside the 5% band"
    if cause is not None:
        lo, hi = cause["ci95"]
        span = (f" (95% interval {series.label(lo)} to {series.label(hi)})"
                if lo is not None else "")
        verb = "which the break at" if crossing is not None else "and the latest break is at"
        sentence += f", {verb} {series.label(cause['position'])}{span}"
        if crossing is not None:
            sentence += " explains"
    else:
        sentence += ", and no break was found to explain a misfit"
    latest = breaks[-1] if breaks else None
    if latest is not None and latest is not cause and latest["position"] >= n - 2 * k:
        data["latest_break"] = {"date": series.iso(latest["position"]),
                                "label": series.label(latest["position"])}
        sentence += (f"; the latest break, at {series.label(latest['position'])}, falls in or "
                     f"just before these periods")
    if share < 0.7 and abs(pct or 0.0) < 2.0:
        sentence += "; the recent errors look like noise rather than a failing trend"
    return Diagnosis(sentence + ".", data)


def lag1(resid: np.ndarray) -> float | None:
    """Lag-1 autocorrelation of residuals (about their mean)."""
    r = np.asarray(resid, dtype=float) - float(np.mean(resid))
    den = float(r @ r)
    return float(r[1:] @ r[:-1]) / den if den > 0 and r.size > 2 else None


def outlier(series, resid, err, k: int) -> dict | None:
    """The window's largest error when it is a gross outlier (module docstring), else None."""
    scale = 1.4826 * float(np.median(np.abs(resid - np.median(resid))))
    if not scale > 0 or k < 3:
        return None
    j = int(np.argmax(np.abs(err)))
    size = abs(float(err[j])) / scale
    if size < OUTLIER_SIZE:
        return None
    pos = series.n - k + j
    return {"position": pos, "date": series.iso(pos), "label": series.label(pos),
            "size": size, "explains": bool(abs(float(err[j])) >= 0.5 * abs(float(err.sum())))}
