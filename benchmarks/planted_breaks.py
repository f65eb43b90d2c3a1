"""Accuracy of the break search on planted breaks, and its false-break rate.

1. One planted break of each kind (level, slope, both) at a random date in a linear trend of
   100 points, three noise levels: share of series where a break is found within two periods of
   the planted date, with the kind given and with kind ``auto``, and the mean number found.
2. A late break one seasonal cycle before the end of a monthly series with seasonal dummies
   (partial structural change): the case the default trimming exists for.
3. Series without a break: share where the sup-F test rejects at 5% (nominal size 5%) at the
   default trimming and at 15%, and share where each criterion picks at least one break.
4. Series without a break but with AR(1) errors: share where the sup-F test rejects at 5%, with
   the autocorrelation-robust tests (the default) and the classical ones.

Run: ``python benchmarks/planted_breaks.py [replications]`` (default 60; the false-break part
uses four times as many). Prints figures only.
"""

from __future__ import annotations

import os
import sys
import time

import numpy as np
import pandas as pd

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

from regimetrend.breaks import detect_breaks  # noqa: E402
from regimetrend.series import Frequency, Series  # noqa: E402

N = 100
EFFECTS = {"level": (2.0, 0.0), "slope": (0.0, 0.15), "both": (1.0, 0.10)}  # jump, slope change


def annual(values) -> Series:
    starts = pd.to_datetime([f"{1900 + i}-01-01" for i in range(len(values))])
    return Series("planted", starts.values.astype("datetime64[D]"), values, Frequency("year"))


def monthly(values) -> Series:
    starts = (np.datetime64("2010-01", "M") + np.arange(len(values))).astype("datetime64[D]")
    return Series("planted", starts, values, Frequency("month"))


def planted(kind: str, b: int, sigma: float, rng, n: int = N) -> np.ndarray:
    t = np.arange(n, dtype=float)
    jump, slope = EFFECTS[kind]
    return 10 + 0.1 * t + np.where(t >= b, jump + slope * (t - b), 0.0) + rng.normal(0, sigma, n)


def accuracy(reps: int) -> None:
    print(f"1. one planted break, n={N}, date uniform in 20..80, {reps} series per cell")
    print("   share of series with a break found within 2 periods; kind given unless 'auto'")
    print(f"{'kind':>6} {'noise':>6} {'BIC':>6} {'LWZ':>6} {'seq':>6} {'BIC auto':>9} "
          f"{'auto chose kind':>16} {'mean found (BIC)':>17}")
    for kind in ("level", "slope", "both"):
        for sigma in (0.5, 1.0, 2.0):
            seed = 1000 * ("level", "slope", "both").index(kind) + int(10 * sigma)
            rng = np.random.default_rng(seed)
            hits = {"bic": 0, "lwz": 0, "sequential": 0, "auto": 0}
            same = count = 0
            for _ in range(reps):
                b = int(rng.integers(20, 81))
                s = annual(planted(kind, b, sigma, rng))
                for crit in ("bic", "lwz", "sequential"):
                    r = detect_breaks(s, kind=kind, criterion=crit)
                    hits[crit] += any(abs(p - b) <= 2 for p in r.positions)
                    count += r.n_breaks if crit == "bic" else 0
                r2 = detect_breaks(s, criterion="bic")
                hits["auto"] += any(abs(p - b) <= 2 for p in r2.positions)
                same += r2.kind == kind and r2.n_breaks > 0
            print(f"{kind:>6} {sigma:>6.1f} {hits['bic'] / reps:>6.2f} {hits['lwz'] / reps:>6.2f} "
                  f"{hits['sequential'] / reps:>6.2f} {hits['auto'] / reps:>9.2f} "
                  f"{same / reps:>16.2f} {count / reps:>17.2f}")


def late_seasonal(reps: int) -> None:
    print(f"\n2. late break 12 months before the end, monthly n=120, seasonal dummies, "
          f"{reps} series")
    rng = np.random.default_rng(42)
    t = np.arange(120, dtype=float)
    for sigma in (1.0, 2.0):
        hits = 0
        for _ in range(reps):
            y = (100 + 0.3 * t + np.where(t >= 108, 1.0 * (t - 108) + 3.0, 0.0)
                 + 5 * np.sin(2 * np.pi * t / 12) + rng.normal(0, sigma, 120))
            r = detect_breaks(monthly(y), seasonality="dummies", kind="both")
            hits += any(abs(p - 108) <= 2 for p in r.positions)
        print(f"noise {sigma:.1f}: found within 2 months in {hits / reps:.2f} of series "
              f"(last regime allowed down to {r.trim_periods} months)")


def false_breaks(reps: int) -> None:
    print(f"\n3. no break, n={N}, noise 1, {reps} series per kind (nominal size 0.05)")
    print(f"{'kind':>6} {'sup-F rejects (trim 6%)':>24} {'sup-F rejects (trim 15%)':>25} "
          f"{'BIC >=1':>8} {'LWZ >=1':>8} {'sequential >=1':>15}")
    for kind in ("level", "slope", "both"):
        rng = np.random.default_rng(7 + ("level", "slope", "both").index(kind))
        rej6 = rej15 = bic = lwz = seq = 0
        for _ in range(reps):
            s = annual(10 + 0.1 * np.arange(N) + rng.normal(0, 1, N))
            r = detect_breaks(s, kind=kind, criterion="bic")
            rej6 += (r.tests.supf.p_value or 1.0) < 0.05
            bic += r.n_breaks > 0
            rej15 += (detect_breaks(s, kind=kind, max_breaks=1, trim=0.15).tests.supf.p_value
                      or 1.0) < 0.05
            lwz += detect_breaks(s, kind=kind, criterion="lwz").n_breaks > 0
            seq += detect_breaks(s, kind=kind, criterion="sequential").n_breaks > 0
        print(f"{kind:>6} {rej6 / reps:>24.3f} {rej15 / reps:>25.3f} {bic / reps:>8.3f} "
              f"{lwz / reps:>8.3f} {seq / reps:>15.3f}")


def autocorrelated(reps: int) -> None:
    print(f"\n4. no break, AR(1) errors, monthly n=120, kind both, trim 15%, {reps} series per "
          f"row (nominal size 0.05)")
    print(f"{'rho':>5} {'robust (allow)':>15} {'classical (ignore)':>19}")
    for rho in (0.0, 0.3, 0.6, 0.8):
        rng = np.random.default_rng(int(100 * rho) + 3)
        rej = {"allow": 0, "ignore": 0}
        for _ in range(reps):
            u = rng.normal(size=120)
            e = np.zeros(120)
            for i in range(120):
                e[i] = (rho * e[i - 1] if i else 0.0) + u[i]
            s = monthly(10 + 0.05 * np.arange(120) + e)
            for mode in rej:
                r = detect_breaks(s, kind="both", max_breaks=1, trim=0.15,
                                  serial_correlation=mode)
                rej[mode] += (r.tests.supf.p_value or 1.0) < 0.05
        print(f"{rho:>5.1f} {rej['allow'] / reps:>15.3f} {rej['ignore'] / reps:>19.3f}")


if __name__ == "__main__":
    reps = int(sys.argv[1]) if len(sys.argv) > 1 else 60
    t0 = time.perf_counter()
    accuracy(reps)
    late_seasonal(reps)
    false_breaks(4 * reps)
    autocorrelated(4 * reps)
    print(f"\n(total {time.perf_counter() - t0:.0f} s)")
