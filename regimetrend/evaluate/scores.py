"""Metrics of rolling-origin forecasts, overall and per horizon, in original units.

All metrics pool the forecasts of every origin (and, overall, every horizon) with equal
weight. MASE divides each absolute error by the seasonal-naive in-sample MAE of the history
known at its origin (Hyndman and Koehler, 2006), then averages; the scale is written beside
each forecast in the errors file so the figure can be recomputed from it.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..metrics import accuracy, interval_score


def score(actual, forecast, lower80, upper80, lower95, upper95, scale) -> dict:
    """Metrics of paired arrays (any shape; ``scale`` broadcasts against them)."""
    actual = np.asarray(actual, dtype=float)
    forecast = np.asarray(forecast, dtype=float)
    scale = np.broadcast_to(np.asarray(scale, dtype=float), actual.shape)
    m = accuracy(actual.ravel(), forecast.ravel(), lower80=np.ravel(lower80),
                 upper80=np.ravel(upper80), lower95=np.ravel(lower95), upper95=np.ravel(upper95))
    s = scale.ravel()
    if np.all(np.isfinite(s)) and np.all(s > 0):
        m["mase"] = float(np.mean(np.abs(actual.ravel() - forecast.ravel()) / s))
    else:
        m["mase"] = None
    return m


def column_scores(actual, forecast, lower80, upper80, lower95, upper95, scale) -> list[dict]:
    """``score`` of every column of (origins x horizons) arrays at once (one horizon each)."""
    err = actual - forecast
    ae = np.abs(err)
    n = actual.shape[0]
    cols = {"me": err.mean(axis=0), "mae": ae.mean(axis=0),
            "rmse": np.sqrt((err ** 2).mean(axis=0))}
    zero = np.any(actual == 0, axis=0)
    with np.errstate(divide="ignore", invalid="ignore"):
        mape = 100.0 * np.mean(np.abs(err / actual), axis=0)
    ok_scale = bool(np.all(np.isfinite(scale)) and np.all(scale > 0))
    mase = (ae / scale[:, None]).mean(axis=0) if ok_scale else None
    for tag, lo, hi in (("80", lower80, upper80), ("95", lower95, upper95)):
        level = 0.80 if tag == "80" else 0.95
        cols["coverage" + tag] = np.mean((actual >= lo) & (actual <= hi), axis=0)
        cols["interval_score" + tag] = interval_score(actual, lo, hi, level).mean(axis=0)
    out = []
    for j in range(actual.shape[1]):
        m: dict[str, Any] = {"n": int(n), "me": float(cols["me"][j]), "mae": float(cols["mae"][j]),
             "rmse": float(cols["rmse"][j])}
        if zero[j]:
            m["mape"] = None
            m["mape_note"] = "undefined: an actual value is zero"
        else:
            m["mape"] = float(mape[j])
        m["mase"] = float(mase[j]) if mase is not None else None
        for key in ("coverage80", "interval_score80", "coverage95", "interval_score95"):
            m[key] = float(cols[key][j])
        m["horizon"] = j + 1
        out.append(m)
    return out


def candidate_scores(table, c: int) -> tuple[dict, list[dict]]:
    """Overall metrics and a list of per-horizon metrics of candidate number ``c``."""
    parts = (table.actual, table.forecast[c], table.lower80[c], table.upper80[c],
             table.lower95[c], table.upper95[c])
    overall = score(*parts, table.scale[:, None])
    return overall, column_scores(*parts, table.scale)
