"""The plain-language summary a manager reads first: five or six short sentences.

In order: what changed and when (with the date interval); how sure that is; how the global trend
fails late; what history to keep; growth then versus now; the forecast for the next periods with
its range. Each sentence is built from figures already in the result; none is computed here.
"""

from __future__ import annotations

from .extract import ReportData
from .tables import dig, num


def _p_text(p) -> str:
    if p is None:
        return "not available"
    return "below 0.001" if p < 0.001 else f"{p:.3f}"


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
    elif p < 0.05:
        text = f"A stable single trend is rejected (sup-F test p-value {_p_text(p)})"
    else:
        text = (f"The evidence for a change is weak (sup-F test p-value {_p_text(p)}, above "
                f"0.05)")
    if wald:
        last = wald[-1]
        verdict = "differs clearly" if last < 0.05 else "does not differ clearly"
        text += f", and growth {verdict} across the last break (Wald p-value {_p_text(last)})"
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
    return (f"A single trend over all history runs {way} the last {k} actual values by "
            f"{num(abs(me))} on average{pct_text}{share_text}{since}.")


def _history(data: ReportData) -> str | None:
    hist = dig(data.evaluation, "history")
    if not hist:
        return None
    keep = hist.get("keep_from_label")
    rec = dig(data.evaluation, "recommended", "name")
    rec_text = f"; the recommended forecast is the {rec} strategy" if rec else ""
    if keep:
        return (f"Keep the history from {keep} for forecasting: the trend fitted on it forecast "
                f"past periods better than one fitted on all history{rec_text}.")
    return f"Keep all history for forecasting{rec_text}."


def _growth(data: ReportData) -> str | None:
    g = data.growth
    if not g or not g.get("segments"):
        return None
    segs = g["segments"]

    def piece(seg):
        gr = seg["growth"]
        v, ci = gr.get("annualised_pct"), gr.get("annualised_pct_ci95") or [None, None]
        if v is None:
            return None
        ci_text = (f" (95% interval {ci[0]:.1f}% to {ci[1]:.1f}%)"
                   if ci[0] is not None and ci[1] is not None else "")
        return f"{v:.1f}% a year{ci_text}"

    now = piece(segs[-1])
    if now is None:
        return None
    if len(segs) == 1:
        return f"The trend grows {now} over the whole history."
    then = piece(segs[-2])
    return (f"Growth was {then} from {segs[-2]['start_label']} to {segs[-2]['end_label']} and is "
            f"{now} since {segs[-1]['start_label']}.")


def _forecast(data: ReportData) -> str | None:
    fc = data.forecast
    if fc is None:
        return None
    rows = fc.rows()
    if not rows:
        return None
    first, last = rows[0], rows[-1]
    text = f"The forecast is {num(first['mean'])} for {first['label']}"
    if len(rows) > 1:
        text += f" rising to {num(last['mean'])} by {last['label']}" \
            if last["mean"] >= first["mean"] else \
            f" falling to {num(last['mean'])} by {last['label']}"
    text += (f", with a 95% range of {num(last['lower95'])} to {num(last['upper95'])} for "
             f"{last['label']}.")
    return text


def summary_sentences(data: ReportData) -> list[str]:
    """Five or six sentences (fewer only when a stage is missing)."""
    out = [_when(data), _sure(data)]
    for fn in (_late_failure, _history, _growth, _forecast):
        s = fn(data)
        if s:
            out.append(s)
    return out
