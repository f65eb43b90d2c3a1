"""Forecast accuracy in original units: ME, MAE, RMSE, MAPE, MASE, coverage, interval score.

Errors are actual minus forecast, so a positive mean error means the forecasts were too low.
MAPE is undefined when an actual is zero: it is then reported as ``None`` with the reason, never
as infinity. MASE divides the MAE by the in-sample mean absolute error of the seasonal naive
forecast (the value one season earlier; the previous value for non-seasonal series), following
Hyndman and Koehler (2006).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np


def naive_scale(history: np.ndarray, season_length: int = 1) -> float:
    """In-sample MAE of the seasonal naive forecast; nan when the history is too short."""
    history = np.asarray(history, dtype=float)
    lag = season_length if season_length > 1 and len(history) > season_length else 1
    if len(history) <= lag:
        return float("nan")
    return float(np.mean(np.abs(history[lag:] - history[:-lag])))


def interval_score(actual, lower, upper, level: float) -> np.ndarray:
    """Interval score of Gneiting and Raftery (2007): width plus 2/alpha times the miss."""
    alpha = 1.0 - level
    actual, lower, upper = (np.asarray(a, dtype=float) for a in (actual, lower, upper))
    return ((upper - lower) + (2.0 / alpha) * np.maximum(lower - actual, 0.0)
            + (2.0 / alpha) * np.maximum(actual - upper, 0.0))


def root_mean_square(err) -> float:
    """RMSE of errors (1-D), as ``accuracy`` computes it."""
    return float(math.sqrt(np.mean(np.asarray(err, dtype=float) ** 2)))


def accuracy(actual, forecast, *, scale: float | None = None, lower80=None, upper80=None,
             lower95=None, upper95=None) -> dict:
    """All metrics for paired actuals and forecasts; interval metrics when ends are given."""
    actual = np.asarray(actual, dtype=float)
    forecast = np.asarray(forecast, dtype=float)
    err = actual - forecast
    out: dict[str, Any] = {"n": int(err.size),
           "me": float(np.mean(err)),
           "mae": float(np.mean(np.abs(err))),
           "rmse": root_mean_square(err)}
    if np.any(actual == 0):
        out["mape"] = None
        out["mape_note"] = "undefined: an actual value is zero"
    else:
        out["mape"] = float(100.0 * np.mean(np.abs(err / actual)))
    if scale is not None and np.isfinite(scale) and scale > 0:
        out["mase"] = out["mae"] / scale
    else:
        out["mase"] = None
    if lower80 is not None:
        lo, hi = np.asarray(lower80), np.asarray(upper80)
        out["coverage80"] = float(np.mean((actual >= lo) & (actual <= hi)))
        out["interval_score80"] = float(np.mean(interval_score(actual, lo, hi, 0.80)))
    if lower95 is not None:
        lo, hi = np.asarray(lower95), np.asarray(upper95)
        out["coverage95"] = float(np.mean((actual >= lo) & (actual <= hi)))
        out["interval_score95"] = float(np.mean(interval_score(actual, lo, hi, 0.95)))
    return out
