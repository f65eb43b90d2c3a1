"""Resolving the analyst's model choices against a series (season length, 'auto' seasonality)."""

from __future__ import annotations

from dataclasses import asdict, dataclass

from .design import TrendSpec
from .errors import InputError


def resolve_spec(series, shape: str = "linear", seasonality: str = "auto",
                 season_length: int | None = None) -> TrendSpec:
    """A TrendSpec for ``series``: the season length defaults to the calendar's (12 monthly,
    4 quarterly, 52 weekly, 7 daily, none for annual or multi-unit calendars); ``auto``
    seasonality means dummies when the calendar has seasons and none otherwise."""
    if shape == "auto":  # the verdict chooses the shape; the base spec is the linear one
        shape = "linear"
    s = series.frequency.season_length if season_length is None else int(season_length)
    if seasonality == "auto":
        seasonality = "dummies" if s > 1 else "none"
    elif seasonality != "none" and s < 2:
        raise InputError(f"option --seasonality: a {series.frequency.name} series has no "
                         f"seasonal cycle; use none, or give --season-length")
    spec = TrendSpec(shape=shape, seasonality=seasonality, season_length=s)
    if spec.log_scale:
        from .intake import require_positive

        require_positive(series, "option --shape: the exponential shape (fitted on logs)")
    return spec


@dataclass(frozen=True)
class Settings:
    """Every choice an analysis depends on, in one frozen value (so results are reproducible).

    ``seasonality='auto'`` and ``season_length=None`` are resolved against the series by
    ``resolve_spec``. ``horizon=None`` means the calendar's default horizon (``evaluate.rolling.default_horizon``).
    """

    shape: str = "auto"  # auto: the verdict chooses the shape (regimetrend.verdict)
    seasonality: str = "auto"
    season_length: int | None = None
    kind: str = "auto"
    max_breaks: int | None = None  # None: up to 3, as many as the series can hold
    trim: float | int | None = None
    criterion: str = "sequential"
    events: tuple[str, ...] = ()
    seasonal_by_regime: bool = False
    serial_correlation: str = "allow"
    horizon: int | None = None
    first_origin: int | None = None
    step: int = 1
    reuse_breaks: bool = False

    def spec_for(self, series) -> TrendSpec:
        return resolve_spec(series, self.shape, self.seasonality, self.season_length)

    def horizon_for(self, series) -> int:
        from .evaluate.rolling import default_horizon

        return self.horizon or default_horizon(series.n, series.frequency.unit,
                                               series.frequency.step)

    def to_dict(self) -> dict:
        return {k: (list(v) if isinstance(v, tuple) else v) for k, v in asdict(self).items()}
