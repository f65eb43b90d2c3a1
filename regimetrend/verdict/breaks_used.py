"""The breaks a chosen model uses, as dates, and whether the rolling origin could judge them."""

from __future__ import annotations

from ..words import p_phrase
from .fields import BREAK_FREE, BreakDate, Model, Run
from .phrases import interval_words


def break_dates(series, breakset, model: Model | None = None) -> tuple[BreakDate, ...]:
    """The breaks the model uses (all of its search's breaks for a break-aware strategy; none
    for one trend, a window average or a fixed start); every break when ``model`` is None."""
    if model is not None and not uses_search_breaks(model):
        return ()
    out = []
    for b in sorted(breakset.breaks, key=lambda b: b.position):
        p = int(b.position)
        if b.given:
            out.append(BreakDate(p, series.iso(p), series.label(p), None, None, (p, p), True,
                                 b.p_value))
            continue
        lo, hi = int(b.ci95[0]), int(b.ci95[1])
        out.append(BreakDate(p, series.iso(p), series.label(p), (series.iso(lo), series.iso(hi)),
                             (series.label(lo), series.label(hi)), (lo, hi)))
    return tuple(out)


def uses_search_breaks(model: Model) -> bool:
    """The model uses its search's breaks: not one trend, a window average or a fixed start."""
    return model.strategy not in BREAK_FREE and model.start is None


def break_words(b: BreakDate) -> str:
    """A break with its evidence of date: '2020-04 (95% interval 2020-02 to 2020-07)', or for a
    date the analyst gave, '2020-04 (given by the analyst; partial F p = 0.012)'."""
    if b.given:
        return f"{b.label} (given by the analyst; partial F {p_phrase(b.p_value)})"
    assert b.ci95_labels is not None
    return f"{b.label} ({interval_words(*b.ci95_labels)})"


def judged_by(run: Run, position: int) -> int:
    """Origins that know a shortest regime (the search's trimming) after ``position``."""
    h = int(getattr(run.breaks, "trim_periods", 0) or 1)
    return sum(1 for o in run.evaluation.plan.get("origins", []) if int(o) >= position + h)
