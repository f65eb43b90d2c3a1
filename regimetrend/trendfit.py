"""Fit one trend model to a stretch of a series and forecast it in original units.

This joins the trend design to the least-squares core and undoes the modelling scale. It is the
building block of the global trend, the truncated-history trend and the regime strategies.

Exponential shape, back to original units: with m the log-scale forecast and v its prediction
variance, the *median* forecast is exp(m) and the *mean* forecast is exp(m + v/2) (lognormal
correction). regimetrend reports the mean as its point forecast by default because business
plans add forecasts up (months into a year, series into a portfolio) and only means add; the
median is given beside it. Interval ends are the back-transformed log-scale interval ends (the
quantiles of a lognormal), so they are not symmetric around either point.

Seasonal adjustment (``adjust``): the s - 1 seasonal effects are estimated before the trend and
are counted against the residual degrees of freedom; their own estimation error is not added to
the prediction variance, so those intervals are slightly narrow (by roughly the share s/n).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import ols
from .design import (TimeScale, TrendSpec, design_matrix, seasonal_pattern, season_index,
                     to_model_scale)
from .errors import InputError

LEVELS = (0.80, 0.95)


@dataclass(frozen=True, eq=False)
class PointForecasts:
    """Forecasts (or fitted values) in original units at a set of positions."""

    positions: np.ndarray
    mean: np.ndarray
    median: np.ndarray
    lower80: np.ndarray
    upper80: np.ndarray
    lower95: np.ndarray
    upper95: np.ndarray

    def band(self, level: float) -> tuple[np.ndarray, np.ndarray]:
        if abs(level - 0.80) < 1e-9:
            return self.lower80, self.upper80
        if abs(level - 0.95) < 1e-9:
            return self.lower95, self.upper95
        raise KeyError(level)


@dataclass(frozen=True, eq=False)
class TrendFit:
    """A trend fitted by least squares on the model scale to ``positions``."""

    spec: TrendSpec
    positions: np.ndarray
    first_season: int
    scale: TimeScale
    fit: ols.LeastSquaresFit
    pattern: np.ndarray | None  # seasonal effects on the model scale, for ``adjust``

    def design(self, positions) -> np.ndarray:
        return design_matrix(positions, self.spec, self.scale, self.first_season)

    def seasonal_offset(self, positions) -> np.ndarray:
        if self.pattern is None:
            return np.zeros(len(np.atleast_1d(positions)))
        idx = season_index(positions, self.first_season, self.spec.season_length)
        return self.pattern[idx]

    def fitted_model_scale(self) -> np.ndarray:
        return self.fit.X @ self.fit.beta + self.seasonal_offset(self.positions)

    def fitted(self) -> np.ndarray:
        """In-sample fitted values in original units (the median for the exponential shape)."""
        m = self.fitted_model_scale()
        return np.exp(m) if self.spec.log_scale else m

    def trend(self) -> np.ndarray:
        """In-sample trend with the seasonal terms at their average (zero for effect-coded
        dummies, none for ``adjust``), in original units (the median for the exponential
        shape)."""
        k = self.spec.trend_terms
        m = self.fit.X[:, :k] @ self.fit.beta[:k]
        return np.exp(m) if self.spec.log_scale else m

    def forecast(self, positions) -> PointForecasts:
        """Forecasts at ``positions`` with 80% and 95% prediction intervals, original units."""
        positions = np.atleast_1d(np.asarray(positions, dtype=int))
        pred = self.fit.predict(self.design(positions), LEVELS)
        offset = self.seasonal_offset(positions)
        m = pred.mean + offset
        (l80, u80), (l95, u95) = [(lo + offset, hi + offset) for lo, hi in
                                  (pred.bands[0.80], pred.bands[0.95])]
        if self.spec.log_scale:
            var = pred.se_pred ** 2
            return PointForecasts(positions, np.exp(m + var / 2.0), np.exp(m), np.exp(l80),
                                  np.exp(u80), np.exp(l95), np.exp(u95))
        return PointForecasts(positions, m, m.copy(), l80, u80, l95, u95)

    def trend_slope_per_period(self) -> float:
        """Trend slope per period at the centre of the fit, on the model scale."""
        return float(self.fit.beta[1] / self.scale.spread)


def fit_trend(values, positions, spec: TrendSpec, first_season: int = 0,
              what: str = "the trend") -> TrendFit:
    """Fit ``spec`` to ``values`` observed at integer ``positions``.

    ``first_season`` is the calendar season of position 0, so seasonal terms line up with the
    calendar whatever stretch is fitted.
    """
    values = np.asarray(values, dtype=float)
    positions = np.asarray(positions, dtype=int)
    need = spec.minimum_points()
    if len(values) < need:
        raise InputError(f"{what} has {len(values)} points; a {spec.describe()} needs at "
                         f"least {need}")
    y = to_model_scale(values, spec)
    pattern = None
    if spec.seasonality == "adjust":
        pattern = seasonal_pattern(y, positions, first_season, spec.season_length)
        y = y - pattern[season_index(positions, first_season, spec.season_length)]
    scale = TimeScale.for_positions(positions)
    X = design_matrix(positions, spec, scale, first_season)
    try:
        outside = spec.season_length - 1 if pattern is not None else 0
        result = ols.fit(X, y, k_outside=outside)
    except ols.RankDeficient as exc:
        raise InputError(f"{what} cannot be fitted as a {spec.describe()}: {exc}") from None
    return TrendFit(spec, positions, first_season, scale, result, pattern)
