"""Long series: ruptures' bottom-up segmentation, polished exactly, in PELT's place.

Reference: our PELT (itself checked step for step against ruptures' ``Pelt`` in
tests/test_breaks_search.py) minimises the same penalised objective globally; ruptures'
``BottomUp`` (a reference library) is the unpolished start. Data: invented series with planted
slope changes and a level shift (invented, not a check value in themselves).
"""

import numpy as np
import ruptures

from regimetrend.breaks import detect_breaks, exact, long_search
from regimetrend.breaks.costs import SegmentCost
from regimetrend.breaks.ruptures_cost import TrendCost
from regimetrend.breaks.search import BOTTOM_UP
from regimetrend.series import Frequency, Series


def planted(n, seed=3):
    rng = np.random.default_rng(seed)
    t = np.arange(n, dtype=float)
    b1, b2, b3 = int(0.35 * n), int(0.6 * n), int(0.85 * n)
    return (1000 + 0.01 * t + 0.02 * np.clip(t - b1, 0, None) - 0.025 * np.clip(t - b2, 0, None)
            + 40 * (t >= b3) + rng.normal(0, 5, n))


def objective(cost, pen, positions):
    return exact.segmentation_ssr(cost, positions) + pen * len(positions)


def test_polished_bottom_up_reaches_pelts_optimum_and_improves_ruptures_start():
    for n, seed in ((3000, 3), (5000, 8)):
        y = planted(n, seed)
        cost = SegmentCost(y, 1, min_size=6)
        pen = exact.bic_penalty(y, 2)
        pelt = exact.pelt_search(cost, pen, 6)
        ours = long_search.bottom_up_search(cost, pen, 6)
        assert ours == pelt
        start = ruptures.BottomUp(custom_cost=TrendCost(1, min_size=6), min_size=6,
                                  jump=1).fit(y).predict(pen=pen)[:-1]
        assert objective(cost, pen, ours) <= objective(cost, pen, start)


def test_pair_bracketing_a_level_shift_becomes_one_break():
    y = planted(4000, 5)
    cost = SegmentCost(y, 1, min_size=6)
    pen = exact.bic_penalty(y, 2)
    # two breaks a few points either side of the level shift at 3400: one break does better
    polished = long_search.bottom_up_search(cost, pen, 6)
    assert 3400 in polished and not any(abs(p - 3400) < 12 and p != 3400 for p in polished)


def test_detect_breaks_uses_it_for_long_series_and_says_so(monkeypatch):
    n = 5000
    series = Series("planted (invented)", np.datetime64("1900-01-01") + np.arange(n),
                    planted(n), Frequency("day"))
    pelt = detect_breaks(series, seasonality="none", kind="both", method="pelt")
    monkeypatch.setattr(long_search, "BOTTOM_UP_LENGTH", n)
    polished = detect_breaks(series, seasonality="none", kind="both")
    assert polished.method == BOTTOM_UP and pelt.method == "pelt"
    assert polished.positions == pelt.positions
    assert any("bottom-up" in note for note in polished.notes)


def test_halving_partition_is_ruptures_own_starting_partition():
    # Reference: ruptures' BottomUp._grow_tree (per-position loop) on the same cost.
    rng = np.random.default_rng(0)
    for n, h in ((100, 3), (101, 7), (1000, 7), (12345, 11), (777, 50)):
        y = rng.normal(size=n) + 0.01 * np.arange(n)
        cost = SegmentCost(y, 1, min_size=h)
        theirs = ruptures.BottomUp(custom_cost=long_search.GivenCost(cost, h), min_size=h,
                                   jump=1).fit(np.zeros(n))
        ours = long_search.HalvingBottomUp(custom_cost=long_search.GivenCost(cost, h),
                                           min_size=h, jump=1).fit(np.zeros(n))
        assert [(x.start, x.end, x.val) for x in ours.leaves] == \
            [(x.start, x.end, x.val) for x in theirs.leaves]
        pen = exact.bic_penalty(y, 2)
        assert ours.predict(pen=pen) == theirs.predict(pen=pen)


def test_scalar_segment_cost_is_the_vectorised_cost_to_the_last_bit():
    rng = np.random.default_rng(5)
    for n, degree in ((1000, 0), (5000, 1), (20000, 2)):
        y = 1e3 + 0.1 * np.arange(n) + rng.normal(0, 3, n)
        cost = SegmentCost(y, degree, min_size=5)
        a = rng.integers(-2, n, 3000)
        b = a + rng.integers(0, n // 3, 3000)
        one_by_one = np.array([cost.cost(s, e) for s, e in zip(a, b)])
        assert np.array_equal(one_by_one, cost.costs(a, b))


def test_polished_searches_from_every_ruptures_start_reach_pelts_optimum():
    y = planted(4000, 11)
    cost = SegmentCost(y, 1, min_size=6)
    pen = exact.bic_penalty(y, 2)
    pelt = exact.pelt_search(cost, pen, 6)
    for start in long_search.STARTS:
        got = long_search.greedy_search(cost, pen, 6, start)
        assert objective(cost, pen, got) <= objective(cost, pen, pelt) * (1 + 1e-3), start
