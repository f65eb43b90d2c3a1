"""The stage functions as analysts call them from Python.

Each takes what an analyst holds: a ``Series``, a pandas Series with a DatetimeIndex or
PeriodIndex, or a DataFrame with a date and a value column (read by intake, with its checks);
anything else is an ``InputError`` saying what to give. Choices come as a ``Settings`` and/or
its flat keywords, with the same defaults everywhere (``settings.RULES``).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from .design import TrendSpec
from .errors import InputError, about
from .settings import Settings

if TYPE_CHECKING:
    from .analysis import Analysis
    from .breaks.result import BreakSet
    from .evaluate.result import Evaluation
    from .forecast import Forecast
    from .growth import GrowthTable


def analyze(series, settings: Settings | None = None, **choices: Any) -> Analysis:
    """The whole analysis of one series (see ``regimetrend.analysis.analyze``)."""
    from .analysis import analyze as _analyze

    return _analyze(series, settings, **choices)


def detect_breaks(series, settings: Settings | None = None, **choices: Any) -> BreakSet:
    """Find, test and date breaks in the trend (see ``regimetrend.breaks.detect``)."""
    from .breaks.detect import detect_breaks as _detect

    return _detect(series, settings, **choices)


def compare(series, settings: Settings | None = None, **options: Any) -> Evaluation:
    """Rolling-origin comparison against the global trend (see ``regimetrend.evaluate``)."""
    from .evaluate import compare as _compare

    return _compare(series, settings, **options)


def trend_forecast(series, model: TrendSpec | Settings | None = None, horizon: int | None = None,
                   **choices: Any) -> Forecast:
    """One trend over all the history, forecast ``horizon`` periods ahead with intervals.

    ``model`` is a ``TrendSpec`` or a ``Settings`` (or neither: keyword ``choices`` such as
    ``shape="exponential"``); ``horizon`` defaults to one seasonal cycle (at least 4) and may be
    at most the length of the series."""
    from .forecast import trend_forecast as _forecast
    from .intake import as_series

    if horizon is not None:
        choices = dict(choices, horizon=horizon)
    if isinstance(model, TrendSpec) and any(k in choices for k in ("shape", "seasonality",
                                                                     "season_length")):
        raise InputError(f"{about('model')}: give the trend either as a TrendSpec or as "
                         f"shape/seasonality/season_length, not both")
    settings = Settings.coerce(model if isinstance(model, Settings) else None, choices,
                               ("model", "evaluation"), "trend_forecast")
    if model is not None and not isinstance(model, (TrendSpec, Settings)):
        raise InputError(f"{about('model')}: expected a TrendSpec or a Settings, "
                         f"got {type(model).__name__}")
    series = as_series(series)
    spec = model if isinstance(model, TrendSpec) else settings.spec_for(series)
    return _forecast(series, spec, settings.horizon_for(series))


def growth_table(source, breaks=None, settings: Settings | None = None, *,
                 kind: str | None = None, **choices: Any) -> GrowthTable:
    """Growth by regime with 95% intervals and the Wald test of each change.

    ``source`` is an ``Analysis`` (its own table, unless ``breaks`` or choices ask for another)
    or a series as the other functions take it. ``breaks`` is a ``BreakSet`` or a list of break
    dates (any form intake reads) or positions, each the first period of a new regime.
    ``kind`` says what changes at each break: ``level``, ``slope`` or ``both`` (default: the
    BreakSet's own, else ``both``). The trend is set by the model settings (``shape``,
    ``seasonality``, ``season_length``), e.g.
    ``growth_table(sales, breaks=["2020-04"], shape="exponential")``."""
    from .analysis import Analysis
    from .growth import growth_table as _growth
    from .intake import as_series

    if isinstance(source, Analysis):
        if breaks is None and settings is None and kind is None and not choices:
            return source.growth
        series, spec = source.series, source.spec
        if settings is not None or choices:
            spec = Settings.coerce(settings, choices, ("model",), "growth_table").spec_for(series)
        return _growth(series, spec, source.breaks if breaks is None else
                       _break_positions(series, breaks), kind=kind)
    settings = Settings.coerce(settings, choices, ("model",), "growth_table")
    series = as_series(source)
    return _growth(series, settings.spec_for(series), _break_positions(series, breaks),
                   kind=kind)


def _break_positions(series, breaks):
    """A BreakSet as it is; a list of dates or positions as positions in ``series``."""
    from .breaks.result import BreakSet
    from .intake import parse_date

    if breaks is None or isinstance(breaks, BreakSet):
        return breaks
    if isinstance(breaks, (str, int)) or not hasattr(breaks, "__iter__"):
        breaks = [breaks]
    positions = []
    for item in breaks:
        if isinstance(item, bool):
            raise InputError(f"{about('breaks')}: {item!r} is not a date or a position")
        if isinstance(item, (int,)) or type(item).__module__ == "numpy" and \
                hasattr(item, "dtype") and item.dtype.kind in "iu":
            p = int(item)
        else:
            day = parse_date(item)
            if day is None:
                raise InputError(f"{about('breaks')}: {item!r} is not a date or a position")
            p = int((series.starts <= day).sum()) - 1
            if p < 0 or day >= series.start_of(series.n):
                raise InputError(f"{about('breaks')}: {item} is outside the series "
                                 f"({series.label(0)} to {series.label(series.n - 1)})")
        if not 0 < p < series.n:
            raise InputError(f"{about('breaks')}: a break at position {p} leaves no regime "
                             f"before or after it (positions 1 to {series.n - 1})")
        positions.append(p)
    return sorted(set(positions))
