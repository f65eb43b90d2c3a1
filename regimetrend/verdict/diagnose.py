"""The diagnosis: why one trend over all history fails at the end, named as one cause.

Causes (``fields.CAUSES``): a regime change within reach of the failure, the wrong shape, a
wandering series, a one-off outlier, or noise. Each comes with its evidence in one sentence.
"""

from __future__ import annotations

from ..evaluate.recommend import ALPHA
from ..numformat import number, percent, statistic
from ..words import p_phrase
from .breaks_used import break_words, judged_by
from .choose import supf
from .fields import BREAK_FREE, CURVE_LAG1, BreakDate, Diagnosis, Evidence, Model, Run
from .phrases import article, strategy_words


def _cross(crossing, breaks, reach: int) -> BreakDate | None:
    """The break whose 95% interval, widened by ``reach``, holds the CUSUM crossing."""
    if crossing is None:
        return None
    for b in reversed(breaks):
        lo, hi = b.ci95_positions
        if lo - reach <= crossing <= hi + reach:
            return b
    return None


def diagnose(series, model: Model, runs: list[Run], breaks, found, evidence: Evidence,
             lag1: float | None, wandering: bool, start_label: str | None = None,
             searches: dict | None = None, reference_found=(),
             every_candidate=None) -> Diagnosis:
    """The cause of the reference trend's late failure, with its evidence in one sentence.

    ``breaks``: the breaks the model uses; ``found``: every break of the chosen shape's
    search; ``reference_found``: every break of the reference shape's search. Order: a one-off
    outlier that explains the misfit; noise when nothing fails; wandering residuals
    (``breaks/wandering.py``); a break of the model within reach of the failure window (or
    whose interval, widened by the window, holds a CUSUM crossing within reach); the wrong
    shape (another shape with no significant break forecast as well); a significant break
    found but not used within reach (too recent to judge; or a break-free model, a curve,
    forecast better: the shape question is said); else a break or CUSUM crossing within
    reach; else the wrong shape when the chosen model, of another shape, beat the reference
    by a significant accuracy test; else noise. A break decades before the failure window is
    never cited.
    ``every_candidate``: see ``verdict.build``."""
    ev0 = runs[0].evaluation
    d = ev0.diagnosis.data
    ref_shape = runs[0].shape
    k, n = int(d["window"]), series.n
    ws = n - k
    pct, share = d.get("mean_error_percent"), d.get("share_one_sign") or 0.0
    failing = share >= 0.7 or abs(pct or 0.0) >= 2.0
    crossing = d.get("cusum_crossing_position")
    outlier = d.get("outlier")
    way = "below" if (d.get("mean_error") or 0) > 0 else "above"
    head = (f"Over the last {k} periods ({series.label(ws)} to {series.label(n - 1)}) one "
            f"{ref_shape} trend over all history ran {way} the actual values by "
            f"{percent(abs(pct or 0.0))} of the level on average, {int(round(share * k))} of "
            f"{k} errors on one side")
    ev = {"window": k, "mean_error_percent": pct, "share_one_sign": share,
          "cusum_crossing": series.label(crossing) if crossing is not None else None,
          "residual_lag1": lag1}
    if outlier is not None and (not failing or outlier.get("explains")):
        when = outlier["label"]
        return Diagnosis("outlier", (
            f"{head}; one period, {when}, is {number(outlier['size'])} times the usual "
            f"residual size and makes most of that misfit: a one-off outlier, not a change of "
            f"trend."), dict(ev, outlier=when))
    if not failing:
        return Diagnosis("noise", (
            f"{head}, which looks like noise: one {ref_shape} trend still fits the last "
            f"periods."), ev)
    cross_text = (f"its CUSUM left the 5% band at {series.label(crossing)}"
                  if crossing is not None else "its CUSUM stayed inside the 5% band")
    if wandering:
        return Diagnosis("wandering", (
            f"{head}; {cross_text}. The series wanders around its trend like a random walk: "
            f"{_wandering_evidence(runs)}. Breaks in the trend cannot be told apart from "
            f"wandering, and recent history and short windows serve forecasting better than a "
            f"long trend."), ev)
    # within reach: a break at most a third of the series, and at most ten years, before the
    # failure window (never less than the window or two seasons): not decades before
    ten_years = int(10 * series.frequency.periods_per_year)
    reach = max(k, 2 * series.frequency.season_length, min(n // 3, ten_years))
    near = [b for b in breaks if b.position >= ws - reach]
    near_crossing = crossing is not None and crossing >= ws - reach
    via_cusum = _cross(crossing, breaks, k) if near_crossing else None
    if breaks and model.strategy not in BREAK_FREE:
        b = (near or [via_cusum] if (near or via_cusum) else list(breaks))[-1]
        gap = ws - b.position
        when = (f"{gap} periods before these" if gap > 0 else "within these periods")
        return Diagnosis("regime change", (
            f"{head}; {cross_text}. A change of regime explains it: the break at "
            f"{break_words(b)}, {when}, starts the "
            f"regime the chosen model forecasts from, and one trend over all history is still "
            f"pulled by the earlier regime."), dict(ev, explaining_break=b.label), b)
    other = _other_shape(runs, ref_shape, model, evidence, start_label, searches)
    if other is not None:
        shape, rmse, ref_rmse, start = other
        with_what = f"fitted on the history from {start}" if start else "with no break"
        return Diagnosis("wrong shape", (
            f"{head}; {cross_text}. The series curves: {article(shape)} trend {with_what} forecast "
            f"{percent(100 * (1 - rmse / ref_rmse))} better on past periods "
            f"(rolling-origin RMSE {number(rmse)} against {number(ref_rmse)}), so the "
            f"{ref_shape} shape, not a recent change of regime, is what fails."),
            dict(ev, shape=shape))
    # the breaks of the chosen shape's search and of the reference shape's search (whose trend
    # is the one failing), each with its own search's test; only those within reach count
    searched = [(b, evidence.break_p, model.search_shape) for b in found]
    if runs[0].shape != model.search_shape:
        searched += [(b, supf(runs[0].breaks), runs[0].shape) for b in reference_found]
    crossed = [s for s in searched if near_crossing and _cross(crossing, [s[0]], k)]
    found_near = [s for s in searched if s[0].position >= ws - reach] or crossed
    found_near = [s for s in found_near if s[1] is not None and s[1] < ALPHA]
    if found_near:
        b, _, shape = max(found_near, key=lambda s: s[0].position)
        shapes = _shapes_finding(b, searches or {runs[0].shape: runs[0].breaks})
        change = _change_words(_kind_of(searches, shape, runs))
        every = len(shapes) > 1 and len(shapes) == len(searches or {})
        where = (f"under every shape tried ({_and(shapes)}), so no curve without a break "
                 f"accounts for it" if every else
                 f"under the {_and(shapes)} shape{'s' if len(shapes) > 1 else ''}")
        lead = (f"{head}; {cross_text}. A change of regime explains it: {change} at "
                f"{break_words(b)}" if b.given else
                f"{head}; {cross_text}. A change of regime explains it: the break search "
                f"dates {change} at {break_words(b)}, {where}")
        ev = dict(ev, explaining_break=b.label)
        if not judged_by(runs[0], 0) or not _judged(runs, b):
            return Diagnosis("regime change", (
                f"{lead}. The chosen model does not forecast from it, because it is too recent "
                f"for the rolling origin to judge; revisit the choice as data arrive."), ev, b)
        rival = _best_break_model(every_candidate() if every_candidate is not None else
                                  [r.evaluation for r in runs])
        if model.strategy in BREAK_FREE and rival is not None and rival[1] > evidence.rmse:
            curve = model.shape != ref_shape or model.strategy == "window-average"
            follows = ("follows the change as a curve" if curve
                       else "follows the change through its recent windows")
            return Diagnosis("regime change", (
                f"{lead}. The chosen model, {strategy_words(model.strategy, model.shape)}, "
                f"does not date the break: it {follows}, and on past periods it forecast "
                f"better than the best model that forecasts from the break ({rival[0]}, "
                f"rolling-origin RMSE {number(evidence.rmse)} against {number(rival[1])}). "
                f"Whether growth holds at its new pace (a change of regime) or keeps bending "
                f"(a curve) is the question its forecast rests on."),
                dict(ev, shape_question=True), b)
        return Diagnosis("regime change", (
            f"{lead}. The chosen model does not forecast from it, because on past periods "
            f"that did not pay by the rule."), ev, b)
    # only evidence within reach of the failure window is cited: a break decades earlier
    # does not explain a misfit of the last periods
    reachable_breaks = [s[0] for s in searched if s[0].position >= ws - reach]
    if reachable_breaks or near_crossing:
        where = (f"the break at {reachable_breaks[-1].label}" if reachable_breaks else
                 f"the CUSUM crossing at {series.label(crossing)}")
        return Diagnosis("regime change", (
            f"{head}; {cross_text}. The misfit points to a change of regime ({where}), though "
            f"no break was dated close to these periods."), ev)
    if model.shape != ref_shape and evidence.p_better is not None \
            and evidence.p_better < ALPHA and evidence.rmse < evidence.reference_rmse:
        # the chosen curve beat the failing trend by a significant accuracy test: calling the
        # misfit noise would contradict the model sentence (weekly CO2: 45 of 52 errors on one
        # side, the quadratic 39% better, p = 0.018; its own residuals still wander, so the
        # curve test above does not pass)
        return Diagnosis("wrong shape", (
            f"{head}; {cross_text}. No break was dated near these periods, but the chosen "
            f"{model.shape} trend forecast "
            f"{percent(100 * (1 - evidence.rmse / evidence.reference_rmse))} better on past "
            f"periods (rolling-origin RMSE {number(evidence.rmse)} against "
            f"{number(evidence.reference_rmse)}, Diebold-Mariano one-sided "
            f"{p_phrase(evidence.p_better)}), so the {ref_shape} shape is what fails."),
            dict(ev, shape=model.shape))
    return Diagnosis("noise", (
        f"{head}, but no break, CUSUM crossing or wandering explains it; with the evidence at "
        f"hand it is treated as noise."), ev)


def _and(parts) -> str:
    parts = list(parts)
    return parts[0] if len(parts) == 1 else ", ".join(parts[:-1]) + " and " + parts[-1]


def _shapes_finding(b: BreakDate, searches: dict) -> list[str]:
    """The shapes whose break search has a break whose 95% interval (or date) holds ``b``."""
    out = []
    for shape, bs in searches.items():
        for x in bs.breaks:
            lo, hi = (int(x.position), int(x.position)) if x.given else \
                (int(x.ci95[0]), int(x.ci95[1]))
            if lo <= b.position <= hi:
                out.append(shape)
                break
    return out


def _kind_of(searches, shape: str, runs: list[Run]) -> str:
    bs = (searches or {}).get(shape) or next((r.breaks for r in runs if r.shape == shape),
                                             runs[0].breaks)
    return str(getattr(bs, "kind", "both"))


def _change_words(kind: str) -> str:
    """What the break search dates (a finding about the data, worded without saying that the
    chosen model's growth changed: a model without breaks has one growth path)."""
    return {"level": "a shift of level", "slope": "a change of growth"}.get(
        kind, "a change of level and growth")


def _best_break_model(evaluations):
    """(name, RMSE) of the best candidate that forecasts from the breaks, across the runs'
    evaluations (every standard candidate offered, whether the rule considers it or not)."""
    best = None
    for ev in evaluations:
        for c in ev.candidates:
            if c.strategy.name in BREAK_FREE:
                continue
            if best is None or c.metrics["rmse"] < best[1]:
                best = (c.name, c.metrics["rmse"])
    return best


def _wandering_evidence(runs: list[Run]) -> str:
    """The reading that found the wandering (``breaks/wandering.py``), in words."""
    w = getattr(runs[0].breaks, "wandering", None)
    if w is None:
        return "its residuals do not return to the trend"
    crit = number(w.kpss_critical)
    if w.wandering:
        return (f"even with its breaks the residuals do not return to the trend (KPSS "
                f"{_stat(w.kpss)}, above its 5% value {crit}; AR(1) {_stat(w.ar1)})")
    return (f"one trend over all history leaves residuals that do not return to it (KPSS "
            f"{_stat(w.trend_kpss)}, above its 5% value {crit}; AR(1) {_stat(w.trend_ar1)}), "
            f"and under every shape tried the breaks leave them persistent (AR(1) "
            f"{_stat(w.ar1)} under the {runs[0].shape} shape)")


def _stat(x) -> str:
    return statistic(x, missing="not available")


def _other_shape(runs: list[Run], ref_shape: str, model: Model, evidence: Evidence,
                 start_label: str | None = None, searches: dict | None = None):
    """(shape, rmse, reference rmse, start label or None) when a trend of another shape
    explains the failure: the chosen model has another shape (and no break near the end,
    checked by the caller), or one trend of another shape, whose own break search found no
    significant break, forecast at least 10% better than the reference."""
    ev0 = runs[0].evaluation
    ref = ev0.candidate(ev0.reference).metrics["rmse"]
    if not ref > 0:
        return None
    def clean(shape):
        """Its own break search found no significant break, and (when it was evaluated) one
        trend of that shape leaves residuals that do not wander: a curve, not a random walk."""
        b = (searches or {}).get(shape)
        if b is None:
            return False
        p = supf(b)
        for r in runs:
            lag = r.evaluation.diagnosis.data.get("residual_lag1") if r.shape == shape else None
            if lag is not None and lag >= CURVE_LAG1:
                return False
        return not b.positions or p is None or p >= ALPHA

    if model.shape != ref_shape and evidence.rmse < ref and clean(model.shape):
        return model.shape, evidence.rmse, ref, start_label
    best = None
    for c in ev0.candidates:
        st = c.strategy
        if st.name == "global" and st.shape != ref_shape and c.metrics["rmse"] <= 0.9 * ref \
                and clean(st.shape):
            if best is None or c.metrics["rmse"] < best[1]:
                best = (st.shape, c.metrics["rmse"], ref, None)
    return best


def _judged(runs: list[Run], b: BreakDate) -> bool:
    return any(judged_by(r, b.position) for r in runs)


def uses_no_breaks(model: Model, breaks) -> bool:
    return model.strategy in BREAK_FREE or not breaks
