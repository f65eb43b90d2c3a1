"""The verdict: one model per series, chosen by a written rule, and the sentences that tell it.

The evaluation scores many candidates; the analyst takes one answer to management. This stage
picks ONE model (shape, seasonality, strategy, break dates) and everything a person reads is
then built from it: the headline growth and the growth table, the forecast, the history advice,
the diagnosis of why one trend over all history fails, and whether the answer holds without the
last few periods. It computes no statistics of its own: it selects among the evaluation's
results and rescored subsets of them (``evaluate.subset``), and words them.

Modules, one job each: ``fields`` (the records and shared thresholds), ``choose`` (the written
rule, ``RULE``), ``breaks_used`` (the model's break dates), ``keep_history`` (the history
advice), ``headline_growth`` (growth now), ``diagnose`` (the cause), ``stability`` (reruns
without the last periods), ``phrases`` and ``sentences`` (the words). ``build`` assembles them.
"""

from __future__ import annotations

from .breaks_used import break_dates, judged_by
from .choose import RULE, choose, considered, eligible, evidence_of, model_of, search_shapes
from .diagnose import diagnose
from .fields import (
    BREAK_FREE,
    CAUSES,
    COVERAGE_FLOOR,
    SWEEP_NOTE,
    BreakDate,
    Diagnosis,
    Evidence,
    ForecastNow,
    GrowthNow,
    History,
    Model,
    Run,
    Stability,
    Verdict,
)
from .headline_growth import growth_now
from .keep_history import HISTORY_RULE, history_advice
from .phrases import interval_words, strategy_words
from .sentences import (
    coverage_caution,
    history_sentence,
    origin_note,
    sentences,
    with_sentences,
)
from .stability import stability_of, stability_periods

__all__ = ["BREAK_FREE", "CAUSES", "COVERAGE_FLOOR", "HISTORY_RULE", "RULE", "SWEEP_NOTE",
           "BreakDate", "Diagnosis", "Evidence", "GrowthNow", "History", "Model", "Run",
           "Stability", "Verdict", "break_dates", "build", "choose", "considered",
           "coverage_caution", "diagnose", "eligible", "evidence_of", "ForecastNow", "growth_now",
           "history_advice", "history_sentence", "interval_words", "judged_by", "model_of",
           "origin_note", "search_shapes", "sentences", "stability_of", "stability_periods",
           "strategy_words"]


def build(series, runs: list[Run], run_index: int, candidate, basis: str, growth, forecast,
          stability: Stability, explicit, lag1, wandering, searches=None,
          every_candidate=None) -> Verdict:
    """The verdict of the chosen candidate (``choose``), with its growth table and forecast.

    ``every_candidate()``, when given, returns the runs' evaluations with every standard
    candidate offered (``analyze`` offers the later evaluations only what the rule considers);
    the diagnosis calls it only when it names the best model forecasting from the breaks."""
    run = runs[run_index]
    model = model_of(candidate, run)
    evidence = evidence_of(runs, run_index, candidate, basis)
    brks = break_dates(series, run.breaks, model)
    found = break_dates(series, run.breaks)
    hist = history_advice(series, model, forecast, run.evaluation, brks, evidence)
    gnow = growth_now(growth, model)
    reference_found = break_dates(series, runs[0].breaks) if run_index else found
    diag = diagnose(series, model, runs, brks, found, evidence, lag1, wandering,
                    hist.keep_from_label, searches, reference_found, every_candidate)
    st = candidate.strategy
    note = origin_note(series, run, brks)
    v = Verdict(series.name, series.frequency.name, model, evidence, brks,
                len(run.breaks.positions), hist, gnow, st.last_shape or st.shape, st.name,
                ForecastNow.of(forecast), diag, stability, note, (), RULE, found)
    return with_sentences(v)
