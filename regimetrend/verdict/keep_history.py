"""How much history to keep: it follows from the chosen model, and the history sweep is cited.

One trend over all history and the piecewise continuous trend keep all history; a truncated
trend keeps the history from the break it starts at; separate trends forecast from the last
regime, so the history from the last break; the window average keeps the span it averages over
(from the first period). When the sweep's best start is at least ``SWEEP_NOTE`` better than all
history and the verdict does not follow it, the advice says why.
"""

from __future__ import annotations

from ..numformat import number, percent
from .fields import SWEEP_NOTE, History, Model

HISTORY_RULE = ("the history kept follows from the chosen model: one trend over all history and "
                "the trend joined at the breaks keep all history; a truncated trend keeps the "
                "history from the break it starts at; separate trends forecast from the last "
                "regime, so the history from the last break; the window average keeps the "
                "span it averages over, from the first period. The history sweep is cited, and "
                "a sweep gain of 30% or more that is not followed is explained")


def history_advice(series, model: Model, forecast, evaluation, breaks, evidence) -> History:
    """Rule of the module docstring: the start follows from the model; the sweep is cited."""
    start = None
    if model.strategy == "truncated":
        start = int(forecast.fitted_from) or None
        why = ("the chosen trend is fitted only on the history from there"
               if start else "the chosen trend found no usable break to start from")
    elif model.strategy == "separate":
        from ..regimes import joint_knots

        kept = joint_knots([b.position for b in breaks], series.n, model.shape,
                           model.seasonality)
        start = kept[-1] if kept else None
        why = ("the chosen model forecasts from the last regime's trend, which starts there"
               if start else "the chosen model has no usable break, so it is one trend")
    elif model.strategy == "continuous":
        why = ("the chosen trend is joined at the breaks, so the earlier regimes fix where its "
               "last piece starts")
    elif model.strategy == "window-average":
        why = ("the chosen model averages trends fitted from several starts, the first of "
               "them the first period")
    else:
        why = "the chosen model is one trend over all history"
    sweep = (evaluation.history.evidence or {}).get("sweep") or []
    best = min(sweep, key=lambda r: r["rmse"]) if sweep else None
    best_label = best["label"] if best else None
    best_gain = best.get("gain_over_global") if best else None
    declined = None
    follows = best is not None and (best["position"] == (start or 0))
    own = evidence.rmse if evidence is not None else None
    if best is not None and not follows and best_gain is not None and best_gain >= SWEEP_NOTE \
            and own is not None and own <= best["rmse"]:
        declined = (f"the chosen model forecast better still (rolling-origin RMSE "
                    f"{number(own)} against {number(best['rmse'])} from that start)")
    elif best is not None and not follows and best_gain is not None \
            and best_gain >= SWEEP_NOTE:
        n_starts = len(sweep)
        leak = (evaluation.history.evidence or {}).get("leak_free", {}).get("1")
        leak_text = ""
        if leak and leak.get("gain_over_all_history") is not None:
            g = leak["gain_over_all_history"]
            source = ("the latest of the analyst's break dates known there"
                      if evidence is not None and evidence.breaks_given
                      else "the break re-detected there")
            how = (f"{percent(abs(100 * g))} {'better' if g >= 0 else 'worse'} than"
                   if abs(100 * g) >= 0.5 else "about as accurate as")  # no "0% better"
            leak_text = (f"; the leak-free trend refitted at each origin from {source}, "
                         f"which a forecaster could have used, was {how} all history")
        declined = (f"that start was picked with hindsight as the best of {n_starts} fixed "
                    f"starts scored on the same origins, so its gain flatters it{leak_text}, "
                    f"and the chosen model is what the rule accepts on leak-free evidence")
    return History(series.iso(start) if start else None,
                   series.label(start) if start else None, why, best_label, best_gain,
                   declined, str(evaluation.model.get("shape", model.search_shape)))
