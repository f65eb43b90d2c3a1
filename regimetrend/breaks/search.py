"""One search per break kind, each giving the SSR path for 0..M breaks of the joint model.

- ``both``: every trend coefficient free per regime, so segment costs add up and the exact
  dynamic programme applies (``exact.exact_search``; PELT for long series). With shared seasonal
  dummies this is a partial structural change, solved by iterating: (a) fit the joint model
  (regime trends + one seasonal pattern) for the chosen break set by OLS, (b) remove its
  seasonal part and search the trend-only breaks again; stop when the chosen break set repeats
  (at most ``MAX_ITERATIONS`` rounds; the result says whether it settled). The SSR reported for
  every m is the joint model's own SSR at that m's break set.
- ``level`` and ``slope``: regimes share coefficients; exact grid for up to two breaks,
  refinement beyond (``kinks.tied_search``), seasonal dummies inside the base design.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from . import exact, kinks, long_search, select
from .costs import SegmentCost
from .problem import BreakProblem

MAX_ITERATIONS = 10


BOTTOM_UP = "bottom-up (ruptures), polished exactly"
PENALISED = ("pelt", BOTTOM_UP)  # searches that give one penalised break count, not a path


@dataclass(frozen=True)
class KindPath:
    """Best break sets of one kind for m = 0..M and the joint model's SSR for each."""

    kind: str
    ssr: tuple[float, ...]
    positions: tuple[tuple[int, ...], ...]
    exact: tuple[bool, ...]  # global optimum guaranteed for that m
    method: str
    iterations: int = 1
    settled: bool = True


def _segment_cost(problem: BreakProblem, y: np.ndarray) -> SegmentCost:
    sidx = problem.season_idx if problem.seasonal_by_regime else None
    s = problem.spec.season_length if problem.seasonal_by_regime else 1
    return SegmentCost(y, problem.degree, sidx, s, min_size=problem.h)


def _cost_less_season(problem: BreakProblem, season_from) -> SegmentCost:
    """Segment cost of the response less the shared seasonal part of the joint fit with breaks
    at ``season_from`` (None: the response as it is). Kept per problem: the rounds of the
    back-and-forth and the sequential tests ask for the same ones."""
    kept = problem.segment_costs
    if season_from not in kept:
        y = problem.y if season_from is None else \
            problem.y - problem.both_summary(season_from).seasonal
        kept[season_from] = _segment_cost(problem, y)
    return kept[season_from]


def _joint_ssr(problem: BreakProblem, positions) -> tuple[float, np.ndarray]:
    joint = problem.both_summary(positions)
    return joint.ssr, joint.seasonal


def _candidate_ssr(problem: BreakProblem, positions) -> tuple[float, np.ndarray | None]:
    """``_joint_ssr`` of a break set the segment search proposed, or (inf, None) when the joint
    model cannot be fitted there. The segment costs fit each regime on its own, so they cannot
    see that a shared seasonal pattern and the regime trends are confounded: when every regime
    is exactly one season long (n = (m + 1) s with trim s), the regime trends' sawtooth is itself
    a seasonal pattern. Such a break set is no candidate (infinite SSR, never chosen), rather
    than a failure of the whole analysis."""
    try:
        return _joint_ssr(problem, positions)  # kept by the problem, like every joint fit
    except InputError:  # raised by ``fit`` only for dependent columns
        return np.inf, None


def search_both(problem: BreakProblem, max_breaks: int, criterion: str, method: str = "auto"
                ) -> KindPath:
    n, h = problem.n, problem.h
    use_pelt = method == "pelt" or (method == "auto" and n >= exact.PELT_LENGTH)
    bottom_up = use_pelt and method != "pelt" and n >= long_search.BOTTOM_UP_LENGTH
    shared = problem.seasonal is not None and not problem.seasonal_by_regime
    # the break set whose seasonal part is taken off the response
    season_from: tuple[int, ...] | None = () if shared else None
    chosen = None
    base, changing = problem.base_count, problem.changing("both")
    for it in range(1, MAX_ITERATIONS + 1):  # noqa: B007 (read after the loop)
        cost = _cost_less_season(problem, season_from)
        if use_pelt:
            pen = exact.bic_penalty(problem.y - _season(problem, season_from), changing)
            found = (long_search.bottom_up_search(cost, pen, h) if bottom_up
                     else exact.pelt_search(cost, pen, h))
            sets = [(), found]
            flags = [True, False]
        else:
            path = exact.exact_search(cost, max_breaks, h)
            sets = list(path.positions)
            # With a shared seasonal pattern the search is exact given that pattern; the
            # joint optimum is only reached as the iteration's fixed point.
            flags = [True] + [not shared] * (len(sets) - 1)
        ssr = [_candidate_ssr(problem, pos)[0] if pos else _joint_ssr(problem, pos)[0]
               for pos in sets]  # inf SSR where the joint model cannot be fitted: never picked
        floor = select.exact_fit_floor(problem.y)
        if use_pelt:
            values = [select.bic(max(s, floor), n, select.parameter_count(base, changing, len(p)))
                      for s, p in zip(ssr, sets)]
        else:
            values = select.criterion_path(ssr, n, base, changing, criterion, floor)
        pick = select.best_count(values)
        if not shared or sets[pick] == chosen:
            settled = True
            break
        chosen = sets[pick]
        season_from = tuple(chosen)
        settled = False
    if use_pelt:
        # Only m = 0 and PELT's own count are known; other m stay unknown (inf).
        m_found = len(sets[1])
        full_ssr = [np.inf] * (max(m_found, 0) + 1)
        full_pos: list[tuple[int, ...]] = [()] * (m_found + 1)
        full_ssr[0], full_pos[0] = ssr[0], ()
        full_ssr[m_found], full_pos[m_found] = ssr[1], tuple(sets[1])
        return KindPath("both", tuple(full_ssr), tuple(full_pos),
                        tuple([True] + [False] * m_found),
                        BOTTOM_UP if bottom_up else "pelt", it, settled)
    return KindPath("both", tuple(ssr), tuple(tuple(p) for p in sets), tuple(flags),
                    "exact dynamic programming", it, settled)


def search_tied(problem: BreakProblem, kind: str, max_breaks: int, starts_by_m=None) -> KindPath:
    terms = problem.terms(kind)
    ssr, positions, flags = kinks.tied_search(problem.y, problem.base, terms, max_breaks,
                                              problem.h, starts_by_m, problem.scans(kind))
    method = "exact grid" if all(flags) else "exact grid up to two breaks, refined beyond"
    return KindPath(kind, tuple(ssr), tuple(tuple(p) for p in positions), tuple(flags), method)


def _season(problem: BreakProblem, season_from) -> np.ndarray:
    if season_from is None:
        return np.zeros(problem.n)
    return problem.both_summary(season_from).seasonal


def best_added_break(problem: BreakProblem, kind: str, positions, season_from=None
                     ) -> tuple[float, float, int | None]:
    """(SSR with ``positions``, lowest SSR with one more break inside any of its regimes, where).

    Used for sup-F(l+1|l). For ``both`` both SSRs are segment costs of the response less the
    shared seasonal part of the joint fit with breaks at ``season_from`` (the l-break fit; None:
    the response as it is): the seasonal pattern is not re-estimated for the extra break, which
    can only make the statistic smaller (conservative).
    """
    n, h = problem.n, problem.h
    bounds = [0, *sorted(positions), n]
    best, where = np.inf, None
    if kind == "both":
        cost = _cost_less_season(problem, season_from)
        before = float(sum(cost.cost(a, b) for a, b in zip(bounds[:-1], bounds[1:])))
        for a, b in zip(bounds[:-1], bounds[1:]):
            taus = np.arange(a + h, b - h + 1)
            if taus.size == 0:
                continue
            split = cost.costs(a, taus) + cost.costs(taus, b)
            k = int(np.argmin(split))
            total = before - cost.cost(a, b) + float(split[k])
            if total < best:
                best, where = total, int(taus[k])
        return before, best, where
    terms = problem.terms(kind)
    before = kinks.ssr_with(problem.y, problem.base, terms, sorted(positions),
                            problem.scans(kind).base)
    scans = problem.scans(kind)
    for a, b in zip(bounds[:-1], bounds[1:]):
        pos, s = scans.best(a + h, b - h, sorted(positions))
        if pos is not None and s < best:
            best, where = s, pos
    return before, best, where
