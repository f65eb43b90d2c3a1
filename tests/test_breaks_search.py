"""Break search machinery: segment costs, exact search, PELT, tied-kind scans.

Outside checks: ruptures' own least-squares cost ``CostLinear``, its dynamic programme ``Dynp``,
its ``Pelt`` and ``Binseg`` (reference library), and statsmodels' OLS for the SSR of designs the
scans price without forming them.
"""

import numpy as np
import pytest
import ruptures
import statsmodels.api as sm

from regimetrend.breaks import kinks
from regimetrend.breaks.costs import SegmentCost
from regimetrend.breaks.exact import bic_penalty, exact_search, pelt_search, segmentation_ssr
from regimetrend.breaks.ruptures_cost import TrendCost


def _ols_ssr(X, y):
    return float(sm.OLS(y, X).fit().ssr)


def _trend_design(a, b, degree, season=None, s=1):
    t = np.arange(a, b, dtype=float)
    u = (t - t.mean()) / max((b - a) / 2.0, 1.0)
    cols = [u ** p for p in range(degree + 1)]
    if season is not None:
        cols = cols[1:] + [(season[a:b] == j).astype(float) for j in range(s)]
    return np.column_stack(cols)


def _two_pass_ssr(X, y):
    """Reference SSR by least squares with one refinement pass (numpy lstsq)."""
    r = y.copy()
    for _ in range(2):
        beta, *_ = np.linalg.lstsq(X, r, rcond=None)
        r = r - X @ beta
    return float(r @ r)


@pytest.mark.parametrize("degree", [1, 2])
def test_costs_accurate_on_short_late_segments_of_a_long_series(degree):
    # n = 5000, 12-point segments at the very end: where plain prefix moments fail.
    rng = np.random.default_rng(7)
    n = 5000
    t = np.arange(n)
    y = 50 + 0.3 * t + 2e-4 * t ** 2 + rng.normal(0, 1, n)
    cost = SegmentCost(y, degree, min_size=degree + 2)
    worst = 0.0
    for a in range(n - 60, n - 11):
        b = a + 12
        ref = _two_pass_ssr(_trend_design(a, b, degree), y[a:b])
        worst = max(worst, abs(cost.cost(a, b) - ref) / ref)
    assert worst < 1e-8


def test_costs_with_seasons_per_regime_match_statsmodels_ols():
    # Reference: statsmodels OLS with season indicators on the segment.
    rng = np.random.default_rng(1)
    n, s = 600, 12
    t = np.arange(n)
    season = (t + 3) % s
    y = 10 + 0.05 * t + 3 * np.sin(2 * np.pi * season / s) + rng.normal(0, 1, n)
    for degree in (1, 2):
        cost = SegmentCost(y, degree, season, s)
        for a, b in [(0, 30), (100, 171), (560, 600), (575, 600)]:
            ref = _ols_ssr(_trend_design(a, b, degree, season, s), y[a:b])
            assert cost.cost(a, b) == pytest.approx(ref, rel=1e-9)


def test_costs_equal_ruptures_cost_linear():
    # Reference library: ruptures' CostLinear on the signal [y, 1, t] (and t^2).
    rng = np.random.default_rng(3)
    n = 150
    t = np.arange(n, dtype=float)
    y = np.where(t < 80, 0.2 * t, 16 - 0.1 * (t - 80)) + rng.normal(0, 1, n)
    for degree in (1, 2):
        signal = np.column_stack([y] + [(t / n) ** p for p in range(degree + 1)])
        ref = ruptures.costs.CostLinear().fit(signal)
        ours = SegmentCost(y, degree, min_size=2)
        adapter = TrendCost(degree=degree, min_size=2).fit(y)
        for a, b in [(0, 150), (0, 10), (37, 81), (80, 150), (140, 150), (5, 9)]:
            assert ours.cost(a, b) == pytest.approx(ref.error(a, b), rel=1e-9, abs=1e-9)
            assert adapter.error(a, b) == pytest.approx(ref.error(a, b), rel=1e-9, abs=1e-9)


def test_block_costs_equal_single_costs():
    rng = np.random.default_rng(0)
    y = rng.normal(size=60).cumsum()
    cost = SegmentCost(y, 1, min_size=4)
    block = cost.costs(np.arange(61)[None, :], np.arange(61)[:, None])
    for a, b in [(0, 60), (3, 7), (10, 50)]:
        assert block[b, a] == pytest.approx(cost.cost(a, b), rel=1e-12)
    assert np.isinf(block[5, 3]) and np.isinf(block[3, 5])


def test_exact_search_equals_ruptures_dynp():
    # Reference library: ruptures' Dynp with its built-in linear cost on [y, 1, t].
    rng = np.random.default_rng(11)
    n, h = 90, 6
    t = np.arange(n, dtype=float)
    y = np.select([t < 30, t < 62], [0.3 * t, 12 - 0.2 * (t - 30)], 5 + 0.4 * (t - 62))
    y = y + rng.normal(0, 0.8, n)
    signal = np.column_stack([y, np.ones(n), t])
    algo = ruptures.Dynp(model="linear", min_size=h, jump=1).fit(signal)
    path = exact_search(SegmentCost(y, 1, min_size=h), 3, h)
    for m in (1, 2, 3):
        assert list(path.positions[m]) == algo.predict(n_bkps=m)[:-1]
        assert path.ssr[m] == pytest.approx(segmentation_ssr(SegmentCost(y, 1, min_size=h),
                                                             path.positions[m]), rel=1e-9)


def test_exact_search_is_the_brute_force_minimum():
    rng = np.random.default_rng(5)
    y = rng.normal(size=40).cumsum()
    h = 5
    cost = SegmentCost(y, 2, min_size=h)
    path = exact_search(cost, 2, h)
    best = min((segmentation_ssr(cost, (a, b)), (a, b))
               for a in range(h, 40) for b in range(a + h, 40 - h + 1))
    assert path.positions[2] == best[1]
    assert path.ssr[2] == pytest.approx(best[0], rel=1e-10)


def test_pelt_equals_ruptures_pelt_on_the_same_cost():
    # Reference library: ruptures' Pelt driving our cost through the ruptures adapter.
    rng = np.random.default_rng(2)
    n = 240
    t = np.arange(n)
    y = 0.01 * t + np.where(t >= 90, 3.0, 0.0) + np.where(t >= 190, -0.1 * (t - 190), 0.0)
    y = y + rng.normal(0, 1, n)
    pen = bic_penalty(y, 2)
    ours = pelt_search(SegmentCost(y, 1, min_size=6), pen, 6)
    ref = ruptures.Pelt(custom_cost=TrendCost(min_size=6), min_size=6, jump=1).fit(y)
    assert list(ours) == ref.predict(pen=pen)[:-1]
    assert any(abs(b - 90) <= 2 for b in ours)


def test_binary_segmentation_runs_on_our_cost_like_on_cost_linear():
    # Reference library: ruptures' Binseg with CostLinear versus with our adapter.
    rng = np.random.default_rng(4)
    n = 120
    t = np.arange(n, dtype=float)
    y = np.where(t < 70, 0.1 * t, 7 + 0.5 * (t - 70)) + rng.normal(0, 0.5, n)
    ref = ruptures.Binseg(model="linear", min_size=5, jump=1).fit(
        np.column_stack([y, np.ones(n), t])).predict(n_bkps=2)
    ours = ruptures.Binseg(custom_cost=TrendCost(min_size=5), min_size=5, jump=1).fit(
        y).predict(n_bkps=2)
    assert ours == ref


@pytest.mark.parametrize("kind,degree,seasonal", [("level", 1, False), ("slope", 1, False),
                                                  ("slope", 2, False), ("level", 1, True)])
def test_one_break_scan_equals_statsmodels_ssr_at_every_position(kind, degree, seasonal):
    rng = np.random.default_rng(9)
    n = 84
    t = np.arange(n, dtype=float)
    S = (t % 4 == 1).astype(float) - (t % 4 == 0)
    y = 0.05 * t + np.maximum(0, t - 60) * 0.3 + S + rng.normal(0, 0.5, n)
    Z = np.column_stack([np.ones(n), t / n, (t / n) ** 2, S][: degree + 1] + [S])
    terms = kinks.break_terms(kind, degree, S[:, None] if seasonal else None)
    b, ssr, cand, prof = kinks.best_single(y, Z, terms, 5, n - 5)
    ref = np.array([_ols_ssr(kinks.design_with_breaks(Z, [c], terms), y) for c in cand])
    np.testing.assert_allclose(prof, ref, rtol=1e-9)
    assert b == int(cand[np.argmin(ref)])


@pytest.mark.parametrize("kind,degree", [("level", 1), ("slope", 1), ("slope", 2)])
def test_two_break_grid_is_the_brute_force_minimum(kind, degree):
    rng = np.random.default_rng(13)
    n, h = 60, 5
    t = np.arange(n, dtype=float)
    y = 0.1 * t - np.maximum(0, t - 20) * 0.3 + np.maximum(0, t - 45) * 0.5
    y = y + np.where(t >= 45, 1.0, 0.0) + rng.normal(0, 0.3, n)
    Z = np.column_stack([(t / n) ** p for p in range(degree + 1)])
    terms = kinks.break_terms(kind, degree)
    pair, ssr = kinks.best_pair(y, Z, terms, h)
    brute = min((kinks.ssr_with(y, Z, terms, [a, b]), (a, b))
                for a in range(h, n - 2 * h + 1) for b in range(a + h, n - h + 1))
    assert pair == brute[1]
    assert ssr == pytest.approx(brute[0], rel=1e-9)


def test_refinement_reaches_a_coordinatewise_optimum():
    rng = np.random.default_rng(21)
    n, h = 90, 6
    t = np.arange(n, dtype=float)
    y = (0.2 * t - 0.4 * np.maximum(0, t - 25) + 0.5 * np.maximum(0, t - 50)
         - 0.6 * np.maximum(0, t - 72) + rng.normal(0, 0.3, n))
    Z = np.column_stack([np.ones(n), t / n])
    terms = kinks.break_terms("slope", 1)
    ssr, positions, exact = kinks.tied_search(y, Z, terms, 3, h)
    assert exact == [True, True, True, False]
    assert all(abs(p - q) <= 2 for p, q in zip(positions[3], (25, 50, 72)))
    assert np.all(np.diff(ssr) <= 1e-9)  # more breaks never fit worse


@pytest.mark.parametrize("kind", ["level", "slope"])
def test_two_break_grid_with_52_season_columns_by_regime_equals_statsmodels(kind):
    # statsmodels' co2 (weekly Mauna Loa CO2) from 1990, 170 weeks, 52-week season
    # indicators changing with the regime: the grid's SSR at the pair it picks, and at every
    # pair, equals statsmodels OLS on the explicit design to 1e-10 (the grid reuses its power
    # sums across blocks of pairs and skips products of different season columns).
    frame = sm.datasets.co2.load_pandas().data.loc["1990":].interpolate().iloc[:170]
    y = frame["co2"].to_numpy(float)
    n, h = y.size, 53
    t = np.arange(n, dtype=float)
    season = np.eye(52)[np.arange(n) % 52]
    seasonal = season[:, 1:] - season[:, :1]  # effect-coded, as the problem builds them
    Z = np.column_stack([np.ones(n), t / n, seasonal])
    terms = kinks.break_terms(kind, 1, seasonal)
    pair, ssr = kinks.best_pair(y, Z, terms, h)
    pairs = [(a, b) for a in range(h, n - 2 * h + 1) for b in range(a + h, n - h + 1)]
    ref = {p: _ols_ssr(kinks.design_with_breaks(Z, list(p), terms), y) for p in pairs}
    assert pair == min(ref, key=ref.get)
    assert ssr == pytest.approx(ref[pair], rel=1e-10)
