"""Benchmark: the per-origin break search (``breaks.detect.find_break_positions``) of one analysis.

One ``analyze`` of the demo series (120 monthly points, invented data, default settings) asks
for the break positions of 72 histories (24 origins x 3 shape evaluations). They are recorded
once, then searched again on one core, BLAS held to one thread, CPU time, best of N, the design
factor memo emptied before each pass (the simulated nulls of the first test kept, as in a warm
analysis). Baseline, measured in the same run: the same searches with the joint ``both`` fits
made in full (``detect._LIGHT_JOINT = False``: regime design, QR and the whole fit object per
break set) instead of by ``breaks.shared_seasons``. Both must give the same positions.

Figures (busy shared 2-core machine, load 7-9, best of 5): light 2.9-5.2 ms a search against
4.1-6.4 ms in full; in instructions (callgrind, one pass of the 72 searches) 1,991 M against
2,346 M before this work (the full fits also shared the ``both`` SSRs' cost with the tied kinds'
scans, the tests and the kind choice, which are unchanged).

Run: ``python benchmarks/bench_origin_search.py [--repeats N]``.
"""

from __future__ import annotations

import argparse
import os
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

import scipy.linalg  # noqa: E402,F401  (loads scipy's BLAS before the limit is set)
from threadpoolctl import threadpool_limits  # noqa: E402

import regimetrend.breaks.detect as detect  # noqa: E402
from regimetrend import analyze, demo_path, load_series  # noqa: E402
from regimetrend.factor_memo import FACTORS  # noqa: E402


def recorded_histories() -> list:
    """(history, spec, options, positions) of every origin search one analysis makes."""
    calls = []
    plain = detect.find_break_positions

    def record(series, spec, options):
        found = plain(series, spec, options)
        calls.append((series, spec, options, found))
        return found

    detect.find_break_positions = record
    try:
        analyze(load_series(str(demo_path())))
    finally:
        detect.find_break_positions = plain
    return calls


def one_pass(calls, light: bool) -> bool:
    detect._LIGHT_JOINT = light
    try:
        return all(detect.find_break_positions(s, spec, o) == want for s, spec, o, want in calls)
    finally:
        detect._LIGHT_JOINT = True


def best_ms(calls, light: bool, repeats: int) -> float:
    best = float("inf")
    for _ in range(repeats):
        FACTORS.clear()
        c0 = time.process_time()
        one_pass(calls, light)
        best = min(best, time.process_time() - c0)
    return 1000.0 * best


def main(repeats: int) -> None:
    calls = recorded_histories()
    with threadpool_limits(limits=1):
        same = one_pass(calls, True) and one_pass(calls, False)
        full, light = [], []
        for _ in range(repeats):  # interleaved, so both see the same load
            full.append(best_ms(calls, False, 1))
            light.append(best_ms(calls, True, 1))
    k = len(calls)
    print(f"{k} origin break searches of one demo analysis; CPU ms, best of {repeats}, "
          f"one core, BLAS held to one thread")
    print(f"  baseline (full joint fits)  {min(full):8.1f} ms  ({min(full) / k:.2f} ms a search)")
    print(f"  light joint fits            {min(light):8.1f} ms  ({min(light) / k:.2f} ms a search; "
          f"baseline / this {min(full) / min(light):.2f}x)")
    print(f"  same positions as recorded, both ways: {'yes' if same else 'NO'}")


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=5)
    main(parser.parse_args().repeats)
