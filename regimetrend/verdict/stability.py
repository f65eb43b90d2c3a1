"""Stability: the verdict rerun without the last 1 up to a season of periods, and whether the
model and its break dates hold."""

from __future__ import annotations

from .breaks_used import uses_search_breaks
from .choose import choose, eligible, model_of
from .fields import Run, Stability


def stability_of(series, runs: list[Run], explicit, wandering, chosen: tuple, break_ps,
                 positions, periods: int = 10 ** 6) -> Stability:
    """Rerun the choice without the last 1..``periods`` periods: rescored evaluations (the
    origins the shorter series would have had) and the break searches of the shorter series:
    ``break_ps`` = {k: [p-value per run]}, each below the 5% level exactly when that search's
    sup-F p-value is (the rule reads no more of it; ``evaluate.history_break_pvalue``), and
    ``positions(k, i)`` the break positions of run ``i``'s search without the last ``k``
    periods, asked only for the run whose model the rerun chooses when that model uses breaks.
    ``chosen`` = (run index, name, breaks). Only the candidates the rule may choose are
    rescored (``choose.eligible``)."""
    from ..errors import InputError
    from ..evaluate.subset import origins_known_by, rescored

    unit = _unit(series, 1)
    reruns = []
    changed = None
    checked = 0  # largest k before the first change
    for k in sorted(break_ps):
        if k > periods:
            break
        mask = origins_known_by(runs[0].evaluation, series.n - k)
        if int(mask.sum()) < 3:
            break
        pools = [rescored(r.evaluation, mask, _choosable(r, explicit)) for r in runs]
        i, best, _ = choose(runs, explicit, wandering, pools, [mask] * len(runs), break_ps[k])
        try:
            used = sorted(positions(k, i)) if uses_search_breaks(model_of(best, runs[i])) else []
        except InputError:  # the search of this shortened series failed: stop here
            break
        # The same candidate may be scored in more than one run (the linear run also scores
        # other shapes); what matters is the model and its breaks, not which run chose it.
        same_model = best.name == chosen[1]
        same_breaks = _same_breaks(used, chosen[2])
        reruns.append({"without_last": k, "model": best.name,
                       "breaks": [series.label(p) for p in used],
                       "same": same_model and same_breaks})
        if changed is None and not (same_model and same_breaks):
            changed = k
        if changed is None:
            checked = k
    if not reruns:
        return Stability("not checked", 0, None,
                         "Stability was not checked: the series is too short to drop its last "
                         "periods and still score the rolling origin.")
    ks = [r["without_last"] for r in reruns]
    dropped = _list(ks) + " " + _unit(series, 2)
    if changed is None:
        if not chosen[2]:
            same = "the same model, using no break, is chosen"
        elif any(b.given for b in chosen[2]):
            same = "the same model is chosen, with the analyst's break dates"
        else:
            same = "the same model and the same break dates (within their 95% intervals) are chosen"
        return Stability("stable", ks[-1], None,
                         f"The verdict is stable: without the last {dropped} {same}.",
                         tuple(reruns))
    r = next(r for r in reruns if r["without_last"] == changed)
    before = series.label(series.n - 1 - changed)
    what = r["model"] + (f" with breaks at {', '.join(r['breaks'])}" if r["breaks"] else
                         " with no break")
    added = (f"the last {unit} was added" if changed == 1 else
             f"the last {changed} {_unit(series, changed)} were added")
    held = ""
    if checked:
        held = (f" (it holds without the last {_list([x for x in ks if x <= checked])} "
                f"{_unit(series, max(checked, 2)) if checked > 1 else unit})")
    return Stability("changed", ks[-1], changed,
                     f"The verdict changed when {added}{held}: with data to {before} the rule "
                     f"chose {what}. Treat it as fragile and revisit it as data arrive.",
                     tuple(reruns))


def _list(ks) -> str:
    ks = [str(k) for k in ks]
    return ks[0] if len(ks) == 1 else ", ".join(ks[:-1]) + " and " + ks[-1]


def _unit(series, k: int) -> str:
    word = {"year": "year", "quarter": "quarter", "month": "month", "week": "week",
            "day": "day"}.get(series.frequency.unit, "period")
    if series.frequency.step != 1:
        word = "period"
    return word if k == 1 else word + "s"


def _choosable(run, explicit) -> list[str]:
    """The candidates of ``run`` the rule may choose (the rest are never read)."""
    return [c.name for c in run.evaluation.candidates if eligible(c, run.shape, explicit)]


def _same_breaks(positions, dates) -> bool:
    """Each rerun break lies in the 95% interval of the chosen model's break (``BreakDate``)."""
    if len(positions) != len(dates):
        return False
    for x, y in zip(positions, dates):
        lo, hi = y.ci95_positions
        if not lo <= x <= hi:
            return False
    return True


def stability_periods(series) -> tuple[int, ...]:
    """Periods dropped, 1 up to a season: 1, 2, 3, then doubling up to the season length
    (at least 3 periods, at most 13, a quarter of weekly data), and the season itself."""
    top = int(min(max(series.frequency.season_length, 3), 13))
    ks = [k for k in (1, 2, 3) if k <= top]
    k = 6
    while k < top:
        ks.append(k)
        k *= 2
    if top not in ks:
        ks.append(top)
    return tuple(ks)
