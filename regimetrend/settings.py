"""Resolving the analyst's model choices against a series (season length, 'auto' seasonality)."""

from __future__ import annotations

from .design import TrendSpec
from .errors import InputError


def resolve_spec(series, shape: str = "linear", seasonality: str = "auto",
                 season_length: int | None = None) -> TrendSpec:
    """A TrendSpec for ``series``: the season length defaults to the calendar's (12 monthly,
    4 quarterly, 52 weekly, 7 daily, none for annual or multi-unit calendars); ``auto``
    seasonality means dummies when the calendar has seasons and none otherwise."""
    s = series.frequency.season_length if season_length is None else int(season_length)
    if seasonality == "auto":
        seasonality = "dummies" if s > 1 else "none"
    elif seasonality != "none" and s < 2:
        raise InputError(f"option --seasonality: a {series.frequency.name} series has no "
                         f"seasonal cycle; use none, or give --season-length")
    return TrendSpec(shape=shape, seasonality=seasonality, season_length=s)
