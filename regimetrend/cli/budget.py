"""The work a command is about to do, estimated before it starts.

One break search in n periods costs about ``SECONDS_PER_PERIOD * n + SECONDS_PER_SQUARED *
n**2`` seconds: the linear term is the first break test simulated on the series' own design and
the fixed work of every search, the square the dynamic programme below
``breaks.exact.PELT_LENGTH`` points and PELT above it, whose pruning barely helps on a trend
with few breaks. Measured on a shared 2-core machine (``benchmarks/bench_budget.py`` prints the
estimate beside real runs): about 0.04 s for 120 points, 0.2-1.5 s for 400-2,300 points, 2 s
for 5,000; a rough guide, not a promise.

A scan (``scan_seconds``) from ``breaks.long_search.BOTTOM_UP_LENGTH`` points on searches kind
``both`` by ruptures' bottom-up segmentation, polished, and its whole cost grows about linearly:
``SECONDS_PER_POINT * n`` (measured by ``benchmarks/bench_portfolio_long.py``).

An analysis (``compare``, ``report``) runs more searches than its rolling origin alone
(``analysis_searches``): one full-sample search per shape the automatic shape tries, the
rolling origin's search at every origin (unless ``--reuse-breaks``) for each evaluation (the
automatic shape may run one more per other shape that needs no more breaks: counted, so the
estimate does not fall short when it runs), and the verdict's stability reruns (on the series
without its last 1 .. season periods: the first break test per evaluation, within the linear
term of one search, and at most one search, for the model the rerun chooses). The rest of the run (the fits of
every candidate at every origin) adds about ``OTHER_WORK`` to the searches; its estimate keeps
the per-search figure above.

A run estimated to take minutes says so on standard error before it starts; one estimated past
``REFUSE_AFTER`` is refused at once, naming the options that make it smaller.
"""

from __future__ import annotations

import sys
from dataclasses import dataclass

from ..errors import InputError

SECONDS_PER_PERIOD = 3e-4
SECONDS_PER_SQUARED = 2.5e-8
SECONDS_PER_POINT = 8e-5  # a whole scan from BOTTOM_UP_LENGTH points on
OTHER_WORK = 1.25  # the candidates' fits at every origin, on top of the searches (measured)
NOTE_AFTER = 60.0  # seconds: say up front that the run takes minutes
REFUSE_AFTER = 3600.0  # seconds: refuse rather than run for an hour or more


def search_seconds(n: int) -> float:
    """One break search of ``n`` periods (module docstring)."""
    return SECONDS_PER_PERIOD * float(n) + SECONDS_PER_SQUARED * float(n) ** 2


def scan_seconds(n: int) -> float:
    """Estimated seconds of one scan of n periods (see the module docstring)."""
    from ..breaks.long_search import BOTTOM_UP_LENGTH

    if n >= BOTTOM_UP_LENGTH:
        return SECONDS_PER_POINT * float(n)
    return search_seconds(n)


def _duration(seconds: float) -> str:
    if seconds < 3600:
        minutes = max(1, round(seconds / 60))
        return f"about {minutes} minute{'' if minutes == 1 else 's'}"
    return f"about {seconds / 3600:.0f} hours"


def origins(series, evaluation) -> int:
    """How many origins the rolling origin will use (1 when the plan cannot be made: the run
    itself then says why)."""
    from ..evaluate.rolling import plan_origins

    try:
        horizon = evaluation.horizon_for(series)
        plan = plan_origins(series.n, horizon, 1, evaluation.first_origin, evaluation.step)
    except (InputError, ValueError, TypeError):
        return 1
    return len(plan.origins)


def check_scan(series, stream=None) -> None:
    """Refuse or announce the break search of ``series``."""
    seconds = scan_seconds(series.n)
    if seconds > REFUSE_AFTER:
        raise InputError(f"the series has {series.n:,} periods: finding its breaks would take "
                         f"{_duration(seconds)}; analyse its latest part, or totals over a "
                         f"coarser calendar")
    _note(f"{series.n:,} periods: finding the breaks will take {_duration(seconds)}", seconds,
          stream)


@dataclass(frozen=True)
class Searches:
    """The break searches an analysis runs (module docstring)."""

    shapes: int  # full-sample searches, one per shape tried
    evaluations: int  # rolling-origin evaluations (one per shape at most under the automatic shape)
    origins: int  # origins of each evaluation
    per_origin: bool  # breaks found again at every origin (not --reuse-breaks)
    reruns: int  # stability reruns, each at most one search (for the model it chooses)

    @property
    def total(self) -> int:
        return self.shapes + self.evaluations * self.origins * self.per_origin + self.reruns


def analysis_searches(series, evaluation, shape: str = "auto") -> Searches:
    """The searches of ``analyze`` on ``series`` with these settings (``evaluation``:
    ``EvaluationSettings``; ``shape`` the shape setting, ``auto`` or a shape)."""
    from ..design import SHAPES

    values = getattr(series, "values", None)
    positive = values is None or bool((values > 0).all())
    shapes = 1 if shape != "auto" else sum(1 for s in SHAPES if s != "exponential" or positive)
    evaluations = 1 if shape != "auto" else shapes  # the most the rule may run
    return Searches(shapes, evaluations, origins(series, evaluation),
                    not evaluation.reuse_breaks, len(_stability_periods(series)))


def _stability_periods(series) -> tuple[int, ...]:
    from .. import verdict

    if getattr(series, "frequency", None) is None:  # a stand-in without a calendar: the most
        return (1, 2, 3, 6, 12, 13)
    return verdict.stability_periods(series)


def check_evaluation(series, evaluation, stream=None, shape: str = "auto") -> None:
    """Refuse or announce an analysis with a rolling-origin evaluation (``evaluation``:
    ``EvaluationSettings``; ``shape``: the shape setting)."""
    check_scan(series, stream=_Silent())
    work = analysis_searches(series, evaluation, shape)
    count = work.origins
    seconds = search_seconds(series.n) * work.total * OTHER_WORK
    if seconds > REFUSE_AFTER:
        raise InputError(f"the series has {series.n:,} periods and the rolling origin "
                         f"{count} origins, each finding the breaks again, with "
                         f"{work.total} break searches in all: that would take "
                         f"{_duration(seconds)}; use fewer origins (--step, --first-origin) or "
                         f"--reuse-breaks (breaks found once; results labelled optimistic)"
                         + (", or one --shape" if shape == "auto" else ""))
    _note(f"{series.n:,} periods, {count} origins, {work.total} break searches: this run will "
          f"take {_duration(seconds)}", seconds, stream)


class _Silent:
    def write(self, text) -> int:
        return len(text)


def _note(text: str, seconds: float, stream) -> None:
    if seconds > NOTE_AFTER:
        out = stream if stream is not None else sys.stderr
        out.write(f"regimetrend: note: {text}\n")
        getattr(out, "flush", lambda: None)()
