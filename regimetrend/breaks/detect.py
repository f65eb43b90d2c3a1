"""``detect_breaks``: find, count, test and date the breaks in a series' trend.

Flow: build the problem on the model scale (logs for the exponential shape; seasonal pattern
removed first under ``adjust``) -> search each requested kind for 0..M breaks -> choose the kind
and the number of breaks by the criterion -> fit the joint model -> date intervals, tests,
Chow tests at the analyst's events, CUSUM drift of the global trend -> ``BreakSet``.

Kind ``auto`` searches ``both``, ``level`` and ``slope``. With ``bic`` or ``lwz`` the criterion
chooses among all (kind, m) pairs, each break counted as its changing coefficients plus its
date. With ``sequential`` (the default) the sequential sup-F(l+1|l) rule first gives a count m_k
within each kind, then the kind is the one with the lowest BIC at its own (kind, m_k) (ties:
fewer breaks, then the order both, level, slope), so the kind reported is the best one at the
count actually used, not at a count the tests then overrule.

``max_breaks=None`` (the default) searches up to ``DEFAULT_MAX_BREAKS`` breaks, fewer when the
series cannot hold that many regimes of the trimmed length (a note says so); an explicit number
is an upper limit the series must be long enough for (else an InputError naming --max-breaks).

Break-date intervals: Bai (1997) for ``level`` and ``both`` breaks, the likelihood-ratio profile
(Hansen, 2000) for kinks and wherever Bai's interval is known to fail (see ``_interval``: a
``both`` break that is mostly a kink, or a Bai interval that reaches both ends of the admissible
window). Each break says which method gave its interval. In robust mode (``serial_correlation=
"allow"``) every F statistic shown, the per-break F included, is scaled by ``robust_factor``.
Series of ``exact.PELT_LENGTH`` points or more (or ``method="pelt"``) are searched by PELT for
kind ``both`` (its break count is then PELT's, not chosen from a path); the tied kinds keep
their O(n) one-break scans, exact for one break and refined beyond.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
from scipy.stats import f as f_dist

from .. import ols
from ..design import TrendSpec
from ..errors import InputError, about, option, setting
from ..settings import DEFAULT_MAX_BREAKS, BreakSettings, Settings
from . import (calibrate, critical, cusum, chow, exact, intervals, kinks, long_search, select,
               wandering)
from .problem import KINDS, BreakProblem, build_problem
from .result import (Break, BreakSet, BreakTests, CusumSummary, Drift, EventTest, Segment,
                     SequentialStep, SupFTest)
from .search import PENALISED, KindPath, best_added_break, search_both, search_tied

CAUTION_TESTS = ("The tests assume serially uncorrelated errors; with autocorrelated "
                 "residuals they find breaks too often, so read p-values as indicative.")
NOTE_ROBUST = ("The tests allow for serially correlated errors: each F statistic is scaled by "
               "the residual variance over its long-run variance (Bartlett kernel, Andrews "
               "bandwidth, AR(1) prewhitening), both from the model without the break tested, "
               "so autocorrelation alone does not pass for a break.")
NOTE_WANDERING = ("The series wanders around its trend like a random walk (KPSS {kpss:.2f} above "
                  "its 5% value {crit:.3f}; residual AR(1) coefficient {ar1:.2f}): breaks in a "
                  "trend, their dates and the CUSUM drift are unreliable here, and extending "
                  "any trend is a guess; treat the breaks found as descriptive only.")
NOTE_CALIBRATED = ("Whether there is any break was tested against {r} simulated series of this "
                   "length, design and shortest regime, with the {kinds} kinds tried together, "
                   "so the 5% level holds for the whole search; the tests of further breaks use "
                   "the asymptotic table.")


def detect_breaks(series, settings: Settings | None = None, **choices) -> BreakSet:
    """Breaks in the trend of ``series``; see the module docstring for the flow.

    ``series``: a ``Series``, or a pandas Series or date/value DataFrame (read by intake).
    ``settings``: a ``Settings`` whose model and break parts are used; keyword ``choices`` set
    single fields, e.g. ``detect_breaks(s, kind="level", max_breaks=2)`` (see
    ``settings.ModelSettings`` and ``settings.BreakSettings`` for the fields and defaults,
    the same as the command line's).

    ``serial_correlation``: ``allow`` (default) makes the sup-F, sequential, per-break F and
    Chow tests, and the break-date intervals, robust to autocorrelated errors (see
    ``robust_factor``); ``ignore`` gives the classical tests, exact only for uncorrelated errors.

    ``max_breaks``: most breaks considered; ``None`` means up to ``DEFAULT_MAX_BREAKS``, capped
    at what the series holds given the trimming. ``criterion``: ``sequential`` (default; count by
    the sequential tests within each kind, kind by BIC at those counts), ``bic`` or ``lwz``.

    ``trim``: shortest regime, a share of the series (below 0.5) or a number of periods; the
    default lets the last regime be one seasonal cycle (``problem.default_min_length``).
    ``events``: dates (any form intake reads, or positions) tested by the Chow test.
    ``break_dates`` (or ``breaks=[...]``): the analyst's break dates, fitted instead of
    searched for (``breaks.given``).
    """
    from ..intake import as_series

    settings = Settings.coerce(settings, choices, ("model", "breaks"), "detect_breaks")
    series = as_series(series)
    return find_breaks(series, settings.spec_for(series), settings.breaks)


def find_breaks(series, spec: TrendSpec, options: BreakSettings) -> BreakSet:
    """``detect_breaks`` for a spec already resolved against ``series`` (one resolution per
    run: ``analyze`` and ``compare`` call this).

    The linear algebra here is many small tall-and-thin problems, which a multi-threaded BLAS
    only slows down (measured: a 3000 x 17 QR took 165 ms with threads on a busy two-core
    machine, 4 ms on one thread), so BLAS is held to one thread for the call when
    ``threadpoolctl`` is installed.
    """
    with _one_blas_thread():
        if options.break_dates:  # the analyst's dates: fitted there, no search
            from .given import given_breaks

            return given_breaks(series, spec, options)
        scale = _response_scale(series.values) if not spec.log_scale else 1.0
        if scale == 1.0:
            return _detect(series, spec, options.kind, options.max_breaks, options.trim,
                           options.criterion, options.events, options.seasonal_by_regime,
                           options.method, options.serial_correlation)
        scaled = dataclasses.replace(series, values=series.values / scale)
        found = _detect(scaled, spec, options.kind, options.max_breaks, options.trim,
                        options.criterion, options.events, options.seasonal_by_regime,
                        options.method, options.serial_correlation)
        return _rescaled(found, scale)


def find_break_positions(series, spec: TrendSpec, options: BreakSettings) -> tuple[int, ...]:
    """The break positions ``find_breaks`` gives, without the rest of its result (intervals,
    tests of each break, CUSUM, segments): what the rolling origin needs at every origin.

    With the sequential rule the tied kinds are searched only as deep as its tests reach (the
    paths beyond a test that does not reject cannot change any count, kind or position); other
    settings run ``find_breaks``. The positions are the same (``tests/test_origin_speed.py``
    compares the two on real series at every origin)."""
    with _one_blas_thread():
        scale = _response_scale(series.values) if not spec.log_scale else 1.0
        if scale != 1.0:  # positions do not change with the scale
            series = dataclasses.replace(series, values=series.values / scale)
        return _positions(series, spec, options)


def any_break_pvalue(series, spec: TrendSpec, options: BreakSettings) -> float | None:
    """A p-value of "no break" below the 5% level (``select.SEQUENTIAL_LEVEL``) exactly when
    the sup-F p-value of ``find_breaks`` is: what the verdict's stability reruns need of each
    shortened series (the rule reads that p-value only against the 5% level).

    Where the sequential tests decide and the first test is simulated, it is that test's
    p-value for a break of any kind searched (``Calibration.p_any``, the smallest adjusted
    p-value over the kinds): the search chooses a kind with breaks only when that kind's own
    first test rejects, and then reports that kind's p-value; with no kind rejecting it reports
    one of theirs, all at or above the level. Nothing else of the search runs. Elsewhere it is
    the sup-F p-value itself (as ``evaluate.breakinfo.supf_pvalue`` reads it)."""
    with _one_blas_thread():
        scale = _response_scale(series.values) if not spec.log_scale else 1.0
        if scale != 1.0:  # p-values do not change with the scale
            series = dataclasses.replace(series, values=series.values / scale)
        robust = options.serial_correlation == "allow"
        problem, M, _, long_series, kinds = _prepared(series, spec, options.kind,
                                                      options.max_breaks, options.trim,
                                                      options.seasonal_by_regime,
                                                      options.method)
        first = None
        if M > 0 and _tests_decide(problem, options.criterion, long_series) \
                and not options.events and not options.break_dates:
            first = _first_test(problem, kinds, robust, long_series)
        if first is not None:
            return first.p_any
        tests = _detect(series, spec, options.kind, options.max_breaks, options.trim,
                        options.criterion, options.events, options.seasonal_by_regime,
                        options.method, options.serial_correlation).tests
        p = None if tests is None or tests.supf is None else tests.supf.p_value
        return None if p is None or not math.isfinite(float(p)) else float(p)


_LIGHT_JOINT = True  # private switch: the full joint fits instead (the benchmark's baseline)


def _positions(series, spec, options: BreakSettings) -> tuple[int, ...]:
    kind, criterion = options.kind, options.criterion
    robust = options.serial_correlation == "allow"
    problem, M, _, long_series, kinds = _prepared(series, spec, kind, options.max_breaks,
                                                  options.trim, options.seasonal_by_regime,
                                                  options.method, light_joint=_LIGHT_JOINT)
    if not _tests_decide(problem, criterion, long_series) or options.events \
            or options.break_dates:
        found = _detect(series, spec, kind, options.max_breaks, options.trim, criterion,
                        options.events, options.seasonal_by_regime, options.method,
                        options.serial_correlation)
        return tuple(int(p) for p in found.positions)
    first = _first_test(problem, kinds, robust, long_series)
    if M == 0 or (first is not None and all(first.adjusted[k] >= select.SEQUENTIAL_LEVEL
                                            for k in kinds)):
        return ()  # no first test rejects: every kind's count is zero (nothing below raises)
    paths: dict[str, KindPath] = {}
    if "both" in kinds:  # searched only where some kind's first test rejects
        paths["both"] = search_both(problem, M, criterion, "exact")
    values, counts, _ = _as_deep_as_tested(problem, kinds, M, robust, first, paths)
    chosen_kind, m, _ = _pick_kind(problem, paths, values, counts, kinds, robust,
                                   kind == "auto")
    path = paths[chosen_kind]
    positions = tuple(path.positions[m]) if m < len(path.positions) else ()
    return tuple(int(p) for p in positions)


def _tests_decide(problem: BreakProblem, criterion: str, long_series: bool) -> bool:
    """The sequential tests decide the count of every kind (their p-values exist): then a tied
    kind need not be searched deeper than its tests go."""
    return criterion == "sequential" and not long_series and not problem.seasonal_by_regime


def _as_deep_as_tested(problem: BreakProblem, kinds, M: int, robust: bool, first, paths):
    """(criterion values, counts, sequential steps) per kind, in the order both, level, slope,
    with the tied kinds' paths (added to ``paths``) searched to one break, and to all ``M``
    only when the tests reject at every depth searched. The paths beyond a test that does not
    reject change no count, no kind and no position, so the choice is the full search's."""
    values, counts, steps_by_kind = {}, {}, {}
    for k in ("both",) + tuple(k for k in kinds if k != "both"):
        if k not in kinds:
            continue
        depth = min(M, 1)
        while True:
            if k != "both":
                starts = paths["both"].positions if "both" in paths else None
                paths[k] = search_tied(problem, k, depth, starts)
            values[k] = _criterion_values(problem, paths[k], "bic")
            counts[k], steps, _ = _sequential_count(problem, paths[k], values[k], M, robust,
                                                    first)
            steps_by_kind[k] = steps
            last = steps[-1].p_value if steps else None
            if k == "both" or depth >= M or last is None or not last < select.SEQUENTIAL_LEVEL:
                break
            depth = M  # the tests went as deep as the path: search it all
    return values, counts, steps_by_kind


def _response_scale(values) -> float:
    """A power of two (exact to divide by) that brings the largest |value| near 1, for values
    so large or small (beyond 1e+-100) that sums of squares would overflow or underflow: the
    search and the tests are scale-free, so the same series at any scale finds the same
    breaks. 1.0 otherwise (no rescaling, results bit for bit as before)."""
    top = float(np.max(np.abs(values))) if len(values) else 0.0
    if not (top > 0.0) or not math.isfinite(top) or 1e-100 <= top <= 1e100:
        return 1.0
    return math.ldexp(1.0, math.frexp(top)[1] - 1)


def _rescaled(found: BreakSet, scale: float) -> BreakSet:
    """Results of the series divided by ``scale`` back in the series' units (linear and
    quadratic shapes: levels, jumps, slopes and curvatures scale; F statistics, p-values and
    dates do not). SSRs scale by scale^2; BIC values shift by n ln(scale^2), LWZ by ln(scale^2)."""
    s2 = scale * scale  # may overflow to inf for values near 1e308: those SSRs are unrepresentable
    shift = (found.n if found.criterion != "lwz" else 1) * 2.0 * math.log(scale)
    breaks = tuple(dataclasses.replace(
        b, jump=b.jump * scale, jump_model=b.jump_model * scale,
        slope_change=b.slope_change * scale,
        curvature_change=None if b.curvature_change is None else b.curvature_change * scale)
        for b in found.breaks)
    segments = tuple(dataclasses.replace(
        g, level=g.level * scale, slope=g.slope * scale,
        curvature=None if g.curvature is None else g.curvature * scale)
        for g in found.segments)
    return dataclasses.replace(
        found, breaks=breaks, segments=segments,
        ssr_path=tuple(v * s2 for v in found.ssr_path),
        criterion_path=tuple(v + shift for v in found.criterion_path),
        criterion_paths={k: tuple(v + shift for v in p) for k, p in found.criterion_paths.items()})


_BLAS: list = []  # the threadpoolctl controller, found once per process (finding it costs ~1 ms)


def _one_blas_thread():
    import contextlib

    if not _BLAS:
        try:
            from threadpoolctl import ThreadpoolController
            _BLAS.append(ThreadpoolController())
        except ImportError:  # optional: without it BLAS keeps its own thread count
            _BLAS.append(None)
    if _BLAS[0] is None:
        return contextlib.nullcontext()
    return _BLAS[0].limit(limits=1, user_api="blas")


def robust_factor(residuals, enabled: bool = True) -> float:
    """Residual variance over long-run variance, min(1, gamma_0 / omega^2) (1 when disabled).

    With deterministic trend and seasonal regressors the autocorrelation-robust (HAC) Wald
    statistic of a coefficient change equals the classical one times gamma_0 / omega^2, so the
    sup-F limit distributions, and their table, apply unchanged (Bai and Perron, 1998, allow
    serial correlation this way; from memory). The factor is capped at 1: a noisy long-run
    variance below the residual variance would make the test more liberal than the classical
    one, and in 100-point simulations that doubled the false-break rate of white-noise series
    (``benchmarks/planted_breaks.py``)."""
    if not enabled:
        return 1.0
    e = np.asarray(residuals, dtype=float)
    lrv = ols.prewhitened_long_run_variance(e)
    g0 = float(e @ e) / max(e.size, 1)
    return min(1.0, g0 / lrv) if lrv > 0 and g0 > 0 else 1.0


def _prepared(series, spec, kind, M, trim, seasonal_by_regime, method, light_joint=False):
    """(problem, M, capped, long series, kinds): the break problem and the number of breaks
    searched, or an InputError when the series is too short for them."""
    problem = build_problem(series, spec, seasonal_by_regime, trim, light_joint)
    n, h = problem.n, problem.h
    capped = None
    if M is None:  # default: up to DEFAULT_MAX_BREAKS, as many as the series can hold
        M = min(DEFAULT_MAX_BREAKS, problem.most_breaks())
        capped = M if M < DEFAULT_MAX_BREAKS else None
    if n < max(2 * h, spec.minimum_points()):
        if trim is not None and n < 2 * h:
            raise InputError(f"{about('trim')}: regimes of at least {h} periods need a series of "
                             f"at least {2 * h}; the series has {n} (use a smaller "
                             f"{option('trim')})")
        raise InputError(f"the series has {n} periods; a break search on a {spec.describe()} "
                         f"needs at least {max(2 * h, spec.minimum_points())}")
    need = (M + 1) * h
    if n < need:  # here M >= 2 and n >= 2 h, so fewer breaks always fit
        most = max(n // h - 1, 0)
        smaller_trim = f" or a smaller {option('trim')}" if trim is not None else ""
        raise InputError(f"{about('max_breaks')}: {M} breaks with regimes of at least {h} "
                         f"periods need at least {need} periods; the series has {n} (use "
                         f"{setting('max_breaks', most)}{smaller_trim})")
    if M > problem.most_breaks():  # n == need, every regime exactly one season or shorter
        raise InputError(f"{about('max_breaks')}: {M} breaks in {n} periods leave every regime "
                         f"exactly {h} periods long, and regimes that short cannot be told from "
                         f"the {problem.spec.season_length}-period seasonal pattern (use "
                         f"{setting('max_breaks', problem.most_breaks())}, "
                         f"{setting('seasonality', 'none')} or a longer {option('trim')})")
    long_series = method == "pelt" or (method == "auto" and n >= exact.PELT_LENGTH)
    kinds = KINDS if kind == "auto" else (kind,)
    return problem, M, capped, long_series, kinds


def _detect(series, spec, kind, M, trim, criterion, events, seasonal_by_regime, method,
            serial_correlation) -> BreakSet:
    robust = serial_correlation == "allow"
    problem, M, capped, long_series, kinds = _prepared(series, spec, kind, M, trim,
                                                       seasonal_by_regime, method)
    n, h = problem.n, problem.h
    event_positions = [_event_position(series, e, h) for e in events]

    paths: dict[str, KindPath] = {}
    if "both" in kinds or kind == "auto":
        paths["both"] = search_both(problem, M, criterion,
                                    (method if method == "auto" else "pelt") if long_series
                                    else "exact")
    for k in kinds:
        if k != "both":
            starts = paths["both"].positions if "both" in paths else None
            paths[k] = search_tied(problem, k, M, starts)
    score_name = "lwz" if criterion == "lwz" else "bic"
    values = {k: _criterion_values(problem, p, score_name) for k, p in paths.items()}
    first = _first_test(problem, kinds, robust, long_series)
    seq_by_kind: dict[str, list[SequentialStep]] = {}
    seq_fallback = False
    counts = None
    if criterion == "sequential":
        counts = {}
        for k, p in paths.items():
            m_k, steps, fell_back = _sequential_count(problem, p, values[k], M, robust, first)
            counts[k], seq_by_kind[k] = m_k, steps
            seq_fallback = seq_fallback or fell_back
    chosen_kind, m, scores = _pick_kind(problem, paths, values, counts, kinds, robust,
                                        kind == "auto")
    close = _close_kinds(series, paths, values, counts, chosen_kind, m) \
        if kind == "auto" and score_name == "bic" else None
    path = paths[chosen_kind]
    positions = tuple(path.positions[m]) if m < len(path.positions) else ()
    if not positions:
        m = 0
    fit = problem.fit(chosen_kind, positions)
    seq_steps = (seq_by_kind[chosen_kind] if criterion == "sequential"
                 else _sequential(problem, chosen_kind, path, max(min(M, len(path.ssr) - 1), 1),
                                  robust, first))
    proven = bool(path.exact[m]) if m < len(path.exact) else False
    notes = [NOTE_ROBUST if robust else CAUTION_TESTS]
    if first is not None:
        notes.append(NOTE_CALIBRATED.format(r=first.replications,
                                            kinds=" and ".join(kinds)))
    if seq_fallback:
        notes.append("The sequential tests have no p-values for this model, so the number of "
                     "breaks was chosen by the BIC.")
    if problem.seasonal_by_regime:
        notes.append("Seasonal terms change with the regime: the sup-F table covers trend "
                     "changes only, so no p-value is given for it.")
    if path.method in PENALISED:
        how = ("PELT" if path.method == "pelt" else
               f"ruptures' bottom-up segmentation polished exactly (from {long_search.BOTTOM_UP_LENGTH} "
               f"periods, where it matched PELT's breaks several times faster)")
        notes.append(f"Series of {exact.PELT_LENGTH} periods or more are searched by {how} with "
                     f"a BIC-matched penalty; only that break count is evaluated.")
    if not proven and path.method not in PENALISED:
        if chosen_kind == "both":
            notes.append("Seasonal terms shared by the regimes: the breaks are the settled "
                         "point of the seasonal/trend back-and-forth (exact given the seasonal "
                         "pattern), not a proven joint optimum.")
        else:
            notes.append("More than two breaks of a tied kind: the break set is a local "
                         "optimum (one break moved at a time), not a proven global one.")
    if not path.settled:
        notes.append(f"The seasonal pattern and the breaks did not settle within "
                     f"{path.iterations} rounds; the last round is reported.")
    if h / n < 0.05 and first is None:
        notes.append("Short minimum regimes: the asymptotic sup-F table is rough there.")
    if close:
        notes.append(close)
    if capped is not None:
        notes.append(f"Up to {DEFAULT_MAX_BREAKS} breaks are searched by default; with regimes "
                     f"of at least {h} periods this series of {n} holds at most {capped}, so "
                     f"up to {capped} {'was' if capped == 1 else 'were'} searched.")
    one = problem.fit(chosen_kind, ()) if positions else None
    wander = wandering.assess(fit.residuals, fit.X, *((one.residuals, one.X) if one else ()))
    if wander.wandering:
        notes.append(NOTE_WANDERING.format(kpss=wander.kpss, crit=wander.kpss_critical,
                                           ar1=wander.ar1))
    rho = _lag1(fit.residuals)
    if wander.wandering:
        pass  # the wandering note says more than the autocorrelation note would
    elif rho > 0.3 and not robust:
        notes.append(f"Residuals are autocorrelated (lag-1 correlation {rho:.2f}): test sizes "
                     f"and break-date intervals are too optimistic.")
    elif rho > 0.3:
        notes.append(f"Residuals are autocorrelated (lag-1 correlation {rho:.2f}); the tests "
                     f"and break-date intervals allow for it, but the long-run variance "
                     f"correction is approximate in short samples.")
    breaks = tuple(_describe_break(series, problem, chosen_kind, positions, i, fit, robust)
                   for i in range(len(positions)))
    if kind == "auto" and counts is not None and robust and positions:
        breaks = _kind_uncertain_intervals(series, problem, paths, scores or values,
                                           counts, chosen_kind, m, breaks, robust)
    whole = [b.label for i, b in enumerate(breaks)
             if _spans(b.ci95, _admissible_window(problem, positions, i))]
    if whole:
        notes.append(f"The 95% interval of the break at {', '.join(whole)} spans every date the "
                     f"break could take between its neighbours: the data do not pin that date "
                     f"down.")
    tests = BreakTests(supf=_supf(problem, chosen_kind, seq_steps, first),
                       sequential=tuple(seq_steps),
                       chow=tuple(_chow(series, problem, chosen_kind, e, robust)
                                 for e in event_positions),
                       cusum=_cusums(problem))
    drift = _drift(series, tests.cusum)
    if not tests.cusum:
        notes.append("The trend without breaks fits the series exactly: there is no drift and "
                     "nothing for the CUSUM to test.")
    segments = tuple(_segment(series, problem, chosen_kind, positions, j, fit)
                     for j in range(len(positions) + 1))
    return BreakSet(spec=spec, n=n, kind=chosen_kind, kind_requested=kind,
                    criterion=criterion, criterion_path=tuple(values[chosen_kind]),
                    criterion_paths={k: tuple(v) for k, v in values.items()},
                    ssr_path=tuple(path.ssr), trim_periods=h, trim_share=h / n,
                    breaks=breaks, tests=tests, drift=drift, segments=segments,
                    positions=tuple(int(p) for p in positions), method=path.method,
                    exact=proven,
                    iterations=path.iterations, seasonal_by_regime=problem.seasonal_by_regime,
                    notes=tuple(notes), max_breaks=M, wandering=wander)


# -- choosing ----------------------------------------------------------------------------------
def _criterion_values(problem: BreakProblem, path: KindPath, score: str) -> list[float]:
    base, q = problem.base_count, problem.changing(path.kind)
    return select.criterion_path(path.ssr, problem.n, base, q, score,
                                 select.exact_fit_floor(problem.y))


def _pick_kind(problem, paths, values, counts, kinds, robust, auto: bool):
    """(kind, count, scores): with the automatic kind, robust tests and more than one kind
    finding breaks, the kind is chosen on quasi-differenced data (``scores``) and widened to a
    nesting kind when needed; otherwise by the criterion ``values`` (``scores`` empty)."""
    multi = auto and counts is not None and robust and \
        sum(1 for k in counts if counts[k] > 0) > 1
    if not multi:
        return (*_choose(values, kinds, counts), {})
    scores = _quasi_gls_scores(problem, paths, counts)
    chosen_kind, m = _choose(scores, kinds, counts)
    chosen_kind, m = _nesting_kind_if_needed(problem, paths, scores, counts, chosen_kind, m,
                                             robust)
    return chosen_kind, m, scores


def _choose(values: dict, kinds, counts: dict | None = None) -> tuple[str, int]:
    """(kind, m) with the smallest criterion; ties go to fewer breaks, then to the order
    both, level, slope.

    Without ``counts`` each kind is scored at its own best m (the BIC and LWZ criteria). With
    ``counts`` (kind -> m_k, the sequential rule's count within that kind) each kind is scored
    at (kind, m_k) only, so the kind chosen is the best one at the count actually used; kinds
    whose tests found a break are preferred to those that found none.

    No nesting kind overrides a narrower kind with the lower BIC: measured on kinks of 0.1
    sigma a period at n = 100, choosing ``both`` whenever it was within 2 BIC points put a
    spurious jump beside the kink and the break-date intervals covered the true date in only
    40-55% of series. A near tie is reported instead (``_close_kinds``)."""
    best = None
    found = counts is not None and any(int(counts[k]) > 0 for k in counts if k in kinds)
    for k in ("both", "level", "slope"):
        if k not in values or k not in kinds:
            continue
        v = np.asarray(values[k], dtype=float)
        m = select.best_count(v) if counts is None else min(int(counts[k]), v.size - 1)
        if found and m == 0:
            continue
        if best is None or v[m] < best[2] - 1e-9 * abs(best[2]) or \
                (abs(v[m] - best[2]) <= 1e-9 * abs(best[2]) and m < best[1]):
            best = (k, m, float(v[m]))
    if best is None or best[1] == 0:
        return (best[0] if best else kinds[0]), 0
    return best[0], best[1]


CLOSE_BIC = 2.0


UNION_BIC = 10.0


def _kind_uncertain_intervals(series, problem: BreakProblem, paths, scores, counts, chosen: str,
                              m: int, breaks, robust: bool):
    """Break-date intervals that carry the uncertainty about the kind: each break's interval
    is widened to cover the interval of the nearest break of every other kind whose test found
    breaks, whose score at its own count is within ``UNION_BIC`` of the chosen kind's, and
    whose date lies outside the chosen interval (kinds that agree on the date add nothing).

    Why: with autocorrelated errors a level shift and a kink are hard to tell apart (for a kink
    of 0.1 sigma a period at n = 100 and AR(1) errors with rho 0.3 the BIC preferred a jump,
    often decades away, in about a quarter of series), and an interval conditional on the
    wrong kind misses the date: coverage under kind ``auto`` was 40-67%. A BIC difference
    above 10 is "very strong" evidence for the chosen kind (Kass and Raftery, 1995; from
    memory); below it the other kind's dates stay in the interval."""
    chosen_value = scores[chosen][m]
    out = list(breaks)
    for k in ("both", "level", "slope"):
        if k == chosen or k not in paths or not counts.get(k):
            continue
        m_k = min(int(counts[k]), len(paths[k].positions) - 1)
        if not scores[k][m_k] - chosen_value < UNION_BIC:
            continue
        alt = tuple(paths[k].positions[m_k])
        fit_k = problem.fit(k, alt)
        own = [b.position for b in out]
        for j, a in enumerate(alt):
            i = int(np.argmin([abs(a - p) for p in own]))  # the chosen break it stands for
            brk = out[i]
            if brk.ci95[0] <= a <= brk.ci95[1]:
                continue  # the kinds agree on the date: the interval already holds it
            other = _describe_break(series, problem, k, alt, j, fit_k, robust)
            window = _admissible_window(problem, own, i)
            ci90 = _widened(brk.ci90, other.ci90, window)
            ci95 = _widened(brk.ci95, other.ci95, window)
            if ci95 == brk.ci95 and ci90 == brk.ci90:
                continue
            widened = brk.interval_method.split(", widened for the ")
            kinds_named = widened[1].split(" kind")[0].split(" and ") if len(widened) > 1 else []
            label = " and ".join(kinds_named + [k])
            out[i] = dataclasses.replace(
                brk, ci90=ci90, ci95=ci95,
                ci90_dates=(series.iso(ci90[0]), series.iso(ci90[1])),
                ci95_dates=(series.iso(ci95[0]), series.iso(ci95[1])),
                interval_method=f"{widened[0]}, widened for the {label} kind"
                                f"{'s' if kinds_named else ''} (close in fit)")
    return tuple(out)


def _widened(interval, other, window) -> tuple[int, int]:
    """``interval`` stretched to cover ``other`` but not past the break's admissible window
    (its neighbours with their shortest regimes): a date interval that reached over the next
    break would put the two breaks out of order (seen on base-R JohnsonJohnson, whose first
    break's interval ran past its second break)."""
    lo = min(interval[0], max(other[0], window[0]))
    hi = max(interval[1], min(other[1], window[1]))
    return lo, hi


def _quasi_gls_scores(problem: BreakProblem, paths, counts) -> dict:
    """BIC of each kind at its own count m_k, from the quasi-differenced fit (Prais-Winsten,
    first observation scaled by sqrt(1 - rho^2)) with rho the bias-corrected AR(1) coefficient
    of the residuals of the widest model found (``both`` at its count, else the largest
    count). Ordinary SSRs let a level shift pass for a kink (or the reverse) whenever the
    errors wander a little: with AR(1) errors (rho 0.3) and a kink of 0.1 sigma a period at
    n = 100 the ordinary BIC preferred a jump in 4 of 30 series, often decades from the kink;
    on quasi-differences the comparison weighs each kind by the local evidence. Only the kind
    choice uses these scores; the counts are the sequential tests'. Other m get inf."""
    widest = "both" if counts.get("both") else max(counts, key=lambda k: counts[k])
    m_w = min(int(counts[widest]), len(paths[widest].positions) - 1)
    ref = problem.fit(widest, paths[widest].positions[m_w])
    rho = ols.residual_ar1(ref.residuals, ols.smooth_columns(ref.X))
    rho = min(max(rho, 0.0), 0.9)
    n = problem.n
    y = problem.y
    out = {}
    for k, path in paths.items():
        m_k = min(int(counts[k]), len(path.positions) - 1)
        X = problem.design(k, path.positions[m_k])
        yq = np.r_[math.sqrt(1 - rho * rho) * y[0], y[1:] - rho * y[:-1]]
        Xq = np.vstack([math.sqrt(1 - rho * rho) * X[:1], X[1:] - rho * X[:-1]])
        try:
            ssr = ols.residual_sum_of_squares(Xq, yq)
        except ols.RankDeficient:
            ssr = math.inf
        p = select.parameter_count(problem.base_count, problem.changing(k), m_k)
        row = [math.inf] * len(path.ssr)
        row[m_k] = select.bic(max(ssr, select.exact_fit_floor(yq)), n, p)
        out[k] = row
    return out


def _nesting_kind_if_needed(problem: BreakProblem, paths, values, counts, chosen: str, m: int,
                            robust: bool) -> tuple[str, int]:
    """``both`` instead of the narrower kind chosen when the two are a near tie (BIC within
    ``CLOSE_BIC``), put the breaks at different dates, and the coefficients ``both`` adds (the
    jumps beside kinks, or the slope changes beside jumps) are significant at 5% at the
    narrower kind's dates: an F test of the narrower kind against ``both`` with the same break
    dates (nested models), scaled like the other tests in robust mode. A kink fitted to a break that also
    jumps misdates it; a spurious jump beside a true kink is rejected by this test in about 95%
    of series, so it no longer takes the kink's interval away."""
    if chosen == "both" or m == 0 or "both" not in paths or not counts.get("both"):
        return chosen, m
    m_b = min(int(counts["both"]), len(values["both"]) - 1)
    where = tuple(paths["both"].positions[m_b]) if m_b else ()
    own = tuple(paths[chosen].positions[m])
    if not where or where == own or not values["both"][m_b] - values[chosen][m] < CLOSE_BIC:
        return chosen, m
    # at the narrower kind's own dates: at both's dates, chosen to fit the extra terms best,
    # the test would find them significant far too often (measured: 11 of 30 pure kinks)
    wide, narrow = problem.fit("both", own), problem.fit(chosen, own)
    extra = wide.k - narrow.k
    stat = select.f_statistic(narrow.ssr, wide.ssr, extra, problem.n, wide.k,
                              select.exact_fit_floor(problem.y))
    if robust and math.isfinite(stat) and stat > 0:
        stat *= robust_factor(narrow.residuals)
    if math.isnan(stat) or extra <= 0:
        return chosen, m
    p = 0.0 if math.isinf(stat) else float(f_dist.sf(stat, extra, problem.n - wide.k))
    return ("both", m_b) if p < select.SEQUENTIAL_LEVEL else (chosen, m)


def _close_kinds(series, paths, values, counts, chosen: str, m: int) -> str | None:
    """A note when another kind's BIC, at the count it would use, is within ``CLOSE_BIC`` of
    the chosen one and places the breaks elsewhere: the dates and their intervals are then
    conditional on a kind the data barely prefer. A BIC difference below 2 is "not worth more
    than a bare mention" (Kass and Raftery, 1995; from memory)."""
    chosen_value = values[chosen][m]
    chosen_labels = [series.label(p) for p in paths[chosen].positions[m]] if m else []
    for k in ("both", "level", "slope"):
        if k == chosen or k not in values:
            continue
        m_k = select.best_count(values[k]) if counts is None else counts[k]
        m_k = min(int(m_k), len(values[k]) - 1)
        if not math.isfinite(values[k][m_k]) or values[k][m_k] - chosen_value >= CLOSE_BIC:
            continue
        labels = [series.label(p) for p in paths[k].positions[m_k]] if m_k else []
        if labels == chosen_labels:
            continue
        where = ", ".join(labels) if labels else "no break"
        return (f"Breaks of kind {k} fit almost as well (BIC {values[k][m_k] - chosen_value:.2f} "
                f"higher, below {CLOSE_BIC:g}) and give {where}: the break dates and their "
                f"intervals hold for the {chosen} kind chosen; run --kind {k} to compare.")
    return None


def _first_test(problem: BreakProblem, kinds, robust: bool, long_series: bool
                ) -> calibrate.Calibration | None:
    """The simulated first test (``calibrate``), or None where the asymptotic table is used:
    seasonal terms by regime (no p-values), PELT and series longer than
    ``calibrate.MAX_LENGTH`` (asymptotics hold there)."""
    if problem.seasonal_by_regime or long_series or problem.n > calibrate.MAX_LENGTH:
        return None
    return calibrate.calibrate(problem.y, problem.base, kinds, problem.degree, problem.h,
                               robust, select.SEQUENTIAL_LEVEL)


def _sequential_count(problem: BreakProblem, path: KindPath, values, M: int, robust: bool,
                      first: calibrate.Calibration | None = None
                      ) -> tuple[int, list[SequentialStep], bool]:
    """The sequential rule within one kind: (m_k, its sup-F(l+1|l) steps, fell back to BIC).

    Where the tests have no p-values (seasonal terms by regime) the kind's BIC count is used;
    a PELT path knows only m = 0 and PELT's own count, so the BIC chooses between those two."""
    steps = _sequential(problem, path.kind, path, M, robust, first)
    if path.method in PENALISED:
        return select.best_count(values), steps, False
    if steps and steps[0].p_value is None:
        return select.best_count(values), steps, True
    m = min(select.sequential_count([st.p_value for st in steps]), len(path.ssr) - 1)
    return m, steps, False


def _sequential(problem: BreakProblem, kind: str, path: KindPath, M: int, robust: bool = True,
                first: calibrate.Calibration | None = None) -> list[SequentialStep]:
    """sup-F(l+1|l) for l = 0.. until a test does not reject (or M is reached).

    l = 0 is the simulated first test when ``first`` is given (its p-value adjusted for the
    kinds tried together). In robust mode each statistic is scaled by ``robust_factor`` of the
    residuals of the model with l breaks, the model under the test's null hypothesis: the
    residuals of the model with the added break soak up low-frequency autocorrelation, which
    measured 8-14% false breaks at 5% for AR(1) errors with rho 0.3-0.6 at n = 100."""
    steps = []
    q = problem.changing(kind)
    key = problem.model_key(kind)
    share = problem.h / problem.n
    for l in range(0, M):
        if l >= len(path.positions) or (l > 0 and not path.positions[l]):
            break
        pos = path.positions[l]
        if l == 0 and first is not None and kind in first.statistics:
            where = path.positions[1][0] if len(path.positions) > 1 and path.positions[1] \
                else first.positions[kind]
            p = first.adjusted[kind]
            steps.append(SequentialStep(0, first.statistics[kind], p, int(where)))
            if p >= select.SEQUENTIAL_LEVEL:
                break
            continue
        shared = problem.seasonal is not None and not problem.seasonal_by_regime
        season_from = tuple(pos) if kind == "both" and shared else None
        before, after, where = best_added_break(problem, kind, pos, season_from)
        if where is None:
            break
        k_large = problem.base_count + (l + 1) * q
        stat = select.f_statistic(before, after, q, problem.n, k_large,
                                  select.exact_fit_floor(problem.y))
        if robust and math.isfinite(stat) and stat > 0:
            null = problem.both_summary(pos) if kind == "both" and \
                not problem.seasonal_by_regime else problem.fit(kind, pos)
            stat *= robust_factor(null.residuals)
        p = None
        if not problem.seasonal_by_regime and not math.isnan(stat):
            p = 0.0 if math.isinf(stat) else \
                critical.sequential_pvalue(stat, key, min(max(share, 1e-3), 0.49), l)
        steps.append(SequentialStep(l, stat, p, where))
        if p is None or p >= select.SEQUENTIAL_LEVEL:
            break
    return steps


def _supf(problem: BreakProblem, kind: str, steps, first: calibrate.Calibration | None = None
          ) -> SupFTest:
    """sup-F of the chosen kind: with ``first``, its simulated p-value (adjusted for the kinds
    tried together) and the simulated 95% critical value of that kind alone."""
    key = problem.model_key(kind)
    share = min(max(problem.h / problem.n, 1e-3), 0.49)
    if not steps:
        return SupFTest(math.nan, None, None, key, problem.h / problem.n)
    stat = steps[0].statistic
    if first is not None and kind in first.critical95:
        return SupFTest(stat, steps[0].p_value, first.critical95[kind], key,
                        problem.h / problem.n)
    crit = None if problem.seasonal_by_regime else critical.supf_critical(key, share, 0.95)
    p = steps[0].p_value  # the first sequential step is sup-F(1|0)
    return SupFTest(stat, p, crit, key, problem.h / problem.n)


# -- describing --------------------------------------------------------------------------------
def _describe_break(series, problem: BreakProblem, kind: str, positions, i: int, fit,
                    robust: bool = True) -> Break:
    b = positions[i]
    new = problem.trend_poly(fit, kind, positions, i + 1)
    old = problem.trend_poly(fit, kind, positions, i)
    jump_model = float(new(b) - old(b))
    slope_new = float(new(b + 1) - new(b - 1)) / 2.0 if problem.degree == 2 else \
        float(new(b + 1) - new(b))
    slope_old = float(old(b + 1) - old(b - 1)) / 2.0 if problem.degree == 2 else \
        float(old(b + 1) - old(b))
    # exact derivative at b for the quadratic: central difference is exact for a parabola
    log = problem.spec.log_scale
    jump = float(math.exp(new(b)) - math.exp(old(b))) if log else jump_model
    slope_pct = (100.0 * (math.exp(slope_new) - math.exp(slope_old))) if log else None
    curv = None
    if problem.degree == 2:
        curv = float((new(b + 1) - 2 * new(b) + new(b - 1)) - (old(b + 1) - 2 * old(b) + old(b - 1))
                     ) / 2.0
    if kind == "level":  # a jump with a shared trend: no change of slope or curvature by
        slope_old = slope_new  # construction (the differences are rounding, e.g. -1e-13)
        slope_pct = 0.0 if log else None
        curv = 0.0 if curv is not None else None
    elif kind == "slope":  # a kink: the trend is continuous, no jump by construction
        jump_model = jump = 0.0
    kink = kind == "both" and mostly_kink(new, old, b, problem.h)
    ci, method = _interval(problem, kind, positions, i, fit, robust, kink)
    f_stat = _partial_f(problem, kind, positions, i, fit, robust)
    iso = lambda p: series.iso(int(p))
    return Break(position=int(b), date=series.iso(b), label=series.label(b),
                 ci90=ci[0.90], ci95=ci[0.95],
                 ci90_dates=(iso(ci[0.90][0]), iso(ci[0.90][1])),
                 ci95_dates=(iso(ci[0.95][0]), iso(ci[0.95][1])),
                 interval_method=method, jump=jump, jump_model=jump_model,
                 slope_change=slope_new - slope_old, slope_change_pct=slope_pct,
                 curvature_change=curv, f_statistic=f_stat)


def _admissible_window(problem: BreakProblem, positions, i: int) -> tuple[int, int]:
    """First and last position break i could take with its neighbours fixed (trimming kept)."""
    h = problem.h
    lo = positions[i - 1] + h if i > 0 else h
    hi = positions[i + 1] - h if i + 1 < len(positions) else problem.n - h
    return lo, hi


def _spans(interval, window) -> bool:
    """The interval reaches both ends of the window."""
    return interval[0] <= window[0] and interval[1] >= window[1]


KINK_SHARE = 0.5
BAI = "Bai (1997)"
PROFILE = "likelihood-ratio profile (Hansen, 2000)"


def mostly_kink(new, old, b: int, h: int) -> bool:
    """A break whose trend change at its own date is small against its change nearby.

    With d(j) = new(b + j) - old(b + j) the change of the trend polynomial j periods from the
    break (Delta' x_t without the seasonal terms), the break is mostly a kink when
    |d(0)| < KINK_SHARE * max |d(j)| over |j| <= h, h the shortest regime. For a linear trend
    that is |jump| < |slope change| * h: within one shortest regime the slope change moves the
    trend further than the jump did. Bai's (1997) limit then fails: it needs a change of about
    constant size near the break, and a change that grows from near zero makes the local
    moments, and the interval, meaningless (the interval can cover every admissible date)."""
    j = np.arange(-h, h + 1, dtype=float)
    d = np.abs(np.asarray(new(b + j), dtype=float) - np.asarray(old(b + j), dtype=float))
    top = float(d.max())
    return top > 0.0 and float(d[h]) < KINK_SHARE * top


def _interval(problem: BreakProblem, kind: str, positions, i: int, fit, robust: bool = True,
              kink: bool = False):
    """90% and 95% intervals of break i and the method that gave them.

    Kinks (``slope``) get the likelihood-ratio profile (Hansen, 2000), where Bai's result does
    not apply. ``level`` and ``both`` breaks get Bai (1997) unless one of these holds, in which
    case the profile is used as well:

    - the break is mostly a kink (``kink``, see ``mostly_kink``);
    - Bai's 95% interval reaches both ends of the admissible window (``_admissible_window``),
      i.e. it carries no information about the date; the profile of the SSR over the break's
      position does, when the data hold any;
    - the pair of regimes around the break cannot carry Bai's local fit (two regimes of
      exactly one seasonal cycle make a step collinear with trend and seasons);
    - seasonal terms change with the regime (Bai's form here covers trend changes only)."""
    n = problem.n
    cuts = [0, *positions, n]
    a, b, c = cuts[i], cuts[i + 1], cuts[i + 2]
    if kind != "slope" and not problem.seasonal_by_regime and not kink:
        changing = [0] if kind == "level" else list(range(problem.trend.shape[1]))
        try:
            # Within the regime pair [a, c) only this break changes the coefficients.
            ci = intervals.break_interval(problem.y, problem.base, b, a, c, changing,
                                          (0.90, 0.95), autocorrelated=robust)
        except InputError:
            ci = None
        if ci is not None and not _spans(ci[0.95], _admissible_window(problem, positions, i)):
            return ci, BAI
    return _profile_interval(problem, kind, positions, i, fit, robust), PROFILE


def _profile_interval(problem: BreakProblem, kind: str, positions, i: int, fit,
                      robust: bool = True):
    terms = problem.terms(kind)
    others = list(positions[:i]) + list(positions[i + 1:])
    lo, hi = _admissible_window(problem, positions, i)
    memo = problem.scans(kind)
    _, _, cand, prof = kinks.best_single(problem.y, problem.base, terms, lo, hi, others,
                                         memo.pair_memo, memo.base)
    # With autocorrelated errors the SSR profile is scaled by the long-run variance
    # (the eta^2 scaling of Hansen's likelihood ratio), which widens the set.
    sigma2 = fit.ssr / max(fit.df_resid, 1) / robust_factor(fit.residuals, robust)
    if fit.ssr <= select.exact_fit_floor(problem.y):  # exact fit: the date is exact too
        return {0.90: (positions[i], positions[i]), 0.95: (positions[i], positions[i])}
    return intervals.profile_interval(prof, cand, sigma2, (0.90, 0.95))


def _partial_f(problem: BreakProblem, kind: str, positions, i: int, fit, robust: bool = True
               ) -> float:
    """F statistic of break i given the others: (SSR without it - SSR) / q over s^2.

    In robust mode it is scaled by ``robust_factor`` of the residuals of the model without
    this break (its null model), as the sup-F and sequential statistics are, so the three read
    on the same scale."""
    others = list(positions[:i]) + list(positions[i + 1:])
    restricted = problem.fit(kind, others)
    q = problem.changing(kind)
    stat = select.f_statistic(restricted.ssr, fit.ssr, q, problem.n, fit.k,
                              select.exact_fit_floor(problem.y))
    if robust and math.isfinite(stat) and stat > 0:
        stat *= robust_factor(restricted.residuals)
    return stat


def _segment(series, problem: BreakProblem, kind: str, positions, j: int, fit) -> Segment:
    cuts = [0, *positions, problem.n]
    a, b = cuts[j], cuts[j + 1]
    f = problem.trend_poly(fit, kind, positions, j)
    v0, v1, v2 = float(f(a)), float(f(a + 1)), float(f(a + 2))
    curv = (v2 - 2 * v1 + v0) / 2.0 if problem.degree == 2 else None
    slope = (v1 - v0 - curv) if curv is not None else (v1 - v0)
    log = problem.spec.log_scale
    return Segment(start=a, end=b - 1, n=b - a, start_date=series.iso(a),
                   end_date=series.iso(b - 1), start_label=series.label(a),
                   end_label=series.label(b - 1),
                   level=math.exp(v0) if log else v0, slope=slope,
                   growth_pct=100.0 * (math.exp(slope) - 1.0) if log else None,
                   curvature=curv)


def _lag1(e: np.ndarray) -> float:
    e = np.asarray(e, dtype=float)
    d = float(e @ e)
    return float(e[1:] @ e[:-1]) / d if d > 0 else 0.0


# -- events, Chow and CUSUM --------------------------------------------------------------------
def _event_position(series, event, h: int) -> tuple[str, int]:
    """Position of the period containing ``event``; clear errors outside or in the edges."""
    n = series.n
    text = str(event)
    if isinstance(event, (int, np.integer)) and not isinstance(event, bool):
        p = int(event)
        if not 0 <= p < n:
            raise InputError(f"{about('events')}: position {p} is outside the series (0..{n - 1})")
    else:
        d = _parse_date(text)
        if d is None:
            raise InputError(f"{about('events')}: {text!r} is not a date")
        end = series.start_of(n)  # start of the period after the last
        if d < series.starts[0] or d >= end:
            raise InputError(f"{about('events')}: {text} is outside the series "
                             f"({series.label(0)} to {series.label(n - 1)})")
        p = int(np.searchsorted(series.starts, d, side="right")) - 1
    if p < h or p > n - h:
        raise InputError(f"{about('events')}: {text} ({series.label(p)}) is inside the trimmed "
                         f"edge; a tested break needs at least {h} periods on each side "
                         f"({series.label(h)} to {series.label(n - h)})")
    return text, p


def _parse_date(text: str):
    from ..intake import parse_date

    got = parse_date(text)
    if got is not None:
        return got
    import pandas as pd

    try:
        return np.datetime64(pd.Timestamp(text).date(), "D")
    except (ValueError, TypeError):
        return None


def _chow(series, problem: BreakProblem, kind: str, event, robust: bool = True) -> EventTest:
    """Chow test at the event, with the chosen kind's changing terms (kinks: hinge form)."""
    text, p = event
    T = problem.trend
    fixed_parts = [problem.seasonal] if problem.seasonal is not None else []
    if kind == "level":
        Xc, fixed_parts = T[:, :1], [T[:, 1:]] + fixed_parts
    elif kind == "slope":
        t = np.arange(problem.n, dtype=float) - p
        Xc = np.column_stack([t ** k for k in range(1, problem.degree + 1)])
        fixed_parts = [T[:, :1]] + fixed_parts
    else:
        Xc = T
    Xf = np.hstack(fixed_parts) if fixed_parts else None
    r = chow.chow_test(problem.y, Xc, Xf, p)
    stat, p_value = r["statistic"], r["p_value"]
    if robust and math.isfinite(stat) and stat > 0:
        after = (np.arange(problem.n) >= p).astype(float)[:, None]
        parts = [Xc, Xc * after] + ([Xf] if Xf is not None else [])
        stat *= robust_factor(ols.fit(np.hstack(parts), problem.y).residuals)
        p_value = float(f_dist.sf(stat, r["df1"], r["df2"]))
    return EventTest(event=text, position=p, date=series.iso(p), label=series.label(p),
                     statistic=stat, p_value=p_value, df1=r["df1"], df2=r["df2"])


def _cusums(problem: BreakProblem) -> tuple[CusumSummary, ...]:
    """Both CUSUM paths of the global trend; none when that trend fits exactly (a constant or
    a straight line): its residuals are rounding noise and a CUSUM of them, scaled by their
    own tiny spread, would "find" drift with any p-value (1.5e-52 was seen on a constant)."""
    X = problem.base
    try:
        null = ols.fit(X, problem.y)
    except ols.RankDeficient:
        return ()
    if null.ssr <= select.exact_fit_floor(problem.y):
        return ()
    out = []
    for name, fn in (("recursive", cusum.recursive_cusum), ("ols", cusum.ols_cusum)):
        try:
            c = fn(problem.y, X, 0.95)
        except InputError:
            continue
        out.append(CusumSummary(name, c.statistic, c.p_value, c.first_crossing))
    return tuple(out)


_CUSUM_NAMES = {"recursive": "CUSUM of recursive residuals (Brown, Durbin and Evans, 1975)",
                "ols": "OLS-based CUSUM (Ploberger and Kramer, 1992)"}


def _drift(series, cusums) -> Drift | None:
    """Where the global trend started to drift: the first period where the CUSUM of its
    recursive residuals leaves the 5% band.

    The recursive residuals are one-step-ahead errors of the trend fitted on the history up to
    each period, so their CUSUM dates the first period the trend known so far stopped
    forecasting well. The OLS-based CUSUM cumulates residuals of the fit to all data, which a
    late break bends from the start, so its crossing says little about when: it is used only
    when the recursive path stays inside its band."""
    by_method = {c.method: c for c in cusums if c.first_crossing is not None}
    for method in ("recursive", "ols"):
        if method in by_method:
            p = int(by_method[method].first_crossing)
            return Drift(p, series.iso(p), series.label(p), _CUSUM_NAMES[method])
    return None
