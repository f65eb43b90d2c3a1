"""Every sentence of the verdict, generated from its fields.

Numbers are worded by ``numformat`` (one rounding rule), p-values and significance by
``words.p_phrase`` and ``words.significance`` (one significance function).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from ..evaluate.recommend import ALPHA, LARGE_GAIN
from ..numformat import number, percent
from ..words import p_phrase, significance
from .breaks_used import break_words, judged_by
from .fields import (
    COVERAGE_FLOOR,
    Evidence,
    ForecastNow,
    GrowthNow,
    History,
    Model,
    Run,
    Verdict,
)
from .phrases import strategy_words


def _model_sentence(series, model: Model, ev: Evidence, start_label) -> str:
    words = strategy_words(model.strategy, model.shape, start_label)
    text = f"Chosen model for {series.name}: {words}"
    if model.strategy == "global" and model.shape == ev.reference.split()[-1]:
        return (text + f". No other candidate beat it on past periods by the rule "
                f"(rolling-origin RMSE {number(ev.rmse)}).")
    g = ev.gain or 0.0
    better = "better" if g >= 0 else "worse"
    test = (f"Diebold-Mariano one-sided {p_phrase(ev.p_better)}, {significance(ev.p_better)}"
            if ev.p_better is not None else "no accuracy test")
    return (text + f": on past periods it forecast {percent(abs(100 * g))} {better} than "
            f"one {ev.reference.split()[-1]} trend over all history (rolling-origin RMSE "
            f"{number(ev.rmse)} against {number(ev.reference_rmse)} over {ev.origins} "
            f"origins; {test}).{_without_test(ev)}")


def _without_test(ev: Evidence) -> str:
    """Why the rule kept a model whose accuracy test against the reference is not significant
    (the rule's other steps, read from the basis it recorded)."""
    if ev.p_better is not None and ev.p_better < ALPHA:
        return ""
    large = f"at least {LARGE_GAIN:.0%} better"
    if "significant break" in ev.basis:
        why = f"it is {large} and the break test is significant"
    elif "wandering" in ev.basis:
        why = f"it is {large} on a series that wanders, where break tests cannot decide"
    elif "a curved trend" in ev.basis:
        why = f"a curved trend {large} than a straight or exponential one is accepted"
    elif "lower RMSE" in ev.basis:
        why = "of models equally simple the more accurate is kept"
    else:
        return ""
    return f" The rule keeps it without a significant accuracy test: {why}."


def _and(parts) -> str:
    """'a', 'a and b', 'a, b and c'."""
    parts = list(parts)
    if len(parts) < 2:
        return "".join(parts)
    return ", ".join(parts[:-1]) + " and " + parts[-1]


def _breaks_sentence(model: Model, breaks, search_breaks: int, ev: Evidence,
                     found=()) -> str:
    """The breaks the model uses with their test, or why none is used. Dates the analyst gave
    are said to be given (no search, no date interval; the F test of those dates)."""
    p = ev.break_p
    test = f"{ev.break_test} {p_phrase(p)}, {significance(p)}"
    if breaks and ev.breaks_given:
        parts = [f"{b.label} (partial F {p_phrase(b.p_value)})" if len(breaks) > 1 else b.label
                 for b in breaks]
        lead = ("The regime changed in " if len(parts) == 1 else "The regimes changed in ")
        what = ("a date given by the analyst" if len(parts) == 1
                else "dates given by the analyst")
        return (lead + _and(parts) + f", {what} and not searched for ({test}).")
    if breaks:
        lead = "The regime changed in " if len(breaks) == 1 else "The regimes changed in "
        return lead + _and([break_words(b) for b in breaks]) + f" ({test})."
    many = search_breaks > 1
    if ev.breaks_given:
        return (f"The break date{'s' if many else ''} {_and(found)} {'were' if many else 'was'} "
                f"given by the analyst, not searched for ({test}), but the chosen model does not "
                f"use {'them' if many else 'it'}.")
    if search_breaks:
        at = f" ({_and(found)})" if found else ""
        return (f"The break search under the {model.search_shape} shape found {search_breaks} "
                f"break{'s' if many else ''}{at}; {test}; but the chosen model does not use "
                f"{'them' if many else 'it'}.")
    return (f"No break is used: the break search under the {model.search_shape} shape found "
            f"none ({ev.break_test} {p_phrase(p)}).")


def _growth_sentence(g: GrowthNow | None, chosen: str = "", units: str = "") -> str | None:
    if g is None:
        return None
    lo, hi = g.ci95
    ci = (f" (95% interval {percent(lo)} to {percent(hi)})"
          if lo is not None and hi is not None else "")
    truncated = g.strategy == "truncated"  # its words name where its history starts
    model = strategy_words(g.strategy, g.shape, g.since_label if truncated else None)
    if g.since_label and not truncated:
        model += f", since {g.since_label}"
    amount = ""
    if g.per_year_units is not None:
        ulo, uhi = g.per_year_units_ci95
        uci = (f" (95% interval {number(ulo)} to {number(uhi)})"
               if ulo is not None and uhi is not None else "")
        amount = f"{number(g.per_year_units)} {units or 'units'} a year{uci}"
    pct = (f"{percent(g.annualised_pct)} a year{ci}, {g.base}"
           if g.annualised_pct is not None else None)
    if g.shape == "linear":
        body = amount + (f"; as {g.base}, {percent(g.annualised_pct)} a year{ci}"
                        if g.annualised_pct is not None else "")
    else:
        body = (pct or "") + (f"; as an amount, {amount}" if amount else "")
    text = f"Growth now ({model}): {body}."
    if chosen == "window-average":
        text += (" The chosen average of trends has no single growth rate of its own, so growth "
                 "is described by one trend over all history.")
    if g.shared:
        text += (" The breaks shift the level only: all regimes share this one growth rate, so "
                 "growth did not change at the breaks.")
    return text


def _history_sentence(h: History) -> str:
    if h.keep_from_label:
        text = f"Keep the history from {h.keep_from_label} for forecasting: {h.why}."
    else:
        text = f"Keep all history for forecasting: {h.why}."
    if h.sweep_best_label is not None and h.sweep_best_gain is not None:
        g = h.sweep_best_gain
        sweep = f"The history sweep ({h.sweep_shape} trends fitted from fixed starts)"
        if h.declined:
            text += (f" {sweep} did best from {h.sweep_best_label}, "
                     f"{percent(100 * g)} better than one {h.sweep_shape} trend on all "
                     f"history, but that start is not followed: {h.declined}.")
        elif g > 0:
            text += (f" {sweep} did best from {h.sweep_best_label} ({percent(100 * g)} "
                     f"better than one {h.sweep_shape} trend on all history).")
        else:
            text += f" {sweep} found no start that beat all history."
    return text


def _coverage_sentence(ev: Evidence) -> str | None:
    c = ev.coverage95
    if c is None or c >= COVERAGE_FLOOR:
        return None
    return (f"On past periods the chosen model's 95% intervals covered only "
            f"{percent(100 * c)} of the actual values (80% intervals: "
            f"{percent(100 * (ev.coverage80 or 0))}): its ranges are too narrow, so plan "
            f"with wider ones.")


def coverage_caution(v: Verdict) -> str | None:
    """The caution for intervals that covered far below nominal on the rolling origin."""
    return _coverage_sentence(v.evidence)


def _alternatives_sentence(ev: Evidence) -> str | None:
    if not ev.runner_up:
        return None
    parts = []
    for name, rmse, gain in ev.runner_up:
        g = "" if gain is None else (f", {percent(abs(100 * gain))} "
                                     f"{'better' if gain >= 0 else 'worse'} than the reference")
        parts.append(f"{name} (RMSE {number(rmse)}{g})")
    return "Alternatives, not chosen: " + "; ".join(parts) + "."


def history_sentence(v: Verdict) -> str:
    return _history_sentence(v.history)


def sentences(v: Verdict) -> tuple[str, ...]:
    start_label = v.history.keep_from_label if v.model.strategy == "truncated" else None
    out = [_model_sentence_for(v, start_label),
           _breaks_sentence(v.model, v.breaks, v.search_breaks, v.evidence,
                            [b.label for b in v.found_breaks]),
           _growth_sentence(v.growth_now, v.model.strategy, v.units),
           _history_sentence(v.history),
           v.diagnosis.sentence,
           _forecast_sentence(v.forecast_now, v.model, start_label, v.units),
           _coverage_sentence(v.evidence),
           v.origin_note, v.stability.sentence, _alternatives_sentence(v.evidence)]
    return tuple(s for s in out if s)


@dataclass(frozen=True)
class _Named:
    name: str


def _model_sentence_for(v: Verdict, start_label) -> str:
    return _model_sentence(_Named(v.series_name), v.model, v.evidence, start_label)


def _forecast_sentence(f: ForecastNow, model: Model, start_label: str | None,
                       units: str) -> str:
    words = strategy_words(model.strategy, model.shape, start_label)
    text = f"Forecast ({words}): {_amount(f.first_mean, units)} for {f.first_label}"
    if f.periods > 1:
        text += f" and {_amount(f.last_mean, units)} for {f.last_label}"
        if model.seasonality != "none":  # else a rise against a falling growth figure puzzles
            text += " (seasonal pattern included, so the two differ by season as well as by trend)"
    return (text + f", with a 95% range of {number(f.last_lower95)} to "
            f"{_amount(f.last_upper95, units)} for {f.last_label}.")


def _amount(x, units: str) -> str:
    """A number followed by the analyst's units, when given."""
    return f"{number(x)} {units}" if units else number(x)


def origin_note(series, run: Run, breaks) -> str | None:
    """Said when no origin knows a shortest regime after the model's latest break."""
    if not breaks:
        return None
    b = breaks[-1]
    if judged_by(run, b.position):
        return None
    h = int(getattr(run.breaks, "trim_periods", 0) or 1)
    H = int(run.evaluation.plan.get("horizon", 1))
    return (f"The latest break, {b.label}, is too recent for the rolling origin to judge: an "
            f"origin needs {h} periods after it (the shortest regime) and {H} more to be "
            f"scored, and the series ends {series.n - b.position} periods after it; the model "
            f"was judged on the earlier history, so revisit it as data arrive.")


def with_sentences(v: Verdict) -> Verdict:
    """``v`` with its sentences generated from its fields."""
    return replace(v, sentences=sentences(v))
