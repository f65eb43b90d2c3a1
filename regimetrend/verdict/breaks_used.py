"""The breaks a chosen model uses, as dates, and whether the rolling origin could judge them."""

from __future__ import annotations

from .fields import BREAK_FREE, BreakDate, Model, Run


def break_dates(series, breakset, model: Model | None = None) -> tuple[BreakDate, ...]:
    """The breaks the model uses (all of its search's breaks for a break-aware strategy; none
    for one trend, a window average or a fixed start); every break when ``model`` is None."""
    if model is not None and (model.strategy in BREAK_FREE or model.start is not None):
        return ()
    out = []
    for b in sorted(breakset.breaks, key=lambda b: b.position):
        lo, hi = int(b.ci95[0]), int(b.ci95[1])
        out.append(BreakDate(int(b.position), series.iso(int(b.position)),
                             series.label(int(b.position)), (series.iso(lo), series.iso(hi)),
                             (series.label(lo), series.label(hi)), (lo, hi)))
    return tuple(out)


def judged_by(run: Run, position: int) -> int:
    """Origins that know a shortest regime (the search's trimming) after ``position``."""
    h = int(getattr(run.breaks, "trim_periods", 0) or 1)
    return sum(1 for o in run.evaluation.plan.get("origins", []) if int(o) >= position + h)
