"""Trend design: shapes, seasonal terms, the scaled time index and the modelling scale.

Builds design matrices; never fits. Time is the integer position of a period in the series
(0 for the first period); the trend columns use a scaled index u = (position - center) / spread
so that long daily series and quadratic terms stay well conditioned. Coefficients reported to
people are converted back to "per period" units by the callers.

Shapes:
- ``linear``       y = a + b t
- ``exponential``  ln y = a + b t   (fitted on logs; forecasts are back-transformed)
- ``quadratic``    y = a + b t + c t^2

Seasonality:
- ``none``
- ``dummies``  seasonal indicator terms in effect coding (they sum to zero over a cycle, so the
  intercept is the average level); multiplicative under the exponential shape because the
  model scale is logs.
- ``adjust``   a seasonal pattern is estimated first (classical decomposition on the model scale)
  and removed; the trend is fitted to the adjusted series and the pattern is put back on forecasts.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import InputError, about

SHAPES = ("linear", "exponential", "quadratic")
SEASONALITIES = ("none", "dummies", "adjust")


@dataclass(frozen=True)
class TrendSpec:
    """What trend to fit: its shape, its seasonality and the season length."""

    shape: str = "linear"
    seasonality: str = "none"
    season_length: int = 1

    def __post_init__(self):
        if self.shape not in SHAPES:
            raise InputError(f"{about('shape')}: {self.shape!r} is not one of {', '.join(SHAPES)}")
        if self.seasonality not in SEASONALITIES:
            raise InputError(f"{about('seasonality')}: {self.seasonality!r} is not one of "
                             f"{', '.join(SEASONALITIES)}")
        if int(self.season_length) < 1:
            raise InputError(f"{about('season_length')}: must be a whole number of at least 1")
        if self.seasonality != "none" and self.season_length < 2:
            # No seasons to model (annual data, or the user said season length 1).
            object.__setattr__(self, "seasonality", "none")

    @property
    def log_scale(self) -> bool:
        return self.shape == "exponential"

    @property
    def trend_terms(self) -> int:
        """Number of trend coefficients: 2 (linear, exponential) or 3 (quadratic)."""
        return 3 if self.shape == "quadratic" else 2

    @property
    def seasonal_terms(self) -> int:
        return self.season_length - 1 if self.seasonality == "dummies" else 0

    @property
    def n_coefficients(self) -> int:
        return self.trend_terms + self.seasonal_terms

    def minimum_points(self) -> int:
        """Fewest points that leave at least two residual degrees of freedom (and, for
        ``adjust``, two full seasonal cycles)."""
        need = self.n_coefficients + 2
        if self.seasonality == "adjust":
            need = max(need, 2 * self.season_length)
        return need

    def describe(self) -> str:
        if self.seasonality == "none":
            return f"{self.shape} trend"
        word = "seasonal dummies" if self.seasonality == "dummies" else "seasonal adjustment"
        return f"{self.shape} trend with {word} (season length {self.season_length})"

    def to_dict(self) -> dict:
        return {"shape": self.shape, "seasonality": self.seasonality,
                "season_length": self.season_length}


@dataclass(frozen=True)
class TimeScale:
    """u = (position - center) / spread; chosen from the fitting positions."""

    center: float
    spread: float

    @classmethod
    def for_positions(cls, positions: np.ndarray) -> "TimeScale":
        positions = np.asarray(positions, dtype=float)
        lo, hi = float(positions.min()), float(positions.max())
        return cls(center=(lo + hi) / 2.0, spread=max((hi - lo) / 2.0, 1.0))

    @classmethod
    def for_range(cls, start: int, stop: int) -> "TimeScale":
        """``for_positions(np.arange(start, stop))`` without building the positions."""
        if stop <= start:
            raise ValueError("a time scale needs at least one position")
        lo, hi = float(start), float(stop - 1)
        return cls(center=(lo + hi) / 2.0, spread=max((hi - lo) / 2.0, 1.0))

    def u(self, positions) -> np.ndarray:
        return (np.asarray(positions, dtype=float) - self.center) / self.spread


def trend_columns(positions, shape: str, scale: TimeScale) -> np.ndarray:
    """Columns [1, u] or [1, u, u^2] on the scaled time index."""
    u = scale.u(positions)
    cols = [np.ones_like(u), u]
    if shape == "quadratic":
        cols.append(u * u)
    return np.column_stack(cols)


def season_index(positions, first_season: int, season_length: int) -> np.ndarray:
    """Season (0..s-1) of each position, counted from the calendar season of position 0."""
    return (np.asarray(positions, dtype=int) + int(first_season)) % int(season_length)


def seasonal_columns(positions, first_season: int, season_length: int) -> np.ndarray:
    """Effect-coded seasonal indicators: column j is +1 in season j+1, -1 in season 0, else 0."""
    s = int(season_length)
    idx = season_index(positions, first_season, s)
    cols = np.zeros((len(idx), s - 1))
    for j in range(1, s):
        cols[idx == j, j - 1] = 1.0
    cols[idx == 0, :] = -1.0
    return cols


def seasonal_effects(coefs: np.ndarray) -> np.ndarray:
    """All s seasonal effects from the s-1 effect-coded coefficients (they sum to zero)."""
    coefs = np.asarray(coefs, dtype=float)
    return np.concatenate([[-coefs.sum()], coefs])


def design_matrix(positions, spec: TrendSpec, scale: TimeScale, first_season: int) -> np.ndarray:
    """Trend columns, then seasonal dummies when the spec asks for them."""
    X = trend_columns(positions, spec.shape, scale)
    if spec.seasonality == "dummies":
        X = np.hstack([X, seasonal_columns(positions, first_season, spec.season_length)])
    return X


def to_model_scale(values: np.ndarray, spec: TrendSpec) -> np.ndarray:
    """Logs for the exponential shape, the values themselves otherwise."""
    values = np.asarray(values, dtype=float)
    if spec.log_scale:
        if np.any(values <= 0):
            first = int(np.argmax(values <= 0))
            raise InputError(f"the exponential shape needs positive values; position {first + 1} "
                             f"of the series is {values[first]:g}")
        return np.log(values)
    return values


def seasonal_pattern(y_model: np.ndarray, positions, first_season: int,
                     season_length: int) -> np.ndarray:
    """Seasonal effects (length s, summing to zero) on the model scale by classical
    decomposition: a centred moving average of one cycle removes the trend, and the
    detrended values are averaged by season (statsmodels' ``seasonal_decompose``)."""
    from statsmodels.tsa.seasonal import seasonal_decompose

    s = int(season_length)
    y_model = np.asarray(y_model, dtype=float)
    if len(y_model) < 2 * s:
        raise InputError(f"seasonal adjustment needs at least two full cycles ({2 * s} points); "
                         f"the series has {len(y_model)}")
    dec = seasonal_decompose(y_model, model="additive", period=s, two_sided=True)
    idx = season_index(positions, first_season, s)
    pattern = np.zeros(s)
    for j in range(s):
        pattern[j] = dec.seasonal[idx == j][0]
    return pattern - pattern.mean()
