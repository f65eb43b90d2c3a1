"""Regimes no longer than one season beside a shared seasonal pattern.

With seasonal dummies shared by all regimes and every regime exactly one season long (48
monthly points, breaks at 12, 24 and 36), the regime trends form a sawtooth that repeats every
season, which the dummies also fit: the joint design has dependent columns. Outside check: the
rank of that design by ``numpy.linalg.matrix_rank`` (reference library, SVD) is below its column
count, and one break fewer gives full rank. The series itself is invented (planted breaks).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from regimetrend.analysis import analyze
from regimetrend.breaks.problem import build_problem
from regimetrend.errors import InputError
from regimetrend.intake import load_series
from regimetrend.portfolio import run_portfolio
from regimetrend.regimes import OriginFits, PiecewiseFit
from regimetrend.settings import Settings


def planted_monthly(n=48, seed=1) -> pd.DataFrame:
    """Invented monthly series: seasonal, slope and level changes at 12, 24 and 36."""
    rng = np.random.default_rng(seed)
    t = np.arange(n)
    y = 100 + 0.5 * t + 3 * np.sin(2 * np.pi * t / 12) + rng.normal(0, 0.5, n)
    for b, slope in ((12, 1.0), (24, -1.5), (36, 2.0)):
        y[b:] += slope * (t[b:] - b) + 5
    dates = pd.date_range("2018-01-01", periods=n, freq="MS").strftime("%Y-%m-%d")
    return pd.DataFrame({"date": dates, "value": np.round(y, 2)})


def problem_for(n):
    series = load_series(planted_monthly(n))
    spec = Settings().spec_for(series)
    return build_problem(series, spec, False, None)


def test_numpy_rank_confirms_the_one_season_regimes_are_confounded():
    problem = problem_for(48)
    assert problem.h == 12 and problem.seasonal is not None
    three = problem.design("both", (12, 24, 36))
    two = problem.design("both", (12, 24))
    assert np.linalg.matrix_rank(three) < three.shape[1]  # numpy: dependent columns
    assert np.linalg.matrix_rank(two) == two.shape[1]
    assert problem.most_breaks() == 2
    # one more point makes the last regime longer than a season: three breaks fit again
    longer = problem_for(49)
    four_regimes = longer.design("both", (12, 24, 36))
    assert np.linalg.matrix_rank(four_regimes) == four_regimes.shape[1]
    assert longer.most_breaks() == 3


def test_48_monthly_points_are_analysed_with_default_settings():
    series = load_series(planted_monthly(48))
    analysis = analyze(series, Settings())
    assert len(analysis.breaks.positions) <= 2
    assert analysis.verdict.to_dict()["model"]["shape"] in ("linear", "quadratic", "exponential")


def test_asking_for_the_confounded_break_count_is_refused_with_the_reason():
    series = load_series(planted_monthly(48))
    with pytest.raises(InputError, match=r"max_breaks.*exactly 12 periods long.*12-period "
                                         r"seasonal pattern"):
        analyze(series, Settings(max_breaks=3))


def test_an_origin_with_one_season_regimes_drops_the_oldest_break():
    values = planted_monthly(48)["value"].to_numpy()
    short = OriginFits(values[:24], 0, "dummies", 12, breaks=(12,))
    fit = short.piecewise("separate", "linear")  # two 12-period regimes: confounded
    assert not isinstance(fit, PiecewiseFit) and fit is short.trend("linear")
    longer = OriginFits(values[:36], 0, "dummies", 12, breaks=(12,))
    kept = longer.piecewise("separate", "linear")  # the second regime is 24 periods long
    assert isinstance(kept, PiecewiseFit) and kept.regime_design.breaks == (12,)


def test_the_series_gets_an_ok_row_in_a_portfolio(tmp_path):
    frame = planted_monthly(48)
    other = planted_monthly(60, seed=2)
    long = pd.concat([frame.assign(id="four years"), other.assign(id="five years")])
    src = tmp_path / "long.csv"
    long.to_csv(src, index=False)
    result = run_portfolio(src, tmp_path / "out", id_columns=["id"], workers=1)
    rows = pd.read_csv(tmp_path / "out" / "summary.csv").set_index("id")
    assert result.failed == 0 and set(rows["status"]) == {"ok"}
    assert rows.loc["four years", "n"] == 48
