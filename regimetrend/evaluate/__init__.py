"""Evaluation: do regime-aware forecasts beat one global trend on data they did not see?

``compare`` runs a leak-free rolling origin over every candidate (each strategy with each shape),
scores them in original units, tests each against the global trend (Diebold-Mariano with the
HLN correction), applies the written-down recommendation rule, decides how much history to keep
and diagnoses the global trend's late failure. See the submodules for each step's rule.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..cautions import JUDGEMENT
from ..design import SHAPES, TrendSpec
from ..errors import InputError, about
from ..forecast import fit_history
from ..regimes import (Strategy, minimum_window, standard_strategies, window_rule_grid,
                       window_spacing)
from ..settings import DEFAULT_MAX_BREAKS, BreakSettings, Settings
from . import breakinfo, redetect
from .accuracy_tests import compare_errors
from .diagnosis import default_window, diagnose
from .history import IN_SAMPLE, decide_history
from .recommend import recommend
from .result import (OPTIMISTIC_NOTE, CandidateResult, Evaluation, json_clean)
from .rolling import plan_origins, run_rolling
from .scores import candidate_scores

__all__ = ["Evaluation", "compare", "evaluate"]


_PLAIN_ORIGINS = False  # benchmarks only: the whole break search at every origin (same result)


def history_breaks(history, spec: TrendSpec, options: BreakSettings, *, lean: bool = False):
    """The break search on the history known at an origin: the analyst's events are left out
    (they are Chow-tested on the full series only and do not move the breaks) and the number of
    breaks is capped at what this shorter history can hold. ``lean``: see ``find_breaks``."""
    from ..breaks.detect import find_breaks
    from ..breaks.problem import resolve_trim

    if options.break_dates:  # the analyst's dates known in this history, no search
        from ..breaks.given import given_breaks

        return given_breaks(history, spec, dataclasses.replace(options, events=()), within=True)
    m = DEFAULT_MAX_BREAKS if options.max_breaks is None else options.max_breaks
    by_regime = options.seasonal_by_regime and spec.seasonality == "dummies"
    h = resolve_trim(options.trim, history.n, spec, by_regime)
    m = max(0, min(m, history.n // max(h, 1) - 1))
    return find_breaks(history, spec, dataclasses.replace(options, events=(), max_breaks=m),
                       lean=lean)


def history_positions(history, spec: TrendSpec, options: BreakSettings) -> tuple[int, ...]:
    """The positions of ``history_breaks`` (same settings, same cap on the number of breaks),
    found without the rest of the break result (``breaks.detect.find_break_positions``)."""
    from ..breaks.detect import find_break_positions
    from ..breaks.problem import resolve_trim

    if options.break_dates:
        return breakinfo.positions(history_breaks(history, spec, options))
    m = DEFAULT_MAX_BREAKS if options.max_breaks is None else options.max_breaks
    by_regime = options.seasonal_by_regime and spec.seasonality == "dummies"
    h = resolve_trim(options.trim, history.n, spec, by_regime)
    m = max(0, min(m, history.n // max(h, 1) - 1))
    found = find_break_positions(history, spec,
                                 dataclasses.replace(options, events=(), max_breaks=m))
    return tuple(sorted(found))


def given_at_origin(full, spec: TrendSpec, options: BreakSettings):
    """``breaks_at(o)`` for the analyst's dates: at origin ``o`` the given dates inside the
    history known then with a shortest regime on each side (the trim resolved on that history,
    as a search there would). No search, and no leak: the dates were given in advance."""
    from ..breaks.problem import resolve_trim

    by_regime = options.seasonal_by_regime and spec.seasonality == "dummies"
    dates = breakinfo.positions(full)

    def at(o):
        h = resolve_trim(options.trim, o, spec, by_regime)
        return tuple(b for b in dates if h <= b <= o - h)
    return at


def duplicates(table, count: int) -> dict:
    """Candidates (among the first ``count``) whose forecasts and intervals equal an earlier
    one's at every origin, e.g. a truncated fit from an earlier break when only one break was
    found: {index: index of the earlier candidate}. They are left out of the ranking."""
    same = {}
    arrays = (table.forecast, table.lower80, table.upper80, table.lower95, table.upper95)
    for i in range(count):
        for j in range(i):
            if j in same:
                continue
            if all(np.allclose(a[i], a[j], rtol=1e-12, atol=0.0) for a in arrays):
                same[i] = j
                break
    return same


def _event_positions(full, events) -> list[tuple[int, str]]:
    """(position, label) of each event, as the full-sample search placed it."""
    if not events or full is None or full.tests is None:
        return []
    return [(int(c.position), c.label) for c in full.tests.chow]


def _origin_breaks(series, plan, full, spec: TrendSpec, options: BreakSettings,
                   reuse_breaks: bool, m_top: int):
    """``breaks_at(o)`` for every origin, and the list of origins whose search failed."""
    failed: list[int] = []
    if options.break_dates:
        return given_at_origin(full, spec, options), failed
    if reuse_breaks:
        full_positions = breakinfo.positions(full)
        return (lambda o: tuple(b for b in full_positions if b < o)), failed
    if redetect.shared_table_applies(options.kind, spec, options.seasonal_by_regime,
                                     options.criterion, series.n):
        table = redetect.origin_breaks(series, plan.origins, spec, m_top, options.trim,
                                       options.criterion, options.seasonal_by_regime)

        def from_table(o):
            if table[o] is None:
                failed.append(o)  # too little history for a search here: no breaks known
                return ()
            return table[o]
        return from_table, failed

    def search(o):
        try:
            if _PLAIN_ORIGINS:
                return breakinfo.positions(history_breaks(series.head(o), spec, options))
            return history_positions(series.head(o), spec, options)
        except InputError:
            failed.append(o)  # too little history for a search here: no breaks known
            return ()
    return search, failed


def compare(series, settings: Settings | None = None, *, shapes=None, window_count: int = 10,
            progress=None, **choices) -> Evaluation:
    """Rolling-origin comparison of every candidate against the global trend of the analyst's
    shape.

    ``series``: a ``Series``, or a pandas Series or date/value DataFrame (read by intake).
    ``settings`` (a ``Settings``) and keyword ``choices`` (its flat fields, e.g.
    ``compare(s, shape="exponential", horizon=6)``) hold the model, break and evaluation
    choices, with the same defaults as ``analyze`` and the command line. ``shape`` sets the
    reference (global) trend, the break search and the history sweep; ``shapes`` (default all
    three, exponential only for positive series) are the shapes every strategy is tried with.
    ``window_count`` is the number of window lengths the window average tries;
    ``progress(done, total)`` is called after each origin. BLAS is held to one thread for the
    whole call, as ``analyze`` holds it: thousands of tiny least-squares fits, which BLAS
    threads only slow down."""
    from ..breaks.detect import _one_blas_thread, find_breaks
    from ..intake import as_series

    settings = Settings.coerce(settings, choices, caller="compare")
    series = as_series(series)
    spec = settings.spec_for(series)
    with _one_blas_thread():
        full = find_breaks(series, spec, settings.breaks)
        return evaluate(series, spec, settings, full, shapes=shapes, window_count=window_count,
                        progress=progress)


def evaluate(series, spec: TrendSpec, settings: Settings, full, *, shapes=None,
             window_count: int = 10, progress=None, place_after=None, offered=None,
             shared: Evaluation | None = None, origin_breaks=None) -> Evaluation:
    """``compare`` with the spec already resolved and the full-sample break search ``full``
    already run with these settings (``analyze`` calls this, so each runs once per analysis);
    the origins are still searched afresh. ``place_after`` = (latest break, shortest regime)
    places the default origins so that half of them know a shortest regime after that break
    (default: the latest break of ``full`` with its trimming; ``rolling.plan_origins``).

    For the later evaluations of the automatic shape (``analyze``): ``offered(strategy)``
    says which standard candidates are offered (default all); ``shared``, an evaluation of the
    same series on the same origins, lends its rows of the candidates of other shapes that use
    no breaks (their forecasts do not depend on the breaks known at an origin, so they are the
    same in every evaluation), which are then not fitted again; ``origin_breaks`` gives the
    breaks known at each origin (``Evaluation.breaks_by_origin`` of an earlier run of the same
    evaluation) instead of searching them."""
    options, ev = settings.breaks, settings.evaluation
    s = spec.season_length
    cautions = []
    if shapes is None:
        shapes = tuple(sh for sh in SHAPES
                       if sh != "exponential" or bool(np.all(series.values > 0)))
        if "exponential" not in shapes:
            cautions.append("the exponential shape was left out: the series has values of "
                            "zero or below")
    shapes = tuple(dict.fromkeys((spec.shape,) + tuple(shapes)))
    if spec.shape == "exponential" and np.any(series.values <= 0):
        raise InputError(f"{about('shape')}: the exponential shape needs positive values")
    H = ev.horizon_for(series)
    specs = [TrendSpec(sh, spec.seasonality, s) for sh in shapes]
    w_min = minimum_window(specs)
    if place_after is None and breakinfo.positions(full):
        place_after = (breakinfo.positions(full)[-1], int(getattr(full, "trim_periods", 0)))
    latest, shortest = place_after if place_after is not None else (None, None)
    plan = plan_origins(series.n, H, w_min, ev.first_origin, ev.step, latest, shortest,
                        series.label)
    m_top = DEFAULT_MAX_BREAKS if options.max_breaks is None else options.max_breaks
    if full.given:
        m_top = full.n_breaks
    reuse_breaks = ev.reuse_breaks
    if origin_breaks is not None:
        if len(origin_breaks) != len(plan.origins):
            raise ValueError("origin_breaks must give the breaks of every origin of the plan")
        breaks_at, failed = dict(zip(plan.origins, origin_breaks)).__getitem__, []
    else:
        breaks_at, failed = _origin_breaks(series, plan, full, spec, options, reuse_breaks,
                                           m_top)

    # one window rule for the rolling origin and the final forecast (regimes.window_rule)
    spacing = window_spacing(plan.first, w_min, window_count)
    grid = window_rule_grid(spacing, plan.origins[-1], w_min)
    ranked = [dataclasses.replace(st, minimum_window=w_min, window_spacing=spacing)
              if st.kind.uses_windows else st
              for st in standard_strategies(shapes, earlier_breaks=max(m_top - 1, 0),
                                            main_shape=spec.shape)
              if offered is None or offered(st)]
    for p, label in _event_positions(full, options.events):
        ranked.append(Strategy("truncated", spec.shape, start=p, start_label=f"event {label}"))
    sweep = [Strategy("truncated", spec.shape, start=g, start_label=series.label(g))
             for g in grid if 0 < g <= plan.first - w_min]
    blist = breakinfo.break_list(full)
    # full-sample break dates: supporting evidence only, labelled wherever they are shown
    sweep += [Strategy("truncated", spec.shape, start=b["position"],
                       start_label=f"break {series.label(b['position'])} ({IN_SAMPLE})",
                       in_sample_start=True)
              for b in blist]
    ranked_keys = {st.key for st in ranked}
    sweep = [st for st in sweep if st.key not in ranked_keys]
    strategies = ranked + sweep
    copied = _lent_rows(shared, strategies, spec, series, plan, w_min, spacing)
    table, used = run_rolling(series, strategies, plan, spec.seasonality, s, breaks_at, grid,
                              progress, w_min, copied)

    reference = Strategy("global", spec.shape)
    e_ref = table.errors(reference.key)
    results = []
    for c, st in enumerate(strategies):
        overall, per_h = candidate_scores(table, c)
        if st.key == reference.key:
            vs: dict = {"statistic": None, "p_value": None, "p_value_better": None,
                  "note": "the reference itself", "per_horizon": []}
        else:
            pooled, by_h = compare_errors(e_ref, table.errors(st.key), plan.step)
            vs = pooled.to_dict()
            vs["loss"] = "squared error"
            vs["pooled_over"] = f"horizons 1..{H}, averaged per origin"
            vs["per_horizon"] = [dict(r.to_dict(), horizon=j + 1) for j, r in enumerate(by_h)]
        results.append((st, overall, per_h, vs))
    ref_rmse = next(r[1]["rmse"] for r in results if r[0].key == reference.key)
    n_ranked = len(ranked)

    def result(i, rank=0, sweep_only=False):
        st, overall, per_h, vs = results[i]
        gain = 1.0 - overall["rmse"] / ref_rmse if ref_rmse > 0 else None
        return CandidateResult(st, spec.seasonality, overall, tuple(per_h), vs, gain, rank,
                               sweep_only)

    same_as = duplicates(table, n_ranked)
    order = sorted((i for i in range(n_ranked) if i not in same_as),
                   key=lambda i: results[i][1]["rmse"])
    cands = [result(i, rank) for rank, i in enumerate(order, start=1)]
    sweeps = tuple(result(i, 0, True) for i in range(n_ranked, len(strategies)))
    ref_result = next(c for c in cands if c.name == reference.key)
    break_p = breakinfo.supf_pvalue(full)
    rec = recommend(cands, ref_result, break_p, reuse_breaks, test=breakinfo.test_name(full))

    leak_free = {k: result(table.index(Strategy("truncated", spec.shape, from_break=k).key))
                 for k in range(1, m_top + 1)
                 if Strategy("truncated", spec.shape, from_break=k).key in table.names}
    grid_results = [c for c in sweeps if not (c.strategy.start_label or "").startswith("break ")]
    from_breaks = {c.strategy.start: c for c in sweeps
                   if (c.strategy.start_label or "").startswith("break ")}
    own_tests = {b["position"]: breakinfo.own_test(full, b["position"]) for b in blist}
    history = decide_history(series, ref_result, leak_free, grid_results, from_breaks, blist,
                             break_p, plan.origins, spec.minimum_points(), reuse_breaks,
                             breaks_by_origin=used, own_tests=own_tests)
    fitted = fit_history(series, spec).fitted()
    diag = diagnose(series, reference.key, fitted, default_window(series.n, H, s),
                    breakinfo.cusum_crossing(full), blist)

    cautions += ["rolling-origin comparisons on short series have little power: a test that "
                 "cannot tell two candidates apart does not show they are equally good",
                 "the history sweep and the recommendation are chosen on the same rolling "
                 "origin they are scored on, so the winner's figures flatter it a little",
                 JUDGEMENT]
    if failed:
        cautions.insert(0, f"the break search could not run on the history up to "
                           f"{len(failed)} origin(s) (first {series.label(failed[0] - 1)}); "
                           f"those origins used no breaks")
    if reuse_breaks:
        cautions.insert(0, OPTIMISTIC_NOTE)
    model = dict(spec.to_dict(), shapes=list(shapes), kind=options.kind,
                 break_dates=[str(d) for d in options.break_dates],
                 max_breaks=options.max_breaks, criterion=options.criterion, trim=options.trim,
                 events=[str(e) for e in options.events],
                 seasonal_by_regime=options.seasonal_by_regime, point_forecast="mean",
                 minimum_window=w_min, window_spacing=spacing,
                 window_starts=[series.iso(g) for g in grid])
    return Evaluation(series=json_clean(series.to_dict()), model=json_clean(model),
                      plan=json_clean(dict(plan.to_dict(series), breaks=_plan_words(
                          reuse_breaks, full.given))),
                      optimistic=bool(reuse_breaks), reference=reference.key,
                      candidates=tuple(cands), sweep=sweeps, recommended=rec, history=history,
                      diagnosis=diag, breaks=breakinfo.to_dict(full), breaks_by_origin=used,
                      same_as={table.names[i]: table.names[j] for i, j in same_as.items()},
                      errors=table, cautions=tuple(cautions))


def _lent_rows(shared, strategies, spec: TrendSpec, series, plan, w_min: int,
               spacing: int) -> dict:
    """{strategy index: (ErrorTable, row)} of the candidates whose rows ``shared`` lends:
    those of another shape than ``spec``'s that use no breaks, scored there on the same series,
    origins, horizon, seasonal terms and window rule (none when any of these differ). The
    candidates of the evaluation's own shape are fitted here: their single trends are fitted in
    one batch per origin (``OriginFits.prefit``) whatever is lent."""
    if shared is None:
        return {}
    table, model = shared.errors, shared.model
    same = (np.array_equal(table.origins, plan.origins)
            and table.targets.shape[1] == plan.horizon
            and np.array_equal(table.actual, series.values[table.targets])
            and model.get("seasonality") == spec.seasonality
            and model.get("season_length") == spec.season_length
            and model.get("minimum_window") == w_min
            and model.get("window_spacing") == spacing)
    if not same:
        return {}
    return {c: (table, table.index(st.key)) for c, st in enumerate(strategies)
            if not st.kind.reads_breaks and st.shape != spec.shape and st.key in table.names}


GIVEN_PLAN = ("the analyst's break dates, given in advance: at every origin those inside the "
              "history up to it with a shortest regime on each side (no search, so no leak)")


def _plan_words(reuse_breaks: bool, given: bool) -> str:
    """How each origin knew its breaks, for the plan in JSON and the report."""
    if given:
        return GIVEN_PLAN
    if reuse_breaks:
        return "reused from the full sample (optimistic)"
    return "re-detected at every origin from the history up to it"
