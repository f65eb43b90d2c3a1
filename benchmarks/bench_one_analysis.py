"""Benchmark: the cost of one whole analysis and of one scan, on one core, BLAS held to one thread.

The demo series (120 monthly points, invented data) is analysed with the default settings
(``analyze``: every shape's full-sample break search, the rolling origin with the breaks found
again at each origin, the verdict's stability reruns), the work ``report`` does before it
renders. Goals: whole analysis <= 150 ms, scan (``detect_breaks``) <= 15 ms, CPU time
(``time.process_time``), best of several runs.

Printed, all measured in this run:

- warm: the simulated null of the first break test already kept for these designs
  (``breaks.calibrate.NullCache``), as for every series after the first in a portfolio of
  series of the same length, shape and seasons;
- cold: that cache emptied before each run (a single series in a fresh process);
- baseline: the plain path kept behind a private switch (``evaluate._PLAIN_ORIGINS``: the
  whole break search at every origin) with the cache emptied, and the yardstick of one plain
  least-squares fit of the global trend, so the figures can be compared across machines;
- evaluations fitted separately: warm, behind ``analysis._SEPARATE_EVALUATIONS``, every
  evaluation offering and fitting every candidate itself (before the later evaluations of the
  automatic shape offered only what the rule considers and borrowed the first one's break-free
  rows), with a check that the verdict and the first evaluation are the same.

Latest figures (2026-12-04, quiet 2-core AMD EPYC, best of 5): cold 1115 ms, warm 834 ms,
baseline 2375 ms (2.85x), scan 30.6 ms cold / 22.6 ms warm; that machine runs the baseline
2.3 times slower than the one of the figures below, so compare the ratios.
Earlier figures (busy shared 2-core machine, best of 5, after the design factor memo): cold 1069 ms,
warm 950 ms (baseline 1905 ms), scan 19 ms cold / 13 ms warm; far above the goal since three
shapes are evaluated (see DEVELOPERS.md, performance notes). Evaluations sharing their
break-free rows (load average 9 on 2 cores, best of 7): warm 1141 ms against 1366 ms fitted
separately in the same run (1.20x, 225 ms saved; interleaved min of 12: 1068 against 1329 ms).
The factor memo
(``factor_memo.FACTORS``) is emptied with the nulls before the cold runs and the yardstick.

Run: ``python benchmarks/bench_one_analysis.py [--repeats N]``.
"""

from __future__ import annotations

import argparse
import os
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

import numpy as np  # noqa: E402
import scipy.linalg  # noqa: E402,F401  (loads scipy's BLAS before the limit is set)
from threadpoolctl import threadpool_limits  # noqa: E402

import regimetrend.analysis as analysis  # noqa: E402
import regimetrend.evaluate as evaluation  # noqa: E402
from regimetrend import analyze, demo_path, load_series  # noqa: E402
from regimetrend.breaks import calibrate, detect_breaks  # noqa: E402
from regimetrend.factor_memo import FACTORS  # noqa: E402
from regimetrend.forecast import fit_history  # noqa: E402
from regimetrend.settings import Settings  # noqa: E402

GOAL_ANALYSIS_MS, GOAL_SCAN_MS = 150.0, 15.0


def best_ms(fn, repeats: int, before=None) -> float:
    """Least CPU milliseconds of ``repeats`` calls (``before`` runs untimed before each)."""
    out = np.inf
    for _ in range(repeats):
        if before is not None:
            before()
        c0 = time.process_time()
        fn()
        out = min(out, time.process_time() - c0)
    return 1000.0 * out


def plain(fn):
    def run():
        evaluation._PLAIN_ORIGINS = True
        try:
            return fn()
        finally:
            evaluation._PLAIN_ORIGINS = False
    return run


def separate(fn):
    """``fn`` with every evaluation offering and fitting every candidate itself (the path
    before the later evaluations borrowed the first one's break-free rows)."""
    def run():
        analysis._SEPARATE_EVALUATIONS = True
        try:
            return fn()
        finally:
            analysis._SEPARATE_EVALUATIONS = False
    return run


def forget() -> None:
    """Empty what a fresh process would not have: the kept nulls and design factors."""
    calibrate.NULLS.clear()
    FACTORS.clear()


def main(repeats: int) -> None:
    series = load_series(str(demo_path()))
    spec = Settings().spec_for(series)
    whole = lambda: analyze(series)  # noqa: E731
    scan = lambda: detect_breaks(series)  # noqa: E731
    yardstick = lambda: fit_history(series, spec)  # noqa: E731
    same = plain(whole)().to_dict() == whole().to_dict()
    ours, theirs = whole(), separate(whole)()
    same_verdict = ours.verdict.to_dict() == theirs.verdict.to_dict() and \
        ours.evaluations["linear"].to_dict() == theirs.evaluations["linear"].to_dict()
    with threadpool_limits(limits=1):
        fit_ms = best_ms(yardstick, 20 * repeats, FACTORS.clear)
        base = best_ms(plain(whole), max(2, repeats // 2), forget)
        cold = best_ms(whole, repeats, forget)
        warm = best_ms(whole, repeats)
        unshared = best_ms(separate(whole), repeats)
        scan_cold = best_ms(scan, 3 * repeats, forget)
        scan_warm = best_ms(scan, 3 * repeats)
    print(f"one analysis of the demo series ({series.n} monthly points), default settings, "
          f"one core, BLAS held to one thread; CPU ms, best of {repeats}")
    print(f"  yardstick: one least-squares fit of the global trend   {fit_ms:8.2f} ms")
    print(f"  baseline (plain path: whole search at every origin, cold) {base:8.1f} ms  "
          f"({base / fit_ms:.0f} fits)")
    for label, ms in (("whole analysis, cold", cold), ("whole analysis, warm", warm)):
        print(f"  {label:<50} {ms:8.1f} ms  ({ms / fit_ms:.0f} fits; baseline / this "
              f"{base / ms:.2f}x; goal <= {GOAL_ANALYSIS_MS:.0f} ms: {ms / GOAL_ANALYSIS_MS:.2f}x "
              f"the goal)")
    print(f"  {'whole analysis, warm, evaluations fitted separately':<50} {unshared:8.1f} ms  "
          f"(this / shared {unshared / warm:.2f}x; saved {unshared - warm:.0f} ms)")
    for label, ms in (("scan (detect_breaks), cold", scan_cold), ("scan, warm", scan_warm)):
        print(f"  {label:<50} {ms:8.1f} ms  (goal <= {GOAL_SCAN_MS:.0f} ms: "
              f"{ms / GOAL_SCAN_MS:.2f}x the goal)")
    print(f"  same result as the plain path: {'yes' if same else 'NO'}")
    print(f"  same verdict and first evaluation as the evaluations fitted separately: "
          f"{'yes' if same_verdict else 'NO'}")


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=5)
    main(parser.parse_args().repeats)
