"""The strategy table: every forecasting strategy by name, with its forecaster and its words.

A strategy is one ``StrategyKind``: a forecaster that takes the fits made on the history known
at an origin (``regimes.OriginFits``: its values, the breaks found from that history, cached
single and joint trend fits) and returns forecasts with 80% and 95% intervals in original units;
the plain words for one of its candidates; and a one-sentence summary. The rolling origin
(``evaluate``) scores every standard strategy with every shape, the final forecast
(``regimes.strategy_forecast``) refits the recommended one, and the CLI and the report take
their words from here. ``register_strategy`` adds one; nothing else needs to change.

The five built-in strategies are registered at the end of this module.
"""

from __future__ import annotations

from dataclasses import dataclass
from collections.abc import Callable

from .errors import InputError


@dataclass(frozen=True)
class StrategyKind:
    """One strategy of the table.

    ``forecast(fits, strategy, horizon)`` -> ``trendfit.PointForecasts`` for the ``horizon``
    periods after ``fits.origin``; ``words(strategy)`` -> a plain description of one candidate
    (its shape, last-regime shape and start are on ``strategy``); ``summary`` says what the
    strategy does in one sentence. ``single_starts(fits, strategy)`` optionally names the
    starts of the single trends it forecasts from (they are then fitted in batches, and a single
    start is the first period the final forecast uses). ``regime_aware``: it uses the breaks
    (only these count for the recommendation's large-gain rule). ``reads_breaks``: its
    forecasts depend on the breaks known at an origin (those of a strategy that does not are
    the same in every evaluation on the same origins, so a later evaluation borrows them).
    ``every_shape``: offered with every shape the comparison tries, else once with the
    analyst's shape. ``mixed_shapes``: its last regime may take another shape
    (``Strategy.last_shape``). ``uses_windows``: it averages estimation windows and carries the
    comparison's window rule. ``from_breaks``: it fits from the k-th last break
    (``Strategy.from_break``). ``standard``: the comparison offers it."""

    name: str
    forecast: Callable
    words: Callable
    summary: str
    single_starts: Callable | None = None
    regime_aware: bool = True
    reads_breaks: bool = True
    every_shape: bool = True
    mixed_shapes: bool = False
    uses_windows: bool = False
    from_breaks: bool = False
    standard: bool = True


_TABLE: dict[str, StrategyKind] = {}


def register_strategy(kind: StrategyKind, replace: bool = False) -> StrategyKind:
    """Add ``kind`` to the table (``replace`` to overwrite one of the same name)."""
    if not kind.name or kind.name != kind.name.strip():
        raise ValueError(f"strategy name {kind.name!r} must be a plain word")
    if kind.name in _TABLE and not replace:
        raise ValueError(f"strategy {kind.name!r} is already registered")
    _TABLE[kind.name] = kind
    return kind


def unregister_strategy(name: str) -> None:
    """Remove a strategy from the table (tests that register toy strategies use it)."""
    _TABLE.pop(name, None)


def strategy_kind(name: str) -> StrategyKind:
    """The table entry of ``name``; an ``InputError`` naming the known ones otherwise."""
    try:
        return _TABLE[name]
    except KeyError:
        raise InputError(f"strategy {name!r} is not one of {', '.join(_TABLE)}") from None


def strategy_names() -> tuple[str, ...]:
    """Every registered strategy, in the order they were registered."""
    return tuple(_TABLE)


def strategy_kinds() -> tuple[StrategyKind, ...]:
    return tuple(_TABLE.values())


# ---------------------------------------------------------------------------------------------
# the built-in strategies (their forecasters use the cached fits of ``regimes.OriginFits``)


def _forecast_global(fits, strategy, horizon: int):
    return fits.trend_forecast(strategy.shape, 0, fits.positions_after(horizon))


def _forecast_truncated(fits, strategy, horizon: int):
    return fits.trend_forecast(strategy.shape, fits.truncated_start(strategy),
                               fits.positions_after(horizon))


def _forecast_separate(fits, strategy, horizon: int):
    return fits.joint_forecast("separate", strategy.shape, strategy.last_shape, horizon)


def _forecast_continuous(fits, strategy, horizon: int):
    return fits.joint_forecast("continuous", strategy.shape, None, horizon)


def _forecast_window_average(fits, strategy, horizon: int):
    return fits.window_average(strategy.shape, fits.positions_after(horizon))


def _start_words(strategy) -> str:
    """Where a truncated fit starts, in words: a date, an event, a break."""
    if strategy.start is not None:
        label = str(strategy.start_label or strategy.start)
        return label if label[:1].isdigit() else f"the {label}"
    k = strategy.from_break
    return "the last break" if k == 1 else f"the break {k} before the end"


def _separate_words(st) -> str:
    if st.last_shape:
        return (f"separate trends per regime, {st.shape} before the last break and "
                f"{st.last_shape} after it, forecast from the last regime")
    return f"separate {st.shape} trends per regime, forecast from the last regime"


BUILT_IN = (
    StrategyKind("global", _forecast_global,
                 lambda st: f"one {st.shape} trend over all history",
                 "one trend over all history (the reference every other candidate is measured "
                 "against).", single_starts=lambda fits, st: (0,), regime_aware=False,
                 reads_breaks=False),
    StrategyKind("separate", _forecast_separate, _separate_words,
                 "one trend per regime, fitted jointly with shared seasonal terms, forecast "
                 "from the last regime.", mixed_shapes=True),
    StrategyKind("truncated", _forecast_truncated,
                 lambda st: f"one {st.shape} trend fitted only on the history from "
                            f"{_start_words(st)}",
                 "the trend fitted only on the history from a chosen start (the last break, "
                 "an earlier one, an event or a fixed date).",
                 single_starts=lambda fits, st: (fits.truncated_start(st),), from_breaks=True),
    StrategyKind("continuous", _forecast_continuous,
                 lambda st: f"a {st.shape} trend joined at the breaks, forecast from its last "
                            f"piece",
                 "a piecewise trend joined at the breaks (it bends there, without a jump)."),
    StrategyKind("window-average", _forecast_window_average,
                 lambda st: f"the average of {st.shape} trend forecasts from several "
                            f"estimation-window starts",
                 "the average of forecasts from several estimation windows, a hedge when the "
                 "break date is uncertain.",
                 single_starts=lambda fits, st: fits.window_starts_for(st.shape),
                 uses_windows=True, reads_breaks=False),
)
for _kind in BUILT_IN:
    if _kind.name not in strategy_names():
        register_strategy(_kind)
