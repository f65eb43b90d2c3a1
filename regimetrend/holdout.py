"""The single train/holdout split: fit on all but the last k periods, score the forecast of them.

All errors are in original units (for the exponential shape the back-transformed mean forecast
is scored, never the log-scale fit).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .design import TrendSpec
from .errors import InputError, about
from .forecast import Forecast, dated, fit_history
from .metrics import accuracy, naive_scale
from .series import Series


@dataclass(frozen=True, eq=False)
class Holdout:
    """Forecasts of the last k periods from a fit on the periods before them, and their scores."""

    k: int
    forecast: Forecast
    actual: np.ndarray
    metrics: dict

    def to_dict(self) -> dict:
        rows = self.forecast.rows()
        for row, a in zip(rows, self.actual):
            row["actual"] = float(a)
        return {"k": self.k, "metrics": self.metrics, "rows": rows}


def holdout_check(series: Series, spec: TrendSpec, k: int) -> Holdout:
    """Fit ``spec`` on positions 0..n-k-1 and score its forecasts of the last k periods."""
    if k < 1:
        raise InputError(f"{about('holdout')}: must be at least 1 period")
    train = series.n - k
    need = spec.minimum_points()
    if train <= 0:
        raise InputError(f"{about('holdout')}: the series has {series.n} periods, so holding out "
                         f"{k} leaves none to fit")
    if train < need:
        raise InputError(f"{about('holdout')}: {k} periods held out leaves {train} to fit; a "
                         f"{spec.describe()} needs at least {need}")
    fit = fit_history(series, spec, 0, train, what="the history before the holdout")
    fc = dated(series, fit, np.arange(train, series.n), "global " + spec.describe())
    actual = series.values[train:]
    p = fc.points
    metrics = accuracy(actual, p.mean, scale=naive_scale(series.values[:train], spec.season_length),
                       lower80=p.lower80, upper80=p.upper80, lower95=p.lower95, upper95=p.upper95)
    return Holdout(k, fc, actual, metrics)
