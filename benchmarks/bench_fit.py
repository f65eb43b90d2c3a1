"""Fit-and-forecast time of the three trend shapes, beside statsmodels OLS on the same design.

For n = 120, 1,000 and 100,000 points (monthly seasonal dummies), times regimetrend's
fit_trend + forecast against statsmodels OLS fit + get_prediction on the identical design
matrix, in the same run, and prints the ratio (statsmodels time / ours; above 1 = we are faster).

Run: python benchmarks/bench_fit.py
"""

from __future__ import annotations

import time

import numpy as np
import statsmodels.api as sm

from regimetrend.design import TrendSpec
from regimetrend.trendfit import fit_trend


def best_of(fn, repeat: int) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def series(n: int, rng) -> np.ndarray:
    t = np.arange(n)
    return np.exp(5 + 0.002 * t * 120 / n + 0.1 * np.sin(2 * np.pi * t / 12)
                  + rng.normal(0, 0.03, n))


def main() -> None:
    rng = np.random.default_rng(0)
    print(f"{'shape':<12}{'n':>9}{'ours ms':>10}{'statsmodels ms':>16}{'ratio':>8}{'max diff':>11}")
    for n in (120, 1_000, 100_000):
        y = series(n, rng)
        positions = np.arange(n)
        ahead = np.arange(n, n + 12)
        repeat = 20 if n <= 1000 else 3
        for shape in ("linear", "exponential", "quadratic"):
            spec = TrendSpec(shape, "dummies", 12)

            def ours():
                return fit_trend(y, positions, spec, 0).forecast(ahead)

            fit = fit_trend(y, positions, spec, 0)
            X, X_new = fit.fit.X, fit.design(ahead)
            target = np.log(y) if shape == "exponential" else y

            def reference():
                res = sm.OLS(target, X).fit()
                return res.get_prediction(X_new).summary_frame(alpha=0.05)

            t_ours = best_of(ours, repeat)
            t_ref = best_of(reference, repeat)
            ref = reference()
            mine = fit.fit.predict(X_new, (0.95,))
            diff = float(np.max(np.abs(mine.bands[0.95][1] - ref["obs_ci_upper"].to_numpy())))
            print(f"{shape:<12}{n:>9,}{1e3 * t_ours:>10.2f}{1e3 * t_ref:>16.2f}"
                  f"{t_ref / t_ours:>8.2f}{diff:>11.1e}")


if __name__ == "__main__":
    main()
