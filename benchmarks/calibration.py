"""Do the break tests and intervals keep their promise? One table of simulated figures.

Rows (each against the method used before, measured in the same run where one existed):

- size: share of no-break series (linear trend, AR(1) errors of unit variance) where a break
  is declared at 5%, for rho in {0, 0.3, 0.6, 0.9} x n in {60, 120, 240}, each kind alone and
  ``auto`` (three kinds together). "now": the simulated first test of ``breaks/calibrate.py``
  (what ``detect_breaks`` decides its first break on); "before": the asymptotic table with the
  long-run variance factor from the one-break residuals, any kind rejecting for ``auto``. At
  rho 0.9 the share flagged as wandering (``breaks/wandering.py``) is shown too.
- power at n = 120, rho 0.3, break in the middle: a jump (1 and 2 sigma), a kink (0.05 and
  0.1 sigma a period x 100 / n) and both (half of each), for ``auto`` and for the true kind
  alone, beside the classical sup-F of the true kind adjusted to 5% size on the same errors
  (an infeasible benchmark: it knows the kind and the autocorrelation); goal: ratio >= 0.8.
- break-date intervals: a kink of 0.1 sigma a period at n = 100 (white noise and rho 0.3),
  ``detect_breaks`` with kind ``auto`` and ``slope``: coverage of the true date by the 95%
  interval of the nearest break found, and the median width as a share of n (goal: >= 90%,
  <= 35%).
- growth intervals: the 95% interval of a regime's slope (40, 60, 120 points; rho 0, 0.3, 0.6)
  with ``ols.cov_hac_prewhitened`` and t quantiles ("now") and Newey-West with the fixed lag
  rule and normal quantiles ("before"); goal 92-97%.
- wandering: share of series read as wandering (``breaks/wandering.py``) by the first reading
  alone ("before") and with the second reading (one trend's residuals wander and the breaks
  leave AR(1) at least 0.6; "now"), linear shape, quarterly, 60/120/240 points: random walks
  with drift (should be flagged), a jump or a kink at 60% of the series with white errors and
  a jump with AR(1) errors of rho 0.5 (should not).
- time: ``detect_breaks`` plus ``growth_table`` (what ``scan`` computes) on a 120-point monthly
  series with seasonal dummies, median of 15 runs; goal <= 100 ms.

Run: ``nice python benchmarks/calibration.py [--quick]`` (full: several minutes on two busy
cores; quick: about a minute, wide Monte Carlo error). Prints figures only.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import time

import numpy as np
from scipy import stats
from scipy.signal import lfilter

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

from regimetrend import ols  # noqa: E402
from regimetrend.breaks import calibrate, critical, detect_breaks, wandering  # noqa: E402
from regimetrend.growth import growth_table  # noqa: E402
from regimetrend.series import Frequency, Series  # noqa: E402

KINDS = ("level", "slope", "both")
H = 6  # default shortest regime of a series without seasons


def annual(values) -> Series:
    starts = (np.datetime64("1800", "Y") + np.arange(len(values))).astype("datetime64[D]")
    return Series("sim", starts, np.asarray(values, dtype=float), Frequency("year"))


def monthly(values) -> Series:
    starts = (np.datetime64("2010-01", "M") + np.arange(len(values))).astype("datetime64[D]")
    return Series("sim", starts, np.asarray(values, dtype=float), Frequency("month"))


def ar1(n: int, rho: float, reps: int, rng) -> np.ndarray:
    """reps columns of AR(1) errors with unit variance (a random walk at rho = 1)."""
    burn = 0 if rho >= 1 else 200
    e = lfilter([1.0], [1.0, -rho], rng.standard_normal((n + burn, reps)), axis=0)[burn:]
    return e if rho >= 1 else e * math.sqrt(1.0 - rho * rho)


def design(n: int) -> np.ndarray:
    return np.column_stack([np.ones(n), np.arange(n) / n])


def before_pvalues(y: np.ndarray, n: int) -> dict:
    """The old first test: factor from the one-break residuals, asymptotic table."""
    qb = calibrate._orthonormal_basis(design(n))
    e = (y - qb @ (qb.T @ y))[:, None]
    out = {}
    for k in KINDS:
        scan = calibrate.kind_scan(qb, k, 1, H)
        sup, best = calibrate.supf_paths(scan, e, n - 2)
        V = scan.basis[best[0]].T @ e[:, 0]
        resid = e[:, 0] - scan.basis[best[0]] @ V
        factor = calibrate.robust_factor_columns(resid[:, None])[0]
        out[k] = critical.supf_pvalue(float(sup[0] * factor), f"linear-{k}", H / n)
    return out


def size_rows(reps: int) -> list[str]:
    rows = []
    for rho in (0.0, 0.3, 0.6, 0.9):
        for n in (60, 120, 240):
            rng = np.random.default_rng(int(1000 * rho) + n)
            E = ar1(n, rho, reps, rng)
            now = {k: 0 for k in KINDS + ("auto",)}
            old = dict(now)
            flagged = 0
            Z = design(n)
            for r in range(reps):
                y = 0.1 * np.arange(n) + E[:, r]
                cal = calibrate.calibrate(y, Z, KINDS, 1, H)
                for k in KINDS:  # a kind alone: the same draws, so its own p-value
                    now[k] += cal.p_values[k] <= 0.05
                now["auto"] += cal.p_any <= 0.05
                p_old = before_pvalues(y, n)
                for k in KINDS:
                    old[k] += p_old[k] <= 0.05
                old["auto"] += min(p_old.values()) <= 0.05
                if rho >= 0.9:
                    resid = y - Z @ np.linalg.lstsq(Z, y, rcond=None)[0]
                    flagged += wandering.assess(resid, Z).wandering
            cells = "  ".join(f"{k} {now[k] / reps:5.3f} ({old[k] / reps:5.3f})"
                              for k in KINDS + ("auto",))
            extra = f"  wandering {flagged / reps:4.2f}" if rho >= 0.9 else ""
            rows.append(f"size      rho {rho:3.1f} n {n:3d}  {cells}{extra}")
    return rows


def wandering_rows(reps: int) -> list[str]:
    from regimetrend.breaks.detect import find_breaks
    from regimetrend.design import TrendSpec
    from regimetrend.settings import BreakSettings

    rows = []
    spec = TrendSpec("linear", "none", 4)
    for n in (60, 120, 240):
        for kind in ("random walk", "jump", "kink", "jump, rho 0.5"):
            rng = np.random.default_rng(n)
            first = both = 0
            for _ in range(reps):
                t = np.arange(n)
                e = rng.standard_normal(n)
                if kind == "random walk":
                    y = np.cumsum(0.3 + e)
                else:
                    u = lfilter([1.0], [1.0, -0.5], e) if "rho" in kind else e
                    y = 0.3 * t + u
                    y = y + (5.0 * (t >= 0.6 * n) if kind.startswith("jump")
                             else 0.5 * np.maximum(t - 0.6 * n, 0))
                starts = (np.datetime64("1990-01", "M") + 3 * np.arange(n)).astype(
                    "datetime64[D]")
                s = Series("sim", starts, 100 + y, Frequency("quarter"))
                w = find_breaks(s, spec, BreakSettings()).wandering
                first += w.wandering
                both += w.wandering or w.trend_reading()
            rows.append(f"wandering n {n:3d} {kind:14s} now {both / reps:4.2f} "
                        f"(before {first / reps:4.2f})")
    return rows


def power_rows(reps: int) -> list[str]:
    n, rho = 120, 0.3
    b = n // 2
    t = np.arange(n, dtype=float)
    Z = design(n)
    qb = calibrate._orthonormal_basis(Z)
    scans = {k: calibrate.kind_scan(qb, k, 1, H) for k in KINDS}
    null = ar1(n, rho, 2000, np.random.default_rng(5))
    null = null - qb @ (qb.T @ null)
    cv = {k: float(np.quantile(calibrate.supf_paths(s, null, n - 2)[0], 0.95))
          for k, s in scans.items()}
    cases = [("jump", "level", 1.0, 0.0), ("jump", "level", 2.0, 0.0),
             ("kink", "slope", 0.0, 0.05), ("kink", "slope", 0.0, 0.10),
             ("both", "both", 0.5, 0.025), ("both", "both", 1.0, 0.05)]
    rows = []
    for name, kind, jump, kink in cases:
        kink_n = kink * 100 / n
        rng = np.random.default_rng(int(100 * jump + 1000 * kink))
        E = ar1(n, rho, reps, rng)
        Y = 0.1 * t[:, None] + np.where(t >= b, jump + kink_n * (t - b), 0.0)[:, None] + E
        hits_auto = hits_kind = 0
        for r in range(reps):
            cal = calibrate.calibrate(Y[:, r], Z, KINDS, 1, H)
            hits_auto += cal.p_any <= 0.05
            hits_kind += cal.p_values[kind] <= 0.05
        R = Y - qb @ (qb.T @ Y)
        classical = float(np.mean(calibrate.supf_paths(scans[kind], R, n - 2)[0] > cv[kind]))
        rows.append(f"power     {name:4s} jump {jump:3.1f} kink {kink_n:5.3f}  auto "
                    f"{hits_auto / reps:5.3f}  {kind} alone {hits_kind / reps:5.3f}  classical "
                    f"size-adjusted {classical:5.3f}  ratio auto {hits_auto / reps / classical:4.2f}"
                    f" alone {hits_kind / reps / classical:4.2f}")
    return rows


def date_rows(reps: int) -> list[str]:
    n, b = 100, 50
    t = np.arange(n, dtype=float)
    rows = []
    for rho in (0.0, 0.3):
        E = ar1(n, rho, reps, np.random.default_rng(77 + int(10 * rho)))
        for kind in ("auto", "slope"):
            cover, widths, found = 0, [], 0
            for r in range(reps):
                y = 0.1 * t + np.where(t >= b, 0.1 * (t - b), 0.0) + E[:, r]
                res = detect_breaks(annual(y), kind=kind)
                if not res.breaks:
                    continue
                found += 1
                near = min(res.breaks, key=lambda x: abs(x.position - b))
                lo, hi = near.ci95
                cover += lo <= b <= hi
                widths.append((hi - lo + 1) / n)
            share = cover / max(found, 1)
            rows.append(f"date CI   kink 0.1 sigma/period n 100 rho {rho:3.1f} kind {kind:5s}  "
                        f"found {found / reps:5.3f}  coverage {share:5.3f}  median width "
                        f"{np.median(widths) if widths else float('nan'):5.3f} of n")
    return rows


def growth_rows(reps: int) -> list[str]:
    rows = []
    for n in (40, 60, 120):
        X = np.column_stack([np.ones(n), np.arange(n, dtype=float)])
        for rho in (0.0, 0.3, 0.6):
            E = ar1(n, rho, reps, np.random.default_rng(n + int(10 * rho)))
            now = old = 0
            tq = ols.t_quantile(0.95, n - 2)
            z = stats.norm.ppf(0.975)
            for r in range(reps):
                fit = ols.fit(X, 1.0 + 0.05 * X[:, 1] + E[:, r])
                se_now = math.sqrt(fit.cov_hac_prewhitened()[1, 1])
                se_old = math.sqrt(fit.cov_hac(ols.newey_west_lags(n))[1, 1])
                now += abs(fit.beta[1] - 0.05) <= tq * se_now
                old += abs(fit.beta[1] - 0.05) <= z * se_old
            rows.append(f"growth CI regime {n:3d} rho {rho:3.1f}  coverage {now / reps:5.3f} "
                        f"(before {old / reps:5.3f})")
    return rows


def time_row() -> str:
    """Median time of what ``scan`` computes, with the simulated first test and, as the
    baseline in the same run, with the asymptotic table instead (the test switched off)."""
    from regimetrend.breaks import detect as detect_module

    rng = np.random.default_rng(3)
    t = np.arange(120, dtype=float)
    y = 100 + 0.5 * t + 5 * np.sin(2 * np.pi * t / 12) + rng.normal(0, 2, 120)
    s = monthly(y)

    def median_ms() -> float:
        times = []
        for _ in range(15):
            start = time.perf_counter()
            res = detect_breaks(s, seasonality="dummies")
            growth_table(s, res.spec, res)
            times.append(time.perf_counter() - start)
        return 1000 * float(np.median(times))

    with_test = median_ms()
    original = detect_module._first_test
    detect_module._first_test = lambda *args, **kwargs: None
    try:
        without = median_ms()
    finally:
        detect_module._first_test = original
    return (f"time      scan of a 120-point monthly series {with_test:6.1f} ms; with the "
            f"asymptotic table instead {without:6.1f} ms (ratio {with_test / without:4.2f})")


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="few replications (wide error)")
    opts = parser.parse_args(argv)
    size, power, dates, growth = (40, 40, 30, 400) if opts.quick else (300, 200, 150, 1500)
    from threadpoolctl import threadpool_limits

    with threadpool_limits(limits=1):
        print(f"calibration figures ({'quick' if opts.quick else 'full'}: {size} series per "
              f"size cell, {power} per power cell, {dates} per date cell, {growth} per growth "
              f"cell); size: now (before)")
        for row in (size_rows(size) + power_rows(power) + date_rows(dates) + growth_rows(growth)
                    + wandering_rows(dates) + [time_row()]):
            print(row, flush=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
