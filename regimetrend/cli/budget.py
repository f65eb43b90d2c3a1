"""The work a command is about to do, estimated before it starts.

Finding breaks in n periods costs about ``SECONDS_PER_SQUARED * n**2`` seconds below
``breaks.long_search.BOTTOM_UP_LENGTH`` points (the dynamic programme below
``breaks.exact.PELT_LENGTH`` points and PELT above it, whose pruning barely helps on a trend with
few breaks): about 2 s for 5,000 points. From ``BOTTOM_UP_LENGTH`` on, the scan's search is
ruptures' bottom-up segmentation, polished, and its whole cost grows about linearly:
``SECONDS_PER_POINT * n``, about 1 minute for 1,000,000 points (measured on a shared 2-core
machine by ``benchmarks/bench_portfolio_long.py``; a rough guide, not a promise). A
rolling-origin evaluation finds the breaks again at every origin unless ``--reuse-breaks``, and
runs every shape's analysis there; its estimate keeps the quadratic figure per search.

A run estimated to take minutes says so on standard error before it starts; one estimated past
``REFUSE_AFTER`` is refused at once, naming the options that make it smaller.
"""

from __future__ import annotations

import sys

from ..errors import InputError

SECONDS_PER_SQUARED = 2.5e-8
SECONDS_PER_POINT = 8e-5  # a whole scan from BOTTOM_UP_LENGTH points on
NOTE_AFTER = 60.0  # seconds: say up front that the run takes minutes
REFUSE_AFTER = 3600.0  # seconds: refuse rather than run for an hour or more


def search_seconds(n: int) -> float:
    return SECONDS_PER_SQUARED * float(n) ** 2


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


def check_evaluation(series, evaluation, stream=None) -> None:
    """Refuse or announce a rolling-origin evaluation (``evaluation``: ``EvaluationSettings``)."""
    check_scan(series, stream=_Silent())
    count = origins(series, evaluation)
    searches = 1 + (0 if evaluation.reuse_breaks else count)
    seconds = search_seconds(series.n) * searches
    if seconds > REFUSE_AFTER:
        raise InputError(f"the series has {series.n:,} periods and the rolling origin "
                         f"{count} origins, each finding the breaks again: that would take "
                         f"{_duration(seconds)}; use fewer origins (--step, --first-origin) or "
                         f"--reuse-breaks (breaks found once; results labelled optimistic)")
    _note(f"{series.n:,} periods, {count} origins: this run will take {_duration(seconds)}",
          seconds, stream)


class _Silent:
    def write(self, text) -> int:
        return len(text)


def _note(text: str, seconds: float, stream) -> None:
    if seconds > NOTE_AFTER:
        out = stream if stream is not None else sys.stderr
        out.write(f"regimetrend: note: {text}\n")
        getattr(out, "flush", lambda: None)()
