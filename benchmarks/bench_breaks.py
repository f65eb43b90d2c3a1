"""Speed of the break search, against ruptures measured in the same run.

0. Accuracy of segment costs on 12-point segments at the end of a 5,000-point series: plain
   prefix moments of [1, u, u^2] against ours, both against a refined least-squares fit.
1. Exact search (dynamic programming on prefix-sum costs) against ruptures' ``Dynp`` with its
   built-in least-squares cost on the same linear-trend design [y, 1, t], n = 200 and 400, up to
   3 breaks, same minimum regime length and every position allowed (jump = 1): identical break
   sets are checked and the speed ratio printed (goal: at least 100x at n = 400).
2. Scaling of the exact search with up to 5 breaks at n = 1,000, 2,000 and 5,000, with the time
   ratios between sizes (the dynamic programme is O(M n^2); a doubling should cost about 4x).
3. PELT at n = 100,000 with its peak traced memory, and our PELT against ruptures' ``Pelt`` on
   the same cost at n = 2,000.
4. ``detect_breaks`` at 24 rolling origins x 3 shapes on a monthly series of about 120 points.

Run: ``python benchmarks/bench_breaks.py``. Prints figures only; no assertions on time.
"""

from __future__ import annotations

import os
import sys
import time
import tracemalloc

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

import ruptures  # noqa: E402

from regimetrend.breaks import detect_breaks  # noqa: E402
from regimetrend.breaks.costs import SegmentCost  # noqa: E402
from regimetrend.breaks.exact import bic_penalty, exact_search, pelt_search  # noqa: E402
from regimetrend.breaks.ruptures_cost import TrendCost  # noqa: E402
from regimetrend.series import Frequency, Series  # noqa: E402

H = 6


def planted(n: int, breaks: int, rng) -> np.ndarray:
    """A linear trend whose level and slope change at ``breaks`` random dates, plus noise."""
    t = np.arange(n, dtype=float)
    cuts = np.sort(rng.choice(np.arange(3 * H, n - 3 * H), size=breaks, replace=False))
    y = 0.02 * t
    for c in cuts:
        y = y + np.where(t >= c, rng.normal(0, 3) + rng.normal(0, 0.05) * (t - c), 0.0)
    return y + rng.normal(0, 1, n)


def timed(fn, repeat: int = 1):
    best, out = np.inf, None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def _refined_ssr(y, a, b, degree):
    t = np.arange(a, b, dtype=float)
    X = np.column_stack([((t - t.mean()) / 6.0) ** p for p in range(degree + 1)])
    r = y[a:b].copy()
    for _ in range(2):
        beta, *_ = np.linalg.lstsq(X, r, rcond=None)
        r = r - X @ beta
    return float(r @ r)


def cost_accuracy() -> None:
    print("0. SSR of 12-point segments at the end of n = 5,000 (worst relative error)")
    rng = np.random.default_rng(7)
    n = 5000
    t = np.arange(n)
    y = 50 + 0.3 * t + 2e-4 * t ** 2 + rng.normal(0, 1, n)
    for degree in (1, 2):
        u = (t - (n - 1) / 2) / ((n - 1) / 2)
        X = np.column_stack([u ** p for p in range(degree + 1)])
        pxx = np.concatenate([np.zeros((1, degree + 1, degree + 1)),
                              np.cumsum(X[:, :, None] * X[:, None, :], axis=0)])
        pxy = np.concatenate([np.zeros((1, degree + 1)), np.cumsum(X * y[:, None], axis=0)])
        pyy = np.concatenate([[0.0], np.cumsum(y * y)])
        ours = SegmentCost(y, degree, min_size=degree + 2)
        worst_plain = worst_ours = 0.0
        for a in range(n - 60, n - 11):
            b = a + 12
            A, c = pxx[b] - pxx[a], pxy[b] - pxy[a]
            plain = pyy[b] - pyy[a] - c @ np.linalg.solve(A, c)
            ref = _refined_ssr(y, a, b, degree)
            worst_plain = max(worst_plain, abs(plain - ref) / ref)
            worst_ours = max(worst_ours, abs(ours.cost(a, b) - ref) / ref)
        name = "quadratic" if degree == 2 else "linear"
        print(f"{name:>10}: plain prefix moments {worst_plain:.1e}, ours {worst_ours:.1e}")
    print()


def versus_dynp() -> None:
    print("1. exact search vs ruptures Dynp(model='linear'), design [1, t], min size 6, jump 1")
    print(f"{'n':>6} {'ruptures s':>11} {'ours s':>9} {'ratio':>8}  identical break sets (m=1..3)")
    for n in (200, 400):
        y = planted(n, 3, np.random.default_rng(n))
        signal = np.column_stack([y, np.ones(n), np.arange(n, dtype=float)])

        def theirs():
            algo = ruptures.Dynp(model="linear", min_size=H, jump=1).fit(signal)
            return [tuple(algo.predict(n_bkps=m)[:-1]) for m in (1, 2, 3)]

        def ours():
            path = exact_search(SegmentCost(y, 1, min_size=H), 3, H)
            return [tuple(path.positions[m]) for m in (1, 2, 3)]

        t_r, sets_r = timed(theirs)
        t_o, sets_o = timed(ours, repeat=5)
        print(f"{n:>6} {t_r:>11.3f} {t_o:>9.4f} {t_r / t_o:>8.0f}  {sets_r == sets_o}")


def scaling() -> None:
    print("\n2. exact search with up to 5 breaks (linear trend, min size 6)")
    print(f"{'n':>6} {'seconds':>9} {'ratio to previous':>18} {'size ratio^2':>13}")
    prev = None
    for n in (1000, 2000, 5000):
        y = planted(n, 5, np.random.default_rng(n))
        t, _ = timed(lambda: exact_search(SegmentCost(y, 1, min_size=H), 5, H))
        ratio = "" if prev is None else f"{t / prev[1]:.2f}"
        sq = "" if prev is None else f"{(n / prev[0]) ** 2:.2f}"
        print(f"{n:>6} {t:>9.3f} {ratio:>18} {sq:>13}")
        prev = (n, t)


def pelt() -> None:
    print("\n3. PELT (BIC-matched penalty, min size 6)")
    n = 2000
    y = planted(n, 8, np.random.default_rng(1))
    pen = bic_penalty(y, 2)
    t_o, ours = timed(lambda: pelt_search(SegmentCost(y, 1, min_size=H), pen, H))
    t_r, theirs = timed(lambda: ruptures.Pelt(custom_cost=TrendCost(min_size=H), min_size=H,
                                              jump=1).fit(y).predict(pen=pen)[:-1])
    print(f"n={n}: ours {t_o:.3f} s, ruptures Pelt on the same cost {t_r:.3f} s, "
          f"ratio {t_r / t_o:.0f}, same breaks: {tuple(theirs) == ours}")
    n = 100_000
    rng = np.random.default_rng(2)
    y = planted(n, 100, rng)
    tracemalloc.start()
    t0 = time.perf_counter()
    found = pelt_search(SegmentCost(y, 1, min_size=H), bic_penalty(y, 2), H)
    elapsed = time.perf_counter() - t0
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    print(f"n={n:,}: {elapsed:.1f} s, {len(found)} breaks (100 planted), peak traced memory "
          f"{peak / 2 ** 20:.1f} MiB ({peak / n:.0f} bytes per point)")


def rolling() -> None:
    print("\n4. detect_breaks at 24 rolling origins x 3 shapes (monthly, seasonal dummies)")
    rng = np.random.default_rng(0)
    n = 144
    t = np.arange(n)
    y = 100 + 0.5 * t + np.where(t >= 100, 0.8 * (t - 100), 0) + 5 * np.sin(2 * np.pi * t / 12)
    y = y + rng.normal(0, 2, n)
    starts = (np.datetime64("2012-01", "M") + np.arange(n)).astype("datetime64[D]")
    series = Series("bench", starts, y, Frequency("month"))
    t0, c0 = time.perf_counter(), time.process_time()
    calls = 0
    for origin in range(96, 120):
        for shape in ("linear", "exponential", "quadratic"):
            detect_breaks(series.head(origin), shape=shape, seasonality="dummies")
            calls += 1
    total, cpu = time.perf_counter() - t0, time.process_time() - c0
    print(f"{calls} calls on 96..119 points: {total:.2f} s in total ({cpu:.2f} s of CPU), "
          f"{1000 * total / calls:.1f} ms per call")


if __name__ == "__main__":
    cost_accuracy()
    versus_dynp()
    scaling()
    pelt()
    rolling()
