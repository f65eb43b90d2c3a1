"""Benchmark: the strategies' rolling fits of one analysis, without the break searches.

The demo series (120 monthly points, invented data) is analysed once with the default settings
to record every ``evaluate.rolling.run_rolling`` call (one per evaluated shape) and the breaks
known at each origin; the calls are then replayed with those breaks looked up in a table, so
only the fits and forecasts of the candidates are timed (CPU time, one core, BLAS held to one
thread, best of several runs).

Printed, measured in this run: the rolling fits as they run (each origin's single trends in one
batched QR per design, ``OriginFits.prefit``) and the baseline of every single trend fitted one
by one through the least-squares core (``prefit`` skipped; the same model, equal to about
1e-13, not byte for byte).

Figures: the replay timed in this tree and in the tree before this work, in turns (three
rounds, best of 8 each, 2-core machine with the other core busy): 159-168 ms against 200-209
ms (1.25x); this script's baseline, one by one: 191 ms against 163 ms. What is left is mostly
arithmetic (the batched QR of every window design, the leverage sums), whose rounding the
forecasts keep byte for byte; batching the windows of all origins together (tried) moved the
last bits of some forecasts (1e-15) and was not clearly faster on this machine.

Run: ``python benchmarks/bench_rolling.py [--repeats N]``.
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

import regimetrend.evaluate as evaluation  # noqa: E402
import regimetrend.evaluate.rolling as rolling  # noqa: E402
from regimetrend import analyze, demo_path, load_series  # noqa: E402
from regimetrend.regimes import OriginFits  # noqa: E402


def record(series) -> list:
    """The run_rolling calls of one analysis, with the breaks of each origin in a table."""
    calls = []
    real = evaluation.run_rolling

    def spy(series, strategies, plan, seasonality, season_length, breaks_at, window_starts=(),
            progress=None, minimum_window=0, copied=None):
        table = {o: breaks_at(o) for o in plan.origins}
        calls.append((series, strategies, plan, seasonality, season_length, table,
                      window_starts, minimum_window, copied))
        return real(series, strategies, plan, seasonality, season_length,
                    lambda o: table[o], window_starts, progress, minimum_window, copied)

    evaluation.run_rolling = spy
    try:
        analyze(series)
    finally:
        evaluation.run_rolling = real
    return calls


def replay(calls) -> list:
    out = []
    for series, strategies, plan, seasonality, s, table, starts, minimum, copied in calls:
        out.append(rolling.run_rolling(series, strategies, plan, seasonality, s,
                                       table.__getitem__, starts, None, minimum, copied)[0])
    return out


def one_by_one(calls) -> list:
    """The baseline: every single trend fitted one by one (no batched QR)."""
    real = OriginFits.prefit
    OriginFits.prefit = lambda self, strategies, horizon: None  # type: ignore[method-assign]
    try:
        return replay(calls)
    finally:
        OriginFits.prefit = real  # type: ignore[method-assign]


def best_ms(fn, repeats: int) -> float:
    out = np.inf
    for _ in range(repeats):
        c0 = time.process_time()
        fn()
        out = min(out, time.process_time() - c0)
    return 1000.0 * out


def main(repeats: int) -> None:
    series = load_series(str(demo_path()))
    with threadpool_limits(limits=1):
        calls = record(series)
        fields = ("forecast", "lower80", "upper80", "lower95", "upper95")
        same = all(np.allclose(getattr(a, f), getattr(b, f), rtol=1e-10, atol=0.0)
                   for a, b in zip(replay(calls), one_by_one(calls)) for f in fields)
        base = best_ms(lambda: one_by_one(calls), repeats)
        now = best_ms(lambda: replay(calls), repeats)
    origins = sum(len(c[2].origins) for c in calls)
    print(f"the strategies' rolling fits of one analysis of the demo series ({len(calls)} "
          f"evaluations, {origins} origins, breaks looked up), one core; CPU ms, best of "
          f"{repeats}")
    print(f"  baseline (every single trend fitted one by one) {base:8.1f} ms")
    print(f"  the rolling fits as they run                    {now:8.1f} ms  "
          f"(baseline / this {base / now:.2f}x)")
    print(f"  same forecasts and intervals as the baseline to 1e-10: {'yes' if same else 'NO'}")


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=10)
    main(parser.parse_args().repeats)
