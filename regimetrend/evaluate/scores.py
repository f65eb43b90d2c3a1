"""Metrics of rolling-origin forecasts, overall and per horizon, in original units.

All metrics pool the forecasts of every origin (and, overall, every horizon) with equal
weight. MASE divides each absolute error by the seasonal-naive in-sample MAE of the history
known at its origin (Hyndman and Koehler, 2006), then averages; the scale is written beside
each forecast in the errors file so the figure can be recomputed from it.
"""

from __future__ import annotations

import numpy as np

from ..metrics import accuracy


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


def candidate_scores(table, c: int) -> tuple[dict, list[dict]]:
    """Overall metrics and a list of per-horizon metrics of candidate number ``c``."""
    scale = table.scale[:, None]
    parts = (table.actual, table.forecast[c], table.lower80[c], table.upper80[c],
             table.lower95[c], table.upper95[c])
    overall = score(*parts, scale)
    per_h = []
    for j in range(table.actual.shape[1]):
        m = score(*(p[:, j] for p in parts), table.scale)
        m["horizon"] = j + 1
        per_h.append(m)
    return overall, per_h
