"""Benchmark: the verdict's stability reruns of one analysis, on one core, BLAS held to one thread.

The demo series (120 monthly points, invented data) is analysed with the default settings; the
reruns without the last 1, 2, 3, 6 and 12 periods (``analysis._stability``) are then timed alone
(CPU time, ``time.process_time``, best of several runs, the simulated nulls already kept):

- now: each shortened series asked only whether its test finds a break under every evaluation's
  shape (``evaluate.history_break_pvalue``), the positions searched only for the model each
  rerun chooses (taken from the rolling origin where it searched the same history,
  ``evaluate.searched_at``), and only the candidates the rule may choose rescored, RMSE and
  Diebold-Mariano test alone (``evaluate.subset.rescored``);
- baseline, measured in the same run: the plain reruns (the whole break search of every
  shortened series under every shape, every candidate scored on every metric and tested one by
  one), with the same reruns as the result (checked here).

Figures (busy shared 2-core machine, best of 9): baseline 414 ms, now 50 ms (8.3x less). The
reruns as they ran before this work (a search of every shortened series under every shape, its
tied kinds only as deep as the tests reach, every candidate rescored) measured 141-234 ms
against 42-55 ms now in interleaved runs (3.0-3.4x less); see DEVELOPERS.md, performance notes.

Run: ``python benchmarks/bench_stability.py [--repeats N]``.
"""

from __future__ import annotations

import argparse
import dataclasses
import os
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

import numpy as np  # noqa: E402
import scipy.linalg  # noqa: E402,F401  (loads scipy's BLAS before the limit is set)
from threadpoolctl import threadpool_limits  # noqa: E402

from regimetrend import analysis, demo_path, load_series  # noqa: E402
from regimetrend import verdict as verdicts  # noqa: E402
from regimetrend.errors import InputError  # noqa: E402
from regimetrend.evaluate import breakinfo, history_breaks  # noqa: E402
from regimetrend.evaluate.accuracy_tests import compare_errors  # noqa: E402
from regimetrend.evaluate.scores import score  # noqa: E402
from regimetrend.evaluate.subset import origins_known_by  # noqa: E402


def plain_rescored(evaluation, mask) -> dict:
    """Every ranked candidate on the origins in ``mask``: every metric and its own test."""
    table = evaluation.errors
    keep = np.flatnonzero(mask)
    step = int(evaluation.plan.get("step", 1))
    e_ref = table.errors(evaluation.reference)[keep]
    scored = {}
    for name in dict.fromkeys([evaluation.reference] + [c.name for c in evaluation.candidates]):
        i = table.index(name)
        scored[name] = score(table.actual[keep], table.forecast[i][keep], table.lower80[i][keep],
                             table.upper80[i][keep], table.lower95[i][keep],
                             table.upper95[i][keep], table.scale[keep][:, None])
    ref_rmse = scored[evaluation.reference]["rmse"]
    out = {}
    for name, m in scored.items():
        vs = ({"p_value_better": None} if name == evaluation.reference else
              compare_errors(e_ref, table.errors(name)[keep], step, per_horizon=False)[0]
              .to_dict())
        out[name] = dataclasses.replace(evaluation.candidate(name), metrics=m, per_horizon=(),
                                        vs_global=vs, gain=1.0 - m["rmse"] / ref_rmse)
    return out


def plain_reruns(series, runs, explicit, wandering, settings) -> list[tuple]:
    """(k, model, break labels) of every rerun, the plain way."""
    out = []
    for k in verdicts.stability_periods(series):
        head = series.head(series.n - k)
        try:
            searches = [history_breaks(head, r.breaks.spec, settings.breaks) for r in runs]
        except InputError:
            break
        mask = origins_known_by(runs[0].evaluation, head.n)
        if int(mask.sum()) < 3:
            break
        pools = [plain_rescored(r.evaluation, mask) for r in runs]
        i, best, _ = verdicts.choose(runs, explicit, wandering, pools, [mask] * len(runs),
                                     [breakinfo.supf_pvalue(b) for b in searches])
        used = verdicts.break_dates(head, searches[i], verdicts.model_of(best, runs[i]))
        out.append((k, best.name, [b.label for b in used]))
    return out


def best_ms(fn, repeats: int) -> float:
    out = np.inf
    for _ in range(repeats):
        c0 = time.process_time()
        fn()
        out = min(out, time.process_time() - c0)
    return 1000.0 * out


def main(repeats: int) -> None:
    series = load_series(str(demo_path()))
    kept = {}
    inner = analysis._stability

    def keep(*args):
        kept["args"] = args
        return inner(*args)

    analysis._stability = keep
    try:
        analysis.analyze(series)
    finally:
        analysis._stability = inner
    args = kept["args"]
    _, runs, explicit, wandering, _, _, settings, _ = args
    now = lambda: inner(*args)  # noqa: E731
    base = lambda: plain_reruns(series, runs, explicit, wandering, settings)  # noqa: E731
    with threadpool_limits(limits=1):
        got = [(r["without_last"], r["model"], r["breaks"]) for r in now().reruns]
        same = got == base()
        base_ms, now_ms = np.inf, np.inf
        for _ in range(repeats):  # interleaved, so both see the same load
            base_ms = min(base_ms, best_ms(base, 1))
            now_ms = min(now_ms, best_ms(now, 1))
    print(f"stability reruns of one analysis of the demo series ({series.n} monthly points, "
          f"{len(got)} reruns), one core, BLAS held to one thread; CPU ms, best of {repeats}")
    print(f"  baseline (plain reruns: whole searches, every candidate) {base_ms:8.1f} ms")
    print(f"  now                                                      {now_ms:8.1f} ms  "
          f"(baseline / now {base_ms / now_ms:.2f}x)")
    print(f"  same reruns as the plain path: {'yes' if same else 'NO'}")


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=9)
    main(parser.parse_args().repeats)
