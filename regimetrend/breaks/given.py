"""Breaks at dates the analyst gives (``break_dates``, ``--breaks``): fitted there, not searched.

Analysts often know when a contract, a price or a definition changed. With known dates there is
no search: the regimes are fitted at exactly those dates and each break is tested by its partial
F given the others (the Chow-type test of a break at a known date), scaled for autocorrelated
errors like the tests of found breaks (``detect.robust_factor``). Because the dates were fixed
before looking at the data, the plain F law gives the p-values; there is no sup-F, no sequential
count and no date interval (the date is not estimated). The joint F test of all the dates
against one trend is the evidence that the regime changed at all.

Kind ``auto`` takes the kind (both, level, slope) with the lowest BIC at the given dates (ties
in that order); the dates are not counted as estimated parameters.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
from scipy.stats import f as f_dist

from ..errors import InputError, about
from ..settings import BreakSettings
from . import detect, select
from .problem import KINDS, BreakProblem, build_problem
from .result import BreakSet, BreakTests, JointTest, SupFTest

NAME = "break_dates"
INTERVAL = "not applicable: the date was given by the analyst"
NOTE_GIVEN = ("The break dates were given by the analyst, not found by a search: each break is "
              "tested by its F statistic given the other breaks at its known date (F law, no "
              "search over dates), and no date interval applies.")


def given_positions(series, dates, h: int) -> tuple[int, ...]:
    """Positions of the analyst's break dates in time order; a one-line InputError for a date
    that is no date, lies outside the series, leaves a regime shorter than ``h`` periods, or
    repeats another."""
    n = series.n
    found: dict[int, str] = {}
    for item in dates:
        text = str(item)
        if isinstance(item, (int, np.integer)) and not isinstance(item, bool):
            p = int(item)
            if not 0 <= p < n:
                raise InputError(f"{about(NAME)}: position {p} is outside the series "
                                 f"(0..{n - 1})")
        else:
            from ..intake import parse_date

            d = parse_date(text)
            if d is None:
                raise InputError(f"{about(NAME)}: {text!r} is not a date")
            if d < series.starts[0] or d >= series.start_of(n):
                raise InputError(f"{about(NAME)}: {text} is outside the series "
                                 f"({series.label(0)} to {series.label(n - 1)})")
            p = int(np.searchsorted(series.starts, d, side="right")) - 1
        if p in found:
            raise InputError(f"{about(NAME)}: {text} and {found[p]} are the same period "
                             f"({series.label(p)})")
        found[p] = text
    positions = sorted(found)
    for p in positions:
        if p < h or p > n - h:
            raise InputError(f"{about(NAME)}: {found[p]} ({series.label(p)}) is too close to an "
                             f"end: every regime needs at least {h} periods, so a break can be "
                             f"from {series.label(h)} to {series.label(n - h)}")
    for a, b in zip(positions, positions[1:]):
        if b - a < h:
            raise InputError(f"{about(NAME)}: {found[a]} and {found[b]} are {b - a} periods "
                             f"apart; every regime needs at least {h} periods")
    return tuple(positions)


def positions_within(series, dates, h: int) -> tuple[int, ...]:
    """The analyst's dates that fall inside ``series`` (a history up to an origin) with at
    least ``h`` periods on each side, as positions; the others are not known there yet."""
    n = series.n
    out = []
    for item in dates:
        if isinstance(item, (int, np.integer)) and not isinstance(item, bool):
            p = int(item)
        else:
            from ..intake import parse_date

            d = parse_date(str(item))
            if d is None or d < series.starts[0] or d >= series.start_of(n):
                continue
            p = int(np.searchsorted(series.starts, d, side="right")) - 1
        if h <= p <= n - h:
            out.append(p)
    kept: list[int] = []
    for p in sorted(set(out)):  # neighbours closer than h: the later waits for more history
        if not kept or p - kept[-1] >= h:
            kept.append(p)
    return tuple(kept)


def _bic(problem: BreakProblem, kind: str, fit, m: int) -> float:
    k = problem.base_count + m * problem.changing(kind)
    return select.bic(max(fit.ssr, select.exact_fit_floor(problem.y)), problem.n, k)


def given_breaks(series, spec, options: BreakSettings, within: bool = False) -> BreakSet:
    """The ``BreakSet`` with breaks at ``options.break_dates`` (see the module docstring);
    ``within``: keep only the dates inside ``series`` with room (a history up to an origin,
    ``positions_within``) instead of refusing the others."""
    robust = options.serial_correlation == "allow"
    problem = build_problem(series, spec, options.seasonal_by_regime, options.trim)
    n, h = problem.n, problem.h
    if n < max(2 * h, spec.minimum_points()):
        raise InputError(f"{about(NAME)}: the series has {n} periods; regimes of a "
                         f"{spec.describe()} need at least {max(2 * h, spec.minimum_points())}")
    positions = (positions_within(series, options.break_dates, h) if within
                 else given_positions(series, options.break_dates, h))
    m = len(positions)
    kinds = KINDS if options.kind == "auto" else (options.kind,)
    fits = {k: problem.fit(k, positions) for k in kinds}
    scores = {k: _bic(problem, k, fits[k], m) for k in kinds}
    kind = min(kinds, key=lambda k: (round(scores[k], 9), KINDS.index(k)))
    fit = fits[kind]
    q = problem.changing(kind)
    breaks = []
    for i in range(m):
        b = detect._describe_break(series, problem, kind, positions, i, fit, robust)
        p = None
        if math.isfinite(b.f_statistic):
            p = float(f_dist.sf(b.f_statistic, q, n - fit.k))
        where = (positions[i], positions[i])
        breaks.append(dataclasses.replace(
            b, ci90=where, ci95=where, ci90_dates=(b.date, b.date), ci95_dates=(b.date, b.date),
            interval_method=INTERVAL, given=True, p_value=p))
    none = problem.fit(kind, ())
    joint = _joint(problem, none, fit, m * q, robust)
    events = [detect._event_position(series, e, h) for e in options.events]
    tests = BreakTests(supf=SupFTest(math.nan, None, None, problem.model_key(kind), h / n),
                       sequential=(),
                       chow=tuple(detect._chow(series, problem, kind, e, robust) for e in events),
                       cusum=detect._cusums(problem), joint=joint)
    notes = [NOTE_GIVEN, detect.NOTE_ROBUST if robust else detect.CAUTION_TESTS]
    if options.kind == "auto" and len(kinds) > 1:
        notes.append(f"Kind {kind}: the lowest BIC of the kinds at the given dates.")
    rho = detect._lag1(fit.residuals)
    if rho > 0.3:
        notes.append(f"Residuals are autocorrelated (lag-1 correlation {rho:.2f})"
                     + ("; the tests allow for it." if robust else
                        ": the test sizes are too optimistic."))
    segments = tuple(detect._segment(series, problem, kind, positions, j, fit)
                     for j in range(m + 1))
    return BreakSet(spec=spec, n=n, kind=kind, kind_requested=options.kind, criterion="given",
                    criterion_path=(), criterion_paths={}, ssr_path=(), trim_periods=h,
                    trim_share=h / n, breaks=tuple(breaks), tests=tests,
                    drift=detect._drift(series, tests.cusum), segments=segments,
                    positions=positions, method="given", exact=True, iterations=1,
                    seasonal_by_regime=problem.seasonal_by_regime, notes=tuple(notes),
                    max_breaks=m, given=True)


def _joint(problem: BreakProblem, none, fit, df1: int, robust: bool) -> JointTest | None:
    """F of every given break together against one trend (robust mode: scaled by the
    residuals of the model without breaks, as each partial F is)."""
    if df1 <= 0:
        return None
    df2 = problem.n - fit.k
    stat = select.f_statistic(none.ssr, fit.ssr, df1, problem.n, fit.k,
                              select.exact_fit_floor(problem.y))
    if robust and math.isfinite(stat) and stat > 0:
        stat *= detect.robust_factor(none.residuals)
    p = None if math.isnan(stat) else (0.0 if math.isinf(stat)
                                       else float(f_dist.sf(stat, df1, df2)))
    return JointTest(stat, p, df1, df2)
