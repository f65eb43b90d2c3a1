"""The verdict on the real corpus (``tests/corpus.py``): what it chooses and what it costs.

For each series: the chosen model, its breaks, the diagnosis cause, the stability status, the
history advice, and the time of the whole ``analyze`` with the share spent on the stability
reruns (the break search on each shortened series and the rescored rolling origin). The
baseline measured in the same run is the rolling-origin evaluation of the linear shape alone
(``compare``, the pre-verdict pipeline's main cost); the ratio says what the verdict adds (the
second shape's evaluation when one runs, the stability reruns, the per-shape break searches).

Run: ``python benchmarks/bench_verdict.py [name ...]``. Prints figures only.
"""

from __future__ import annotations

import os
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

from regimetrend import analysis as analysis_module  # noqa: E402
from regimetrend.analysis import analyze  # noqa: E402
from regimetrend.evaluate import compare  # noqa: E402
from tests.corpus import CORPUS  # noqa: E402


def main(names) -> None:
    spent = {"stability": 0.0}
    inner = analysis_module._stability

    def timed(*args, **kwargs):
        t = time.perf_counter()
        try:
            return inner(*args, **kwargs)
        finally:
            spent["stability"] += time.perf_counter() - t

    analysis_module._stability = timed
    rows = []
    for name in names:
        loader, calendar, source = CORPUS[name]
        series = loader()
        t0 = time.perf_counter()
        compare(series, shape="linear")
        base = time.perf_counter() - t0
        spent["stability"] = 0.0
        t0 = time.perf_counter()
        a = analyze(series)
        total = time.perf_counter() - t0
        v = a.verdict
        rows.append((name, calendar, series.n, v.model.shape, v.model.strategy,
                     ",".join(b.label for b in v.breaks) or "-", v.diagnosis.cause,
                     v.stability.status + (f"@{v.stability.changed_when_added}"
                                           if v.stability.changed_when_added else ""),
                     v.history.keep_from_label or "all", "+".join(a.evaluations), base, total,
                     spent["stability"], source))
        r = rows[-1]
        print(f"{r[0]:<28} {r[1]:<9} n={r[2]:<4} {r[3]:<11} {r[4]:<14} breaks={r[5]:<16} "
              f"cause={r[6]:<13} {r[7]:<10} keep={r[8]:<8} runs={r[9]:<20} "
              f"base {r[10]:5.1f}s  verdict {r[11]:5.1f}s (x{r[11] / r[10]:.1f}; stability "
              f"{r[12]:4.1f}s = {100 * r[12] / r[11]:.0f}%)  [{r[13]}]", flush=True)
    base = sum(r[10] for r in rows)
    total = sum(r[11] for r in rows)
    stab = sum(r[12] for r in rows)
    print(f"\n{len(rows)} series: baseline (compare, linear) {base:.1f}s, analyze with the verdict "
          f"{total:.1f}s (x{total / base:.2f}); stability reruns {stab:.1f}s "
          f"({100 * stab / total:.0f}% of the verdict pipeline)")
    causes = {}
    for r in rows:
        causes[r[6]] = causes.get(r[6], 0) + 1
    print("causes:", ", ".join(f"{k} {v}" for k, v in sorted(causes.items())))
    print("stability:", sum(r[7] == "stable" for r in rows), "stable of", len(rows))


if __name__ == "__main__":
    main(sys.argv[1:] or list(CORPUS))
