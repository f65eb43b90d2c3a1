"""Benchmark: the whole rolling-origin comparison against a straightforward baseline.

Baseline (measured in the same run): at every origin, ruptures' exact dynamic programming
(``Dynp``) with its built-in least-squares cost (``model="linear"``) re-detects the breaks, and a
fresh statsmodels OLS fit (``get_prediction().summary_frame``) is made for every candidate,
including every window of the window average and every start of the history sweep.

Common configuration, which both can express: a 120-point monthly series (invented: monthly
tickets of an imaginary cable-car line whose growth changed), 24 origins, horizons 1..12, every
strategy with every shape, seasonal dummies, break search by exact dynamic programming with
kind ``both`` and the seasonal terms changing at each break (each regime has its own trend and
season means, which is exactly ruptures' linear cost on the columns [t, month indicators]),
number of breaks by the break search's own criterion.

Prints: the largest relative difference of every metric of every candidate (goal <= 1e-8),
both run times and their ratio (goal: ours at least 20 times faster), and the time of the
whole ``compare`` at n = 120, 500 and 2,000 with default settings, with the benchmark's
break settings, and with the full-sample breaks reused.

BLAS threads are pinned to one: these are thousands of tiny least-squares problems, where
OpenBLAS threads only add overhead (and thrash on a shared machine). Run:
    /work/venv/bin/python benchmarks/bench_compare.py
"""

from __future__ import annotations

import os

os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
os.environ.setdefault("OMP_NUM_THREADS", "1")

import math  # noqa: E402
import time  # noqa: E402

import numpy as np  # noqa: E402

from regimetrend.evaluate import compare  # noqa: E402
from regimetrend.regimes import TERMS, usable_breaks  # noqa: E402
from regimetrend.design import TrendSpec  # noqa: E402
from regimetrend.series import Frequency, Series  # noqa: E402

HORIZON = 12
OUR_REPEATS, BASELINE_REPEATS = 5, 2  # best of several runs: the machine may be shared
ORIGINS = 24
MAX_BREAKS = 2
METRICS = ("me", "mae", "rmse", "mape", "mase", "coverage80", "coverage95", "interval_score80",
           "interval_score95")


def invented_series(n: int, seed: int = 11) -> Series:
    """Imaginary cable-car tickets: steady growth, then faster growth from 60% of the way."""
    rng = np.random.default_rng(seed)
    t = np.arange(n)
    b = int(0.6 * n)
    trend = 400 + 1.5 * t + np.where(t >= b, 20 + 4.0 * (t - b), 0.0)
    season = 40 * np.sin(2 * np.pi * t / 12) + 15 * np.cos(4 * np.pi * t / 12)
    y = trend + season + rng.normal(0, 12, n)
    starts = (np.datetime64("2000-01") + np.arange(n)).astype("datetime64[D]")
    return Series("cable-car tickets (invented)", starts, y, Frequency("month"))


# -- baseline --------------------------------------------------------------------------------

def month_dummies(t, first_season=0):
    m = (np.asarray(t, dtype=int) + first_season) % 12
    return np.column_stack([(m == j).astype(float) for j in range(1, 12)])


def poly(t, shape, center):
    c = np.asarray(t, dtype=float) - center
    cols = [np.ones_like(c), c]
    if shape == "quadratic":
        cols.append(c * c)
    return cols


def sm_forecast(X, y, Xn, log):
    """statsmodels OLS fit and forecast with 80% and 95% intervals, in original units."""
    import statsmodels.api as sm

    res = sm.OLS(y, X).fit()
    out = {}
    for alpha, tag in ((0.2, "80"), (0.05, "95")):
        fr = res.get_prediction(Xn).summary_frame(alpha=alpha)
        out["lower" + tag] = fr["obs_ci_lower"].to_numpy()
        out["upper" + tag] = fr["obs_ci_upper"].to_numpy()
    m = fr["mean"].to_numpy()
    v = fr["mean_se"].to_numpy() ** 2 + res.scale
    if log:
        out = {k: np.exp(v_) for k, v_ in out.items()}
        out["forecast"] = np.exp(m + v / 2.0)
    else:
        out["forecast"] = m
    return out


def baseline_trend(y, start, o, shape, H):
    t = np.arange(start, o)
    tn = np.arange(o, o + H)
    center = (start + o - 1) / 2.0
    X = np.column_stack(poly(t, shape, center) + [month_dummies(t)])
    Xn = np.column_stack(poly(tn, shape, center) + [month_dummies(tn)])
    log = shape == "exponential"
    yy = np.log(y[start:o]) if log else y[start:o]
    return sm_forecast(X, yy, Xn, log)


def baseline_joint(y, o, layout, shape, last_shape, knots, H):
    t = np.arange(o)
    tn = np.arange(o, o + H)
    log = shape == "exponential"
    if layout == "separate":
        bounds = (0,) + knots + (o,)
        shapes = [shape] * len(knots) + [last_shape]
        cols, ncols = [], []
        for r in range(len(bounds) - 1):
            center = (bounds[r] + bounds[r + 1] - 1) / 2.0
            ind = ((t >= bounds[r]) & (t < bounds[r + 1])).astype(float)
            last = 1.0 if r == len(bounds) - 2 else 0.0
            cols += [c * ind for c in poly(t, shapes[r], center)]
            ncols += [c * last for c in poly(tn, shapes[r], center)]
    else:
        center = (o - 1) / 2.0
        cols, ncols = poly(t, shape, center), poly(tn, shape, center)
        for b in knots:
            h, hn = np.maximum(t - b, 0.0), np.maximum(tn - b, 0.0)
            cols.append(h)
            ncols.append(hn)
            if shape == "quadratic":
                cols.append(h * h)
                ncols.append(hn * hn)
    X = np.column_stack(cols + [month_dummies(t)])
    Xn = np.column_stack(ncols + [month_dummies(tn)])
    return sm_forecast(X, np.log(y[:o]) if log else y[:o], Xn, log)


def baseline_candidate(y, o, st, breaks, grid, H):
    spec = TrendSpec(st.shape, "dummies", 12)
    if st.name == "global":
        return baseline_trend(y, 0, o, st.shape, H)
    if st.name == "truncated":
        if st.start is None:
            kept = usable_breaks(breaks, o, 1, spec.minimum_points())
            start = kept[-1] if kept else 0
        else:
            start = st.start if o - st.start >= spec.minimum_points() else 0
        return baseline_trend(y, start, o, st.shape, H)
    if st.name == "window-average":
        # the evaluation's shortest window (carried on the strategy), as in regimes.window_rule
        shortest = max(spec.minimum_points(), st.minimum_window or 0)
        starts = [s for s in grid if o - s >= shortest] or [0]
        parts = [baseline_trend(y, s, o, st.shape, H) for s in starts]
        return {k: np.mean([p[k] for p in parts], axis=0) for k in parts[0]}
    last = st.last_shape or st.shape
    knots = usable_breaks(breaks, o, TERMS[st.shape] + 1, TERMS[last] + 2)
    if not knots:
        return baseline_trend(y, 0, o, last, H)
    return baseline_joint(y, o, st.name, st.shape, last, knots, H)


def baseline_breaks(y, o, min_size, choose):
    """ruptures Dynp with the built-in linear cost on [y | t, month indicators]."""
    import ruptures

    t = np.arange(o, dtype=float)
    m = (np.arange(o) % 12)
    ind = np.column_stack([(m == j).astype(float) for j in range(12)])
    signal = np.column_stack([y[:o], t - t.mean(), ind])
    algo = ruptures.Dynp(model="linear", min_size=min_size, jump=1).fit(signal)
    paths = {0: ()}
    for k in range(1, MAX_BREAKS + 1):
        try:
            paths[k] = tuple(algo.predict(n_bkps=k)[:-1])
        except Exception:
            break
    return choose(y[:o], paths)


def baseline_scores(y, origins, names, fc, scale):
    out = {}
    targets = np.asarray(origins)[:, None] + np.arange(HORIZON)[None, :]
    a = y[targets]
    for c, name in enumerate(names):
        f = {k: np.array([fc[i][c][k] for i in range(len(origins))]) for k in fc[0][c]}
        e = a - f["forecast"]
        m = {"me": e.mean(), "mae": np.abs(e).mean(), "rmse": math.sqrt((e ** 2).mean()),
             "mape": 100 * np.mean(np.abs(e / a)),
             "mase": np.mean(np.abs(e) / scale[:, None])}
        for tag, alpha in (("80", 0.2), ("95", 0.05)):
            lo, hi = f["lower" + tag], f["upper" + tag]
            m["coverage" + tag] = np.mean((a >= lo) & (a <= hi))
            m["interval_score" + tag] = np.mean((hi - lo) + 2 / alpha * np.maximum(lo - a, 0)
                                                + 2 / alpha * np.maximum(a - hi, 0))
        out[name] = m
    return out


def run_baseline(series, ev, choose, min_size):
    y = series.values
    origins = list(ev.errors.origins)
    grid = [series.starts.tolist().index(np.datetime64(d)) for d in ev.model["window_starts"]]
    strategies = [c.strategy for c in ev.candidates] + [c.strategy for c in ev.sweep]
    fc, found, scale = [], [], []
    for o in origins:
        breaks = baseline_breaks(y, o, min_size, choose)
        found.append(breaks)
        fc.append([baseline_candidate(y, o, st, breaks, grid, HORIZON) for st in strategies])
        h = y[:o]
        scale.append(np.mean(np.abs(h[12:] - h[:-12])))
    return baseline_scores(y, origins, [s.key for s in strategies], fc, np.array(scale)), found


def bic_choice(y, paths, base=13, changing=13):
    """BIC n ln(SSR/n) + p ln n, p = base + m (changing + 1) (the break search's documented
    rule: 2 trend terms + 11 seasonal dummies without breaks; each break changes all 13 and
    adds its date), the SSR of each path from a fresh least-squares fit per regime."""
    n = len(y)
    best, best_m = math.inf, 0
    for m, bkps in sorted(paths.items()):
        bounds = (0,) + tuple(bkps) + (n,)
        ssr = 0.0
        for a, b in zip(bounds[:-1], bounds[1:]):
            t = np.arange(a, b, dtype=float)
            ind = np.column_stack([((np.arange(a, b) % 12) == j).astype(float)
                                   for j in range(12)])
            X = np.column_stack([t - t.mean(), ind])
            beta, *_ = np.linalg.lstsq(X, y[a:b], rcond=None)
            r = y[a:b] - X @ beta
            ssr += float(r @ r)
        value = n * math.log(ssr / n) + (base + m * (changing + 1)) * math.log(n)
        if value < best - 1e-9:
            best, best_m = value, m
    return paths[best_m]


def main():
    series = invented_series(120)
    settings = dict(shape="linear", seasonality="dummies", kind="both", seasonal_by_regime=True,
                    max_breaks=MAX_BREAKS, criterion="bic", horizon=HORIZON,
                    first_origin=120 - HORIZON - ORIGINS + 1, step=1)
    compare(series, **settings)  # warm-up (imports, caches)
    ours = math.inf
    for _ in range(OUR_REPEATS):
        t0 = time.perf_counter()
        ev = compare(series, **settings)
        ours = min(ours, time.perf_counter() - t0)
    min_size = 12 + 2  # the break search's default shortest regime here: 12 seasons + 2 terms

    baseline = math.inf
    for _ in range(BASELINE_REPEATS):
        t0 = time.perf_counter()
        base, found = run_baseline(series, ev, bic_choice, min_size)
        baseline = min(baseline, time.perf_counter() - t0)

    same_breaks = all(tuple(a) == tuple(b) for a, b in zip(ev.breaks_by_origin, found))
    worst = 0.0
    for c in ev.candidates + ev.sweep:
        for k in METRICS:
            a, b = c.metrics[k], base[c.name][k]
            worst = max(worst, abs(a - b) / max(abs(b), 1e-300))
    print(f"candidates: {len(ev.candidates)} ranked + {len(ev.sweep)} history-sweep starts; "
          f"origins: {len(ev.errors.origins)}; horizons 1..{HORIZON}")
    print(f"breaks at every origin identical to ruptures Dynp: {same_breaks}")
    print(f"largest relative metric difference: {worst:.2e} (goal <= 1e-8)")
    print(f"baseline (ruptures Dynp + statsmodels OLS): {baseline:8.3f} s "
          f"(best of {BASELINE_REPEATS})")
    print(f"regimetrend compare:                        {ours:8.3f} s (best of {OUR_REPEATS})")
    print(f"speed ratio: {baseline / ours:.1f}x (goal >= 20x)")
    print()
    print("whole compare (24 origins, horizons 1..12, all strategies and shapes):")
    print("      n   default settings   kind both, seasons by regime   --reuse-breaks")
    for n in (120, 500, 2000):
        s = invented_series(n)
        times = []
        for extra in ({}, {"kind": "both", "seasonal_by_regime": True},
                      {"reuse_breaks": True}):
            t0 = time.perf_counter()
            compare(s, shape="linear", horizon=HORIZON, **extra)
            times.append(time.perf_counter() - t0)
        print(f"  {n:5d}   {times[0]:14.3f} s   {times[1]:26.3f} s   {times[2]:12.3f} s")
    print("(default settings: seasonal dummies shared by the regimes and kind auto, so the break "
          "search runs again on each origin's history)")


if __name__ == "__main__":
    main()
