"""The strategy table: every forecasting strategy by name, with its forecaster and its words.

A strategy is one ``StrategyKind``: a forecaster that takes the fits made on the history known
at an origin (``regimes.OriginFits``: its values, the breaks found from that history, cached
single and joint trend fits) and returns forecasts with 80% and 95% intervals in original units;
the plain words for one of its candidates; and a one-sentence summary. The rolling origin
(``evaluate``) scores every standard strategy with every shape, the final forecast
(``regimes.strategy_forecast``) refits the recommended one, and the CLI and the report take
their words from here. ``register_strategy`` adds one; nothing else needs to change.

The five built-in strategies are registered by ``regimes`` when it is imported.
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
    (only these count for the recommendation's large-gain rule). ``every_shape``: offered with
    every shape the comparison tries, else once with the analyst's shape. ``mixed_shapes``: its
    last regime may take another shape (``Strategy.last_shape``). ``uses_windows``: it
    averages estimation windows and carries the comparison's window rule. ``from_breaks``: it
    fits from the k-th last break (``Strategy.from_break``). ``standard``: the comparison
    offers it."""

    name: str
    forecast: Callable
    words: Callable
    summary: str
    single_starts: Callable | None = None
    regime_aware: bool = True
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
