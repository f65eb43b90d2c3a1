"""The plain-language summary a manager reads first.

With a verdict (every ``analyze`` result) the summary is the verdict's sentences: the chosen
model and why, its breaks, growth now, the history advice, the diagnosis, the forecast, the
coverage warning, the stability check and the alternatives, all generated from the verdict's
fields. The rest of this module words a result without a verdict.

In order: what changed and when (with the date interval); how sure that is; how the global trend
fails late; what history to keep; growth then versus now; the forecast for the next periods with
its range. Each sentence is built from figures already in the result; none is computed here.

Two models stand behind these sentences: the growth figures come from the growth table (the
analyst's shape, one trend per regime), the forecast from the recommended strategy. Each sentence
names its model in plain words, and the forecast sentence says so when the two shapes differ.
"""

from __future__ import annotations

from .. import growth_figures as gf
from .. import words
from .extract import ReportData
from .models import (forecast_shape, growth_measure, growth_model, recommended_candidate,
                     strategy_words)
from .tables import dig, num


_p_text = words.p_value


def _when(data: ReportData) -> str:
    s = data.series
    name = s.name
    if not data.breaks:
        return (f"No change of growth regime was found in {name} between {s.label(0)} and "
                f"{s.label(s.n - 1)}: one trend describes the whole history.")
    parts = []
    for b in data.breaks:
        span = ""
        if b.low is not None and b.high is not None:
            span = (f" (95% interval {data.label(b.low)} to {data.label(b.high)})"
                    if b.low != b.high else f" (95% interval {data.label(b.low)} alone)")
        parts.append(f"{b.label}{span}")
    if len(parts) == 1:
        return f"The growth of {name} changed in {parts[0]}."
    times = {2: "twice", 3: "three times"}.get(len(parts), f"{len(parts)} times")
    return (f"The growth of {name} changed {times}: in " + ", ".join(parts[:-1])
            + f" and in {parts[-1]}.")


def _sure(data: ReportData) -> str:
    p = data.sup_f_p
    changes = (data.growth or {}).get("changes", [])
    wald = [c.get("p_value") for c in changes if c.get("p_value") is not None]
    if p is None and not wald:
        return "No formal test of the change is available for this series."
    if p is None:
        text = "The break test was not available"
    elif words.significant(p):
        text = f"A stable single trend is rejected ({data.break_test} p-value {_p_text(p)})"
    else:
        text = (f"The evidence for a change is weak ({data.break_test} p-value {_p_text(p)}, above "
                f"{words.LEVEL})")
    if wald:
        last = wald[-1]
        text += (f"; the change of growth across the last break is {words.significance(last)} "
                 f"(Wald p-value {_p_text(last)})")
    return text + "."


def _late_failure(data: ReportData) -> str | None:
    diag = dig(data.evaluation, "diagnosis")
    if not diag:
        return None
    me, pct, k = diag.get("mean_error"), diag.get("mean_error_percent"), diag.get("window")
    if me is None or k is None:
        return None
    way = "below" if me > 0 else "above"
    pct_text = f" ({abs(pct):.1f}% of the level)" if pct is not None else ""
    share = diag.get("share_one_sign")
    share_text = f", {share:.0%} of them on the same side" if share is not None else ""
    # the crossing of the CUSUM path drawn in the report, so text and chart agree
    if data.cusum and "first_crossing" in data.cusum:
        pos = data.cusum.get("first_crossing")
        crossing = data.label(pos) if pos is not None else None
    else:
        crossing = diag.get("cusum_crossing_label")
    since = f"; its CUSUM path left the 5% band in {crossing}" if crossing else ""
    model = diag.get("model") or "global"
    return (f"The {model} trend (one trend over all history) runs {way} the last {k} actual "
            f"values by {num(abs(me))} on average{pct_text}{share_text}{since}.")


def _history_shape(data: ReportData) -> str:
    """The shape the history decision was judged with (the analyst's shape)."""
    shape = dig(data.evaluation, "model", "shape")
    if shape is None and data.spec is not None:
        shape = getattr(data.spec, "shape", None)
    return shape or "chosen"


def _history(data: ReportData) -> str | None:
    hist = dig(data.evaluation, "history")
    if not hist:
        return None
    keep = hist.get("keep_from_label")
    shape = _history_shape(data)
    if keep:
        article = "an" if shape[:1].lower() in "aeiou" else "a"
        source = "of the analyst's dates" if data.breaks_given else "found"
        return words.history_sentence(
            keep, f"on past periods, {article} {shape} trend refitted at "
            f"each forecast origin from the latest break {source} in the history known then "
            f"forecast better than the global {shape} trend on all history")
    if not dig(hist, "evidence", "breaks"):
        return words.history_sentence(None, "no break was found to cut it at")
    p = dig(hist, "evidence", "sup_f_p_value")
    if not words.significant(p):
        return words.history_sentence(None, f"the break test does not support cutting it for "
                                            f"the global {shape} trend ({data.break_test} p-value "
                                            f"{_p_text(p)})")
    return words.history_sentence(None, f"on past periods, no truncated {shape} trend fitted "
                                        f"from a break forecast better than the global {shape} "
                                        f"trend on all history")


def _growth(data: ReportData) -> str | None:
    g = data.growth
    if not g or not g.get("segments"):
        return None
    segs = g["segments"]

    def piece(seg):
        gr = seg["growth"]
        v, ci = gr.get(gf.ANNUALISED_PCT), gr.get(gf.ci95(gf.ANNUALISED_PCT)) or [None, None]
        if v is None:
            return None
        ci_text = (f" (95% interval {ci[0]:.1f}% to {ci[1]:.1f}%)"
                   if ci[0] is not None and ci[1] is not None else "")
        return f"{v:.1f}% a year{ci_text}"

    now = piece(segs[-1])
    if now is None:
        return None
    words = "; ".join(w for w in (growth_model(g), growth_measure(g)) if w)
    if len(segs) == 1:
        return f"Growth ({words}) is {now}."
    then = piece(segs[-2])
    if then is None:
        return f"Growth by regime ({words}) is {now} since {segs[-1]['start_label']}."
    return (f"Growth by regime ({words}) was {then} from {segs[-2]['start_label']} to "
            f"{segs[-2]['end_label']} and is {now} since {segs[-1]['start_label']}.")


def _a(word: str) -> str:
    return ("an " if word[:1] in "aeiou" else "a ") + word


def _shapes_differ(data: ReportData, candidate) -> str | None:
    """A clause when the forecast's shape is not the growth table's shape."""
    growth_shape = (data.growth or {}).get("shape")
    fc_shape = forecast_shape(candidate)
    if not growth_shape or not fc_shape or growth_shape == fc_shape:
        return None
    return (f"; the growth figures above come from {_a(growth_shape)} trend and this forecast "
            f"from {_a(fc_shape)} one, so the two need not agree")


def _forecast(data: ReportData) -> str | None:
    fc = data.forecast
    if fc is None:
        return None
    rows = fc.rows()
    if not rows:
        return None
    first, last = rows[0], rows[-1]
    candidate = recommended_candidate(data.evaluation)
    words = strategy_words(candidate)
    if words:
        text = f"The recommended forecast ({words}) is {num(first['mean'])} for {first['label']}"
    else:
        text = f"The forecast ({fc.model}) is {num(first['mean'])} for {first['label']}"
    if len(rows) > 1:
        text += f" rising to {num(last['mean'])} by {last['label']}" \
            if last["mean"] >= first["mean"] else \
            f" falling to {num(last['mean'])} by {last['label']}"
    text += (f", with a 95% range of {num(last['lower95'])} to {num(last['upper95'])} for "
             f"{last['label']}")
    return text + (_shapes_differ(data, candidate) or "") + "."


def summary_sentences(data: ReportData) -> list[str]:
    """The verdict's sentences (``regimetrend.verdict``: one model, every sentence generated
    from its fields). A result without a verdict (a stand-in with no evaluation) gets five or
    six sentences built from the figures it has."""
    if data.verdict is not None:
        return list(data.verdict.sentences)
    out = [_when(data), _sure(data)]
    for fn in (_late_failure, _history, _growth, _forecast):
        s = fn(data)
        if s:
            out.append(s)
    return out
