"""Forecast results: dated point forecasts with intervals, in original units.

``Forecast`` is what every strategy hands on: period starts, labels, the mean and median
forecasts and the 80% and 95% prediction interval ends. ``trend_forecast`` makes one from a
single trend fitted to a stretch of history (the global trend, or a truncated history).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .design import TrendSpec
from .series import Series
from .trendfit import PointForecasts, TrendFit, fit_trend

POINT_FORECAST = "mean"  # the point forecast the tool reports; see trendfit's docstring


@dataclass(frozen=True, eq=False)
class Forecast:
    """Dated forecasts of one model, in original units."""

    model: str  # plain description, e.g. "global linear trend with seasonal dummies"
    spec: TrendSpec
    starts: np.ndarray  # datetime64[D]
    labels: tuple[str, ...]
    points: PointForecasts
    fitted_from: int  # first position of the history the model was fitted on

    @property
    def mean(self) -> np.ndarray:
        return self.points.mean

    @property
    def horizon(self) -> int:
        return len(self.labels)

    def rows(self) -> list[dict]:
        p = self.points
        return [{"date": str(self.starts[i]), "label": self.labels[i], "mean": float(p.mean[i]),
                 "median": float(p.median[i]), "lower80": float(p.lower80[i]),
                 "upper80": float(p.upper80[i]), "lower95": float(p.lower95[i]),
                 "upper95": float(p.upper95[i])} for i in range(self.horizon)]

    def to_dict(self) -> dict:
        return {"model": self.model, "spec": self.spec.to_dict(), "point": POINT_FORECAST,
                "fitted_from": int(self.fitted_from), "rows": self.rows()}


def fit_history(series: Series, spec: TrendSpec, start: int = 0, end: int | None = None,
                what: str | None = None) -> TrendFit:
    """Fit one trend to positions start..end-1 of ``series``."""
    end = series.n if end is None else end
    positions = np.arange(start, end)
    label = what or ("the series" if start == 0 else f"the history from {series.label(start)}")
    return fit_trend(series.values[start:end], positions, spec, series.first_season(), label)


def dated(series: Series, fit: TrendFit, positions: np.ndarray, model: str) -> Forecast:
    """Attach calendar dates to a fitted trend's forecasts at ``positions``."""
    positions = np.asarray(positions, dtype=int)
    n = series.n
    ahead = series.frequency.future(series.starts[-1], int(max(positions.max() - n + 1, 0)))
    starts = np.array([series.starts[p] if p < n else ahead[p - n] for p in positions],
                      dtype="datetime64[D]")
    labels = tuple(series.frequency.label(s) for s in starts)
    return Forecast(model, fit.spec, starts, labels, fit.forecast(positions),
                    int(fit.positions.min()))


def trend_forecast(series: Series, spec: TrendSpec, horizon: int, start: int = 0) -> Forecast:
    """Fit one trend on the history from ``start`` and forecast ``horizon`` periods ahead."""
    fit = fit_history(series, spec, start)
    model = ("global " if start == 0 else f"history from {series.label(start)}: ") + spec.describe()
    return dated(series, fit, np.arange(series.n, series.n + horizon), model)
