"""The diagnosis: why one trend over all history fails at the end, named as one cause.

Causes (``fields.CAUSES``): a regime change within reach of the failure, the wrong shape, a
wandering series, a one-off outlier, or noise. Each comes with its evidence in one sentence.
"""

from __future__ import annotations

from ..evaluate.recommend import ALPHA
from ..numformat import number, percent, statistic
from .breaks_used import break_words, judged_by
from .choose import supf
from .fields import BREAK_FREE, CURVE_LAG1, BreakDate, Diagnosis, Evidence, Model, Run
from .phrases import article


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
             searches: dict | None = None) -> Diagnosis:
    """The cause of the reference trend's late failure, with its evidence in one sentence.

    ``breaks``: the breaks the model uses; ``found``: every break of the chosen shape's
    search. Order: a one-off outlier that explains the misfit; noise when nothing fails; a
    break of the model within reach of the failure window (or whose interval, widened by the
    window, holds the CUSUM crossing); the wrong shape (another shape with no break forecast
    as well); wandering residuals; a break found but not used within reach; else the CUSUM or
    the breaks, or noise."""
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
            f"{head}; {cross_text}. The series wanders around its trend like a random walk "
            f"(even with its breaks the residuals fail the KPSS test of returning to the trend "
            f"and keep an AR(1) coefficient of {_corr(_ar1(runs))}): breaks in the trend "
            f"cannot be told apart from wandering, and recent history and short windows serve "
            f"forecasting better than a long trend."), ev)
    # within reach: a break at most a third of the series, and at most ten years, before the
    # failure window (never less than the window or two seasons): not decades before
    ten_years = int(10 * series.frequency.periods_per_year)
    reach = max(k, 2 * series.frequency.season_length, min(n // 3, ten_years))
    near = [b for b in breaks if b.position >= ws - reach]
    via_cusum = _cross(crossing, breaks, k)
    if breaks and model.strategy not in BREAK_FREE:
        b = (near or [via_cusum] if (near or via_cusum) else list(breaks))[-1]
        gap = ws - b.position
        when = (f"{gap} periods before these" if gap > 0 else "within these periods")
        return Diagnosis("regime change", (
            f"{head}; {cross_text}. A change of regime explains it: the break at "
            f"{break_words(b)}, {when}, starts the "
            f"regime the chosen model forecasts from, and one trend over all history is still "
            f"pulled by the earlier regime."), dict(ev, explaining_break=b.label))
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
    found_near = [b for b in found if b.position >= ws - reach] or \
        ([_cross(crossing, found, k)] if _cross(crossing, found, k) else [])
    if found_near and evidence.break_p is not None and evidence.break_p < ALPHA:
        b = found_near[-1]
        why = ("it is too recent for the rolling origin to judge" if not judged_by(runs[0], 0)
               or not _judged(runs, b) else "on past periods that did not pay by the rule")
        return Diagnosis("regime change", (
            f"{head}; {cross_text}, and the break at {break_words(b)} explains it; the "
            f"chosen model does "
            f"not forecast from it, because {why}."),
            dict(ev, explaining_break=b.label))
    # only evidence within reach of the failure window is cited: a break decades earlier
    # does not explain a misfit of the last periods
    reachable_breaks = [b for b in found if b.position >= ws - reach]
    near_crossing = crossing is not None and crossing >= ws - reach
    if reachable_breaks or near_crossing:
        where = (f"the break at {reachable_breaks[-1].label}" if reachable_breaks else
                 f"the CUSUM crossing at {series.label(crossing)}")
        return Diagnosis("regime change", (
            f"{head}; {cross_text}. The misfit points to a change of regime ({where}), though "
            f"no break was dated close to these periods."), ev)
    return Diagnosis("noise", (
        f"{head}, but no break, CUSUM crossing or wandering explains it; with the evidence at "
        f"hand it is treated as noise."), ev)


def _ar1(runs: list[Run]):
    w = getattr(runs[0].breaks, "wandering", None)
    return getattr(w, "ar1", None)


def _corr(x) -> str:
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
