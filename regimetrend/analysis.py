"""``analyze``: the whole flow for one series, as one pure function.

intake (done by the caller) -> breaks -> regimes and evaluation -> growth -> the forecast from
the recommended strategy. No printing, no global state, no files: the same series and settings
give the same ``Analysis`` bit for bit, and it pickles, so a portfolio runner can map it over
many series in other processes.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, replace

import numpy as np

from . import cautions
from .breaks.result import BreakSet
from .design import TrendSpec
from .evaluate.result import Evaluation
from .forecast import Forecast, fit_history, trend_forecast
from .growth import GrowthTable
from .series import Series
from .settings import Settings
from .verdict import Verdict


@dataclass(frozen=True, eq=False)
class Analysis:
    """Everything the analyst reads, from breaks to the forecast that goes into the plan."""

    series: Series
    settings: Settings
    spec: TrendSpec
    breaks: BreakSet  # on the full sample
    evaluation: Evaluation  # rolling origin, recommendation, history, diagnosis
    growth: GrowthTable  # by regime
    forecast: Forecast  # from the recommended strategy, refitted on all history
    global_forecast: Forecast  # the single global trend, for comparison
    global_fitted: np.ndarray  # in-sample fit of the global trend (original units)
    cusum: dict  # CUSUM path of the global trend with its 5% band (breaks.cusum)
    cautions: tuple[str, ...]  # standing ones first (see regimetrend.cautions)
    global_trend: np.ndarray | None = None  # global_fitted with seasonal terms at their average
    verdict: Verdict | None = None  # the one model and what is said about it
    searches: dict | None = None  # {shape: BreakSet} every full-sample break search run
    evaluations: dict | None = None  # {shape: Evaluation} every rolling-origin evaluation run

    def summary(self) -> str:
        """Plain text of the whole analysis: breaks and growth by regime, the recommendation,
        history and diagnosis, the forecast with intervals, the cautions."""
        from .plaintext import analysis_text

        return analysis_text(self)

    def to_dict(self) -> dict:
        from .output import json_safe

        breaks = self.breaks.to_dict()
        growth = self.growth.to_dict()
        return json_safe({
            "verdict": self.verdict.to_dict() if self.verdict is not None else None,
            "series": self.series.to_dict(),
            "settings": self.settings.to_dict(),
            "model": self.spec.to_dict(),
            "breaks": breaks,
            "evaluation": self.evaluation.to_dict(),
            "growth": growth,
            "forecast": self.forecast.to_dict(),
            "global_forecast": self.global_forecast.to_dict(),
            "cusum": self.cusum,
            "cautions": list(self.cautions),
        })


# benchmarks and tests only: every evaluation offers and fits every candidate itself (the
# later evaluations of the automatic shape otherwise offer what the rule considers and borrow
# the first one's rows of the other shapes' break-free candidates; same verdict)
_SEPARATE_EVALUATIONS = False


def _blas_held(fn):
    """Run ``fn`` with BLAS held to one thread. The analysis is thousands of tiny least-squares
    problems, which BLAS threads only slow down (the demo: 3.5 s of CPU with threads free,
    2.0 s held; ``benchmarks/bench_portfolio.py``)."""
    import functools

    @functools.wraps(fn)
    def run(*args, **kwargs):
        from .breaks.detect import _one_blas_thread

        with _one_blas_thread():
            return fn(*args, **kwargs)
    return run


@_blas_held
def analyze(series, settings: Settings | None = None, *, progress=None,
            **choices) -> Analysis:
    """Run the whole analysis of ``series`` (a ``Series``, or a pandas Series or date/value
    DataFrame, read by intake).

    ``settings`` holds every choice (see ``Settings``); keyword ``choices`` override single
    fields, e.g. ``analyze(series, shape="exponential", horizon=12)``. ``progress(done,
    total)``, when given, is called after each rolling origin (it does not change the result).

    With ``shape="auto"`` (the default) the break search runs under every shape the series
    allows and the verdict's rule (``regimetrend.verdict``) chooses the model; every figure of
    the result (growth, forecast, history advice, diagnosis) comes from that model.
    """
    from . import verdict as verdicts
    from .breaks import cusum as cusum_paths
    from .breaks.detect import find_breaks
    from .breaks.wandering import wanders_under_every_shape
    from .design import SHAPES
    from .evaluate import evaluate
    from .growth import growth_from_fits, growth_table
    from .intake import as_series
    from .regimes import strategy_forecast

    settings = Settings.coerce(settings, choices, caller="analyze")
    series = as_series(series)
    explicit = None if settings.model.shape == "auto" else settings.model.shape
    base = settings.spec_for(series)  # resolved once; the shapes below share its seasons
    horizon = settings.horizon_for(series)
    positive = bool(np.all(series.values > 0))
    shapes = (explicit,) if explicit else tuple(
        s for s in SHAPES if s != "exponential" or positive)
    specs = {s: TrendSpec(s, base.seasonality, base.season_length) for s in shapes}
    searches = {s: find_breaks(series, specs[s], settings.breaks) for s in shapes}
    run_shapes = verdicts.search_shapes(searches, explicit)
    latest = [(b.positions[-1], b.trim_periods) for s in run_shapes
              for b in [searches[s]] if b.positions]
    place_after = max(latest) if latest else None
    runs: list = []
    for s in run_shapes:
        later = {} if not runs or _SEPARATE_EVALUATIONS else {
            "offered": functools.partial(verdicts.considered, run_shape=s, explicit=explicit),
            "shared": runs[0].evaluation}
        runs.append(verdicts.Run(s, searches[s], evaluate(
            series, specs[s], settings, searches[s], progress=progress,
            place_after=place_after, **later)))
    lag1 = runs[0].evaluation.diagnosis.data.get("residual_lag1")
    # KPSS and AR(1) of the break models' residuals (``breaks/wandering.py``); under the
    # automatic shape read across shapes (a shape whose model leaves little persistence explains
    # it as a curve); one shape alone cannot tell a curve from a random walk by the second reading
    wandering = (bool(runs[0].breaks.is_wandering) if explicit else
                 wanders_under_every_shape([s.wandering for s in searches.values()]))
    index, chosen, basis = verdicts.choose(runs, explicit, wandering)
    run = runs[index]
    spec = TrendSpec(chosen.strategy.shape, base.seasonality, base.season_length)
    forecast = strategy_forecast(series, chosen.strategy, run.breaks.positions, horizon,
                                 specs[run.shape])
    growth = _model_growth(series, spec, chosen.strategy, run.breaks, forecast,
                           growth_table, growth_from_fits)
    ref_spec = specs[runs[0].shape]
    global_forecast = trend_forecast(series, ref_spec, horizon)
    global_fit = fit_history(series, ref_spec)
    y_model = global_fit.fit.X @ global_fit.fit.beta + global_fit.fit.residuals
    cusum = cusum_paths.recursive_cusum(y_model, global_fit.fit.X).to_dict()
    stability = _stability(series, runs, explicit, wandering, index, chosen, settings,
                           verdicts)
    verdict = verdicts.build(series, runs, index, chosen, basis, growth, forecast, stability,
                             explicit, lag1, wandering, searches,
                             functools.partial(_every_candidate, series, specs, settings, runs,
                                               place_after, evaluate))
    extra = tuple(c for c in [verdicts.coverage_caution(verdict)] if c)
    return Analysis(series=series, settings=settings, spec=spec, breaks=run.breaks,
                    evaluation=_as_decided(run.evaluation, runs[0].evaluation, verdict),
                    growth=growth, forecast=forecast,
                    global_forecast=global_forecast, global_fitted=global_fit.fitted(),
                    cusum=cusum,
                    cautions=cautions.for_analysis(
                        series, run.breaks if verdict.breaks else None,
                        tuple(run.evaluation.cautions) + extra,
                        unused=() if verdict.breaks else (run.breaks, runs[0].breaks)),
                    global_trend=global_fit.trend(), verdict=verdict, searches=searches,
                    evaluations={r.shape: r.evaluation for r in runs})


def _every_candidate(series, specs, settings, runs, place_after, evaluate) -> list:
    """The runs' evaluations with every standard candidate offered: the later ones refitted
    on the breaks their origins knew (no search), for the one sentence of the diagnosis that
    names the best model forecasting from the breaks across them (``verdict.build``)."""
    return [r.evaluation if not i or _SEPARATE_EVALUATIONS else
            evaluate(series, specs[r.shape], settings, r.breaks, place_after=place_after,
                     origin_breaks=r.evaluation.breaks_by_origin)
            for i, r in enumerate(runs)]


def _as_decided(evaluation, reference_evaluation, verdict):
    """The evaluation with the verdict's decisions in place of its own: the recommended
    candidate, the history decision and the diagnosis sentence, so that every table and chart
    that reads the evaluation shows the chosen model (the evidence stays as computed), scored
    against the same reference trend as the verdict's sentences (``evaluate.rebase``)."""
    from .evaluate.result import Diagnosis, HistoryDecision, Recommendation
    from .verdict import HISTORY_RULE, history_sentence

    m = verdict.model
    rec = Recommendation(m.strategy, m.shape, m.name, verdict.sentences[0], verdict.rule,
                         verdict.evidence.basis)
    evidence = dict(evaluation.history.evidence or {}, rule=HISTORY_RULE)
    hist = HistoryDecision(verdict.history.keep_from, verdict.history.keep_from_label,
                           history_sentence(verdict), evidence)
    diag = Diagnosis(verdict.diagnosis.sentence,
                     dict(reference_evaluation.diagnosis.data, cause=verdict.diagnosis.cause))
    from .evaluate.rebase import against_reference

    decided = replace(evaluation, recommended=rec, history=hist, diagnosis=diag)
    return against_reference(decided, reference_evaluation.reference)


def _model_growth(series, spec, strategy, breakset, forecast, growth_table, growth_from_fits):
    """The growth table of the chosen model: one trend (global), the trend of the kept history
    (truncated), a trend per regime with its own level and growth at the breaks the separate
    fit uses (separate; whatever kind of break the search found, since that is what the
    strategy fits) or the trend joined at the breaks (continuous); a window average is
    described by one trend over all history (its windows all end at the last period; the
    growth table says which model it shows)."""
    from .errors import InputError

    if strategy.name in ("global", "window-average") or not breakset.positions:
        return growth_table(series, spec, ())
    if strategy.name == "truncated":
        return growth_from_fits(series, [fit_history(series, spec, int(forecast.fitted_from))])
    if strategy.name == "separate":  # each regime its own level and growth, as it is fitted
        from .regimes import joint_knots

        knots = joint_knots(breakset.positions, series.n, strategy.shape, spec.seasonality,
                            strategy.last_shape)

        while knots:
            try:
                return growth_table(series, spec, list(knots), kind="both")
            except InputError:  # regimes confounded with the seasonal dummies: like the joint
                if spec.seasonality != "dummies":  # fit (``OriginFits.piecewise``), drop
                    break  # the oldest break first; otherwise one trend
                knots = knots[1:]
        return growth_table(series, spec, ())
    kind = "slope" if strategy.name == "continuous" else None
    try:
        return growth_table(series, spec, breakset, **({"kind": kind} if kind else {}))
    except InputError:  # a regime too short for its own trend under this shape
        return growth_table(series, spec, ())


def _stability(series, runs, explicit, wandering, index, chosen, settings, verdicts):
    """The verdict rerun without the last 1..k periods (``verdict.stability_of``): the break
    search of each shortened series (as at a rolling origin: no events, breaks capped at what
    it holds; lean: the verdict reads only its breaks, their intervals and its first test),
    and the rolling origin rescored on the origins it would have had."""
    from .errors import InputError
    from .evaluate import history_breaks

    searches = {}
    for k in verdicts.stability_periods(series):
        head = series.head(series.n - k)
        try:
            searches[k] = [history_breaks(head, r.breaks.spec, settings.breaks, lean=True)
                           for r in runs]
        except InputError:
            break
    model = verdicts.model_of(chosen, runs[index])
    breaks = verdicts.break_dates(series, runs[index].breaks, model)
    return verdicts.stability_of(series, runs, explicit, wandering,
                                 (index, chosen.name, breaks), searches)
