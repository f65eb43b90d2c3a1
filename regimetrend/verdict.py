"""The verdict: one model per series, chosen by a written rule, and the sentences that tell it.

The evaluation scores many candidates; the analyst takes one answer to management. This stage
picks ONE model (shape, seasonality, strategy, break dates) and everything a person reads is
then built from it: the headline growth and the growth table, the forecast, the history advice,
the diagnosis of why one trend over all history fails, and whether the answer holds without the
last few periods. It computes no statistics of its own: it selects among the evaluation's
results and rescored subsets of them (``evaluate.subset``), and words them.

RULE (``RULE`` below, shown with every verdict)

1. Break searches. With ``--shape auto`` (the default) the full-sample break search runs under
   every shape the series allows (exponential only for positive values). The rolling-origin
   evaluation runs under the linear shape and, when another shape needs fewer breaks than the
   linear one, under that shape too (the one needing fewest; ties go to the exponential shape,
   which has as few terms as the linear one). Both evaluations use the same origins. An explicit
   ``--shape`` runs one evaluation under that shape, and only models of that shape are chosen.
2. Within one evaluation the candidates considered are the global trend and the window average
   (of any shape under ``auto``; they use no breaks) and the break-aware strategies of the
   evaluation's own shape (so their breaks come from their own shape's search). The global
   trend of the evaluation's shape is kept unless another candidate has a lower rolling-origin
   RMSE and either (a) the Diebold-Mariano test finds it more accurate at the 5% level, or
   (b) it is break-aware, at least 10% better and the sup-F test finds a break at the 5%
   level, or (c) the series wanders (``WANDERING_LAG1``) and it is at least 10% better (with a
   wandering series break tests cannot separate a break from the wandering, so accuracy alone
   decides). Among the candidates that qualify the lowest RMSE wins.
3. Between the two evaluations' winners (``auto`` only), the one using fewer breaks (global
   trends and window averages use none) is kept unless the other has a lower RMSE and either
   the Diebold-Mariano test on the shared origins finds it more accurate at the 5% level or it
   is at least 10% better with a significant break in its own search; with equally many breaks
   the lower RMSE wins. Parsimony, then evidence.

History advice follows from the model: one trend over all history and the piecewise
continuous trend keep all history; a truncated trend keeps the history from the break it starts
at; separate trends forecast from the last regime, so the history from the last break; the
window average keeps the span it averages over (from the first period). The history sweep (the
trend fitted from fixed starts) is cited; when its best start is at least 30% better than all
history and the verdict does not follow it, the sentence says why.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from .evaluate.accuracy_tests import compare_errors
from .evaluate.recommend import ALPHA, LARGE_GAIN, recommend

HISTORY_RULE = ("the history kept follows from the chosen model: one trend over all history and "
                "the trend joined at the breaks keep all history; a truncated trend keeps the "
                "history from the break it starts at; separate trends forecast from the last "
                "regime, so the history from the last break; the window average keeps the "
                "span it averages over, from the first period. The history sweep is cited, and "
                "a sweep gain of 30% or more that is not followed is explained")
if TYPE_CHECKING:
    from .breaks.result import BreakSet
    from .evaluate.result import Evaluation

SWEEP_NOTE = 0.30  # a sweep gain this large that the verdict declines is explained
COVERAGE_FLOOR = 0.80  # rolling 95% intervals covering less than this are flagged
WANDERING_LAG1 = 0.80  # (kept for callers) the wandering flag itself comes from the break
#                        search (``breaks/wandering.py``: KPSS and AR(1) of its residuals)
CURVE_LAG1 = 0.50  # a trend of the right shape leaves residuals less correlated than this
CAUSES = ("regime change", "wrong shape", "wandering", "outlier", "noise")
BREAK_FREE = ("global", "window-average")

RULE = ("One model is chosen per series. Each rolling-origin evaluation keeps the global trend "
        "of its shape unless another candidate has a lower RMSE and either the Diebold-Mariano "
        f"test finds it more accurate at the {ALPHA:.0%} level, or it is regime-aware, at least "
        f"{LARGE_GAIN:.0%} better and the sup-F test finds a break at the {ALPHA:.0%} level, or "
        f"the series wanders and it is at least {LARGE_GAIN:.0%} better. Under the automatic "
        "shape, the linear evaluation and (when another shape needs fewer breaks) that shape's "
        "evaluation each give a winner; the one using fewer breaks is kept unless the other is "
        f"more accurate by the Diebold-Mariano test or at least {LARGE_GAIN:.0%} better with a "
        "significant break.")


# ---------------------------------------------------------------------------------------------
# words: p-values and significance come from these two functions only


def p_text(p) -> str:
    """'p < 0.001', 'p = 0.012' or 'p not available' (``words.p_phrase``)."""
    from .words import p_phrase

    return p_phrase(p)


def significance(p, alpha: float = ALPHA) -> str:
    """The one wording of a test result (``words.significance``)."""
    from .words import significance as words_significance

    return words_significance(p, alpha)


def pct_text(v, digits: int = 1, signed: bool = False) -> str:
    """A percentage for reading; never '-0.0%'."""
    if v is None or not math.isfinite(float(v)):
        return "not available"
    r = round(float(v), digits)
    if r == 0:
        r = 0.0
    return f"{r:+.{digits}f}%" if signed and r != 0 else f"{r:.{digits}f}%"


def num_text(v) -> str:
    """A number for reading: about four significant figures, never '-0'."""
    if v is None or not math.isfinite(float(v)):
        return "not available"
    v = float(v)
    if v == 0:
        return "0"
    a = abs(v)
    if a >= 1e9 or a < 1e-3:
        return f"{v:.3e}"
    digits = max(0, 3 - int(math.floor(math.log10(a))))
    text = f"{v:,.{digits}f}"
    if digits and abs(round(v, digits)) >= 10 ** (4 - digits):
        text = f"{v:,.{digits - 1}f}"
    return "0" if float(text.replace(",", "")) == 0 else text


def interval_words(lo: str, hi: str) -> str:
    """'95% interval A to B', or '95% interval A alone' when both ends are the same period."""
    return f"95% interval {lo} alone" if lo == hi else f"95% interval {lo} to {hi}"


def _a(word: str) -> str:
    return ("an " if word[:1].lower() in "aeiou" else "a ") + word


def strategy_words(strategy: str, shape: str, start_label: str | None = None) -> str:
    """A model in plain words, e.g. 'separate exponential trends per regime'."""
    if strategy == "global":
        return f"one {shape} trend over all history"
    if strategy == "separate":
        return f"separate {shape} trends per regime, forecast from the last regime"
    if strategy == "truncated":
        where = f"from {start_label}" if start_label else "from the last break"
        return f"one {shape} trend fitted on the history {where}"
    if strategy == "continuous":
        return f"{_a(shape)} trend joined at the breaks, forecast from its last piece"
    if strategy == "window-average":
        return f"the average of {shape} trends fitted from several window starts"
    return f"{strategy} {shape}"


# ---------------------------------------------------------------------------------------------
# results


@dataclass(frozen=True)
class Run:
    """One rolling-origin evaluation and the full-sample break search of its shape."""

    shape: str
    breaks: BreakSet
    evaluation: Evaluation


@dataclass(frozen=True)
class Model:
    shape: str
    seasonality: str
    strategy: str
    name: str  # the candidate's key in the evaluation
    search_shape: str  # the shape of the break search whose breaks the model uses
    start: int | None = None  # truncated: fixed start position
    from_break: int = 1

    def to_dict(self) -> dict:
        return {"shape": self.shape, "seasonality": self.seasonality, "strategy": self.strategy}


@dataclass(frozen=True)
class Evidence:
    """Why the model was chosen: its rolling-origin record against one trend over all history
    of the reference shape (the first evaluation's reference)."""

    reference: str
    rmse: float
    reference_rmse: float
    gain: float | None
    p_better: float | None  # one-sided Diebold-Mariano: chosen more accurate than reference
    break_p: float | None  # sup-F of the chosen shape's break search
    basis: str  # "accuracy test", "large gain with a significant break", "wandering series
    #            with a large gain", "global kept", and "; fewer breaks kept" / "; evidence"
    coverage95: float | None
    coverage80: float | None
    origins: int
    runner_up: tuple = ()  # ((name, rmse, gain), ...) the best candidates not chosen


@dataclass(frozen=True)
class BreakDate:
    position: int
    date: str
    label: str
    ci95: tuple[str, str]
    ci95_labels: tuple[str, str]
    ci95_positions: tuple[int, int]

    def to_dict(self) -> dict:
        return {"date": self.date, "ci95": list(self.ci95)}


@dataclass(frozen=True)
class History:
    keep_from: str | None  # ISO date, None = all history
    keep_from_label: str | None
    why: str  # what in the model fixes the start, in words
    sweep_best_label: str | None
    sweep_best_gain: float | None
    declined: str | None  # why a sweep gain of SWEEP_NOTE or more is not followed
    sweep_shape: str = "linear"  # the shape of the trends the sweep fitted


@dataclass(frozen=True)
class GrowthNow:
    annualised_pct: float | None
    ci95: tuple
    per_year_units: float | None
    per_year_units_ci95: tuple
    shape: str
    strategy: str
    since_label: str | None  # first period of the regime the figures describe; None = all
    base: str  # what "% a year" means, in words
    shared: bool  # level-only breaks: one growth rate for all regimes
    regimes: int

    def to_dict(self) -> dict:
        return {"annualised_pct": _f(self.annualised_pct), "ci95": [_f(v) for v in self.ci95],
                "per_year_units": _f(self.per_year_units),
                "model": {"shape": self.shape, "strategy": self.strategy}}


@dataclass(frozen=True)
class Diagnosis:
    cause: str
    sentence: str
    evidence: dict = field(default_factory=dict)

    def to_dict(self) -> dict:
        return {"cause": self.cause, "sentence": self.sentence}


@dataclass(frozen=True)
class Stability:
    status: str  # "stable", "changed" or "not checked"
    periods_checked: int  # the verdict was rerun without the last 1..this many periods
    changed_when_added: int | None  # smallest k whose rerun differs
    sentence: str
    reruns: tuple = ()  # ({"without_last", "model", "breaks"}, ...)

    def to_dict(self) -> dict:
        return {"status": self.status, "periods_checked": self.periods_checked,
                "changed_when_added": self.changed_when_added, "sentence": self.sentence,
                "reruns": [dict(r) for r in self.reruns]}


@dataclass(frozen=True)
class Verdict:
    """The one model and everything said about it; ``to_dict()`` is report.json's ``verdict``."""

    series_name: str
    frequency: str
    model: Model
    evidence: Evidence
    breaks: tuple[BreakDate, ...]
    search_breaks: int  # breaks found by the chosen shape's search (used or not)
    history: History
    growth_now: GrowthNow | None
    forecast_shape: str
    forecast_strategy: str
    forecast_text: str  # the forecast sentence's figures, already worded
    diagnosis: Diagnosis
    stability: Stability
    origin_note: str | None
    sentences: tuple[str, ...]
    rule: str = RULE

    def to_dict(self) -> dict:
        return {"model": self.model.to_dict(),
                "breaks": [b.to_dict() for b in self.breaks],
                "keep_history_from": self.history.keep_from,
                "growth_now": self.growth_now.to_dict() if self.growth_now else None,
                "forecast_model": {"shape": self.forecast_shape,
                                   "strategy": self.forecast_strategy},
                "diagnosis": self.diagnosis.to_dict(),
                "stability": self.stability.to_dict(),
                "sentences": list(self.sentences)}


def _f(x):
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


# ---------------------------------------------------------------------------------------------
# the rule


def search_shapes(searches: dict, explicit: str | None) -> tuple[str, ...]:
    """Shapes that get a rolling-origin evaluation (rule step 1). ``searches``: {shape:
    BreakSet} in the order linear, exponential, quadratic."""
    if explicit:
        return (explicit,)
    base = "linear"
    count = {s: len(b.positions) for s, b in searches.items()}
    fewer = [s for s in searches if s != base and count[s] < count[base]]
    if not fewer:
        return (base,)
    order = {"exponential": 0, "quadratic": 1}
    alt = min(fewer, key=lambda s: (count[s], order.get(s, 2)))
    return (base, alt)


def _supf(breakset):
    from .evaluate import breakinfo

    return breakinfo.supf_pvalue(breakset)


def eligible(candidate, run_shape: str, explicit: str | None) -> bool:
    st = candidate.strategy
    if st.last_shape is not None:
        return False
    if explicit and st.shape != explicit:
        return False
    if st.name in BREAK_FREE:
        return True
    return st.shape == run_shape


def _within(run: Run, candidates: dict | None, explicit, wandering: bool,
            break_p: Any = "search"):
    """Rule step 2 on one evaluation: (winning CandidateResult, basis). ``break_p`` replaces
    the search's sup-F p-value (stability reruns)."""
    ev = run.evaluation
    pool = candidates if candidates is not None else {c.name: c for c in ev.candidates}
    ref = pool[ev.reference]
    cands = [c for c in pool.values() if eligible(c, run.shape, explicit)]
    p = _supf(run.breaks) if break_p == "search" else break_p
    rec = recommend(cands, ref, p, ev.optimistic)
    best, basis = pool[rec.name], rec.basis
    if wandering and best.name == ref.name:
        better = [c for c in cands if c.name != ref.name and c.gain is not None
                  and c.gain >= LARGE_GAIN]
        if better:
            best = min(better, key=lambda c: c.metrics["rmse"])
            basis = "wandering series with a large gain"
    return best, basis


def uses_breaks(candidate, run: Run) -> int:
    return 0 if candidate.strategy.name in BREAK_FREE else len(run.breaks.positions)


def _errors(run: Run, name: str, mask=None):
    e = run.evaluation.errors.errors(name)
    return e if mask is None else e[np.flatnonzero(mask)]


def choose(runs: list[Run], explicit: str | None, wandering: bool = False, rescored=None,
           masks=None, break_p=None):
    """Rule steps 2 and 3: (run index, CandidateResult, basis).

    ``rescored`` (stability reruns) gives per run {name: CandidateResult} scored on fewer
    origins (``masks``), and ``break_p`` per run the sup-F p of the shortened series' search."""
    winners = []
    ps = [_supf(r.breaks) for r in runs] if break_p is None else list(break_p)
    for i, run in enumerate(runs):
        pool = rescored[i] if rescored is not None else None
        best, basis = _within(run, pool, explicit, wandering, ps[i])
        winners.append((i, best, basis, run))
    i, best, basis, run = winners[0]
    for j, other, obasis, orun in winners[1:]:
        a, b = uses_breaks(best, run), uses_breaks(other, orun)
        ra, rb = best.metrics["rmse"], other.metrics["rmse"]
        if a == b:
            if rb < ra:
                i, best, basis, run = j, other, f"{obasis}; lower RMSE than {best.name}", orun
            continue
        simple, complex_ = ((i, best, basis, run), (j, other, obasis, orun)) if a < b else \
            ((j, other, obasis, orun), (i, best, basis, run))
        mask = masks[0] if masks is not None else None
        dm, _ = compare_errors(_errors(simple[3], simple[1].name, mask),
                               _errors(complex_[3], complex_[1].name, mask),
                               int(runs[0].evaluation.plan.get("step", 1)))
        p = dm.p_value_better
        rs, rc = simple[1].metrics["rmse"], complex_[1].metrics["rmse"]
        gain = 1.0 - rc / rs if rs > 0 else 0.0
        bp = ps[complex_[0]]
        if rc < rs and ((p is not None and p < ALPHA)
                        or (gain >= LARGE_GAIN and bp is not None and bp < ALPHA)):
            i, best, basis, run = complex_[0], complex_[1], \
                f"{complex_[2]}; more breaks, but more accurate than {simple[1].name}", \
                complex_[3]
        else:
            i, best, basis, run = simple[0], simple[1], \
                f"{simple[2]}; fewer breaks than {complex_[1].name}", simple[3]
    return i, best, basis


def model_of(candidate, run: Run) -> Model:
    st = candidate.strategy
    return Model(shape=st.shape, seasonality=candidate.seasonality, strategy=st.name,
                 name=candidate.name, search_shape=run.shape, start=st.start,
                 from_break=st.from_break)


def evidence_of(runs: list[Run], run_index: int, candidate, basis: str) -> Evidence:
    """The chosen candidate's record against the first evaluation's reference (one trend of
    the reference shape over all history) on the shared origins."""
    ev0, own = runs[0].evaluation, runs[run_index]
    ref = ev0.candidate(ev0.reference)
    rmse, ref_rmse = candidate.metrics["rmse"], ref.metrics["rmse"]
    p = None
    if not (run_index == 0 and candidate.name == ref.name):
        dm, _ = compare_errors(ev0.errors.errors(ref.name),
                               own.evaluation.errors.errors(candidate.name),
                               int(ev0.plan.get("step", 1)))
        p = dm.p_value_better
    others: list[tuple] = []
    for r in runs:
        for c in r.evaluation.candidates:
            if c.name == candidate.name or not eligible(c, r.shape, None) \
                    or any(o[0] == c.name for o in others):
                continue
            others.append((c.name, c.metrics["rmse"],
                           1.0 - c.metrics["rmse"] / ref_rmse if ref_rmse > 0 else None))
    others.sort(key=lambda o: o[1])
    m = candidate.metrics
    return Evidence(reference=ref.name, rmse=rmse, reference_rmse=ref_rmse,
                    gain=1.0 - rmse / ref_rmse if ref_rmse > 0 else None, p_better=p,
                    break_p=_supf(own.breaks), basis=basis,
                    coverage95=m.get("coverage95"), coverage80=m.get("coverage80"),
                    origins=int(ev0.plan.get("count", 0)), runner_up=tuple(others[:2]))


# ---------------------------------------------------------------------------------------------
# the parts of the verdict


def break_dates(series, breakset, model: Model | None = None) -> tuple[BreakDate, ...]:
    """The breaks the model uses (all of its search's breaks for a break-aware strategy; none
    for one trend, a window average or a fixed start); every break when ``model`` is None."""
    if model is not None and (model.strategy in BREAK_FREE or model.start is not None):
        return ()
    out = []
    for b in sorted(breakset.breaks, key=lambda b: b.position):
        lo, hi = int(b.ci95[0]), int(b.ci95[1])
        out.append(BreakDate(int(b.position), series.iso(int(b.position)),
                             series.label(int(b.position)), (series.iso(lo), series.iso(hi)),
                             (series.label(lo), series.label(hi)), (lo, hi)))
    return tuple(out)


def history_advice(series, model: Model, forecast, evaluation, breaks, evidence) -> History:
    """Rule of the module docstring: the start follows from the model; the sweep is cited."""
    start = None
    if model.strategy == "truncated":
        start = int(forecast.fitted_from) or None
        why = ("the chosen trend is fitted only on the history from there"
               if start else "the chosen trend found no usable break to start from")
    elif model.strategy == "separate":
        from .regimes import TERMS, usable_breaks

        kept = usable_breaks([b.position for b in breaks], series.n, TERMS[model.shape] + 1,
                             TERMS[model.shape] + 2)
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
                    f"{num_text(own)} against {num_text(best['rmse'])} from that start)")
    elif best is not None and not follows and best_gain is not None \
            and best_gain >= SWEEP_NOTE:
        n_starts = len(sweep)
        leak = (evaluation.history.evidence or {}).get("leak_free", {}).get("1")
        leak_text = ""
        if leak and leak.get("gain_over_all_history") is not None:
            g = leak["gain_over_all_history"]
            leak_text = (f"; the leak-free trend refitted from the break re-detected at each "
                         f"origin, which a forecaster could have used, was "
                         f"{pct_text(abs(100 * g), 0)} {'better' if g >= 0 else 'worse'} "
                         f"than all history")
        declined = (f"that start was picked with hindsight as the best of {n_starts} fixed "
                    f"starts scored on the same origins, so its gain flatters it{leak_text}, "
                    f"and the chosen model is what the rule accepts on leak-free evidence")
    return History(series.iso(start) if start else None,
                   series.label(start) if start else None, why, best_label, best_gain,
                   declined, str(evaluation.model.get("shape", model.search_shape)))


def growth_now(growth, model: Model) -> GrowthNow | None:
    """The last regime's headline figures of the chosen model's growth table."""
    if growth is None or not growth.regimes:
        return None
    last = growth.last
    pct = last.get("annualised_pct")
    units = last.get("annualised_units")
    shape = growth.spec.shape
    if shape == "exponential":
        base = "compound growth of the exponential trend"
    elif shape == "linear":
        base = ("compound growth of the fitted line from its level at the regime's start to "
                "its level at the end")
    else:
        base = "growth at the regime's end, a year's worth, as a share of the fitted level there"
    strategy = "global" if model.strategy == "window-average" else model.strategy
    shared = growth.kind == "level" and len(growth.regimes) > 1
    since = last.start_label if last.start > 0 else None
    return GrowthNow(pct.value if pct else None,
                     (pct.lower, pct.upper) if pct else (None, None),
                     units.value if units else None,
                     (units.lower, units.upper) if units else (None, None),
                     shape, strategy, since, base, shared, len(growth.regimes))


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
            f"{pct_text(abs(pct or 0.0))} of the level on average, {int(round(share * k))} of "
            f"{k} errors on one side")
    ev = {"window": k, "mean_error_percent": pct, "share_one_sign": share,
          "cusum_crossing": series.label(crossing) if crossing is not None else None,
          "residual_lag1": lag1}
    if outlier is not None and (not failing or outlier.get("explains")):
        when = outlier["label"]
        return Diagnosis("outlier", (
            f"{head}; one period, {when}, is {num_text(outlier['size'])} times the usual "
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
            f"{head}; {cross_text}. A change of regime explains it: the break at {b.label} "
            f"({interval_words(*b.ci95_labels)}), {when}, starts the "
            f"regime the chosen model forecasts from, and one trend over all history is still "
            f"pulled by the earlier regime."), dict(ev, explaining_break=b.label))
    other = _other_shape(runs, ref_shape, model, evidence, start_label, searches)
    if other is not None:
        shape, rmse, ref_rmse, start = other
        with_what = f"fitted on the history from {start}" if start else "with no break"
        return Diagnosis("wrong shape", (
            f"{head}; {cross_text}. The series curves: {_a(shape)} trend {with_what} forecast "
            f"{pct_text(100 * (1 - rmse / ref_rmse), 0)} better on past periods "
            f"(rolling-origin RMSE {num_text(rmse)} against {num_text(ref_rmse)}), so the "
            f"{ref_shape} shape, not a recent change of regime, is what fails."),
            dict(ev, shape=shape))
    found_near = [b for b in found if b.position >= ws - reach] or \
        ([_cross(crossing, found, k)] if _cross(crossing, found, k) else [])
    if found_near and evidence.break_p is not None and evidence.break_p < ALPHA:
        b = found_near[-1]
        why = ("it is too recent for the rolling origin to judge" if not judged_by(runs[0], 0)
               or not _judged(runs, b) else "on past periods that did not pay by the rule")
        return Diagnosis("regime change", (
            f"{head}; {cross_text}, and the break at {b.label} "
            f"({interval_words(*b.ci95_labels)}) explains it; the chosen model does "
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
    return "not available" if x is None else f"{x:.2f}"


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
        p = _supf(b)
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


# ---------------------------------------------------------------------------------------------
# stability


def stability_of(series, runs: list[Run], explicit, wandering, chosen: tuple, prefix_searches,
                 periods: int = 10 ** 6) -> Stability:
    """Rerun the choice without the last 1..``periods`` periods: rescored evaluations (the
    origins the shorter series would have had) and the break searches of the shorter series
    (``prefix_searches``: {k: [BreakSet per run]}). ``chosen`` = (run index, name, breaks)."""
    from .evaluate.subset import origins_known_by, rescored

    unit = _unit(series, 1)
    reruns = []
    changed = None
    checked = 0  # largest k before the first change
    for k in sorted(prefix_searches):
        if k > periods:
            break
        mask = origins_known_by(runs[0].evaluation, series.n - k)
        if int(mask.sum()) < 3:
            break
        pools = [rescored(r.evaluation, mask) for r in runs]
        searches = prefix_searches[k]
        i, best, _ = choose(runs, explicit, wandering, pools, [mask] * len(runs),
                            [_supf(s) for s in searches])
        run = runs[i]
        model = model_of(best, run)
        brks = break_dates(series.head(series.n - k), searches[i], model)
        # The same candidate may be scored in more than one run (the linear run also scores
        # other shapes); what matters is the model and its breaks, not which run chose it.
        same_model = best.name == chosen[1]
        same_breaks = _same_breaks(brks, chosen[2])
        reruns.append({"without_last": k, "model": best.name,
                       "breaks": [b.label for b in brks], "same": same_model and same_breaks})
        if changed is None and not (same_model and same_breaks):
            changed = k
        if changed is None:
            checked = k
    if not reruns:
        return Stability("not checked", 0, None,
                         "Stability was not checked: the series is too short to drop its last "
                         "periods and still score the rolling origin.")
    ks = [r["without_last"] for r in reruns]
    dropped = _list(ks) + " " + _unit(series, 2)
    if changed is None:
        return Stability("stable", ks[-1], None,
                         f"The verdict is stable: without the last {dropped} the same model "
                         f"and the same break dates (within their 95% intervals) are chosen.",
                         tuple(reruns))
    r = next(r for r in reruns if r["without_last"] == changed)
    before = series.label(series.n - 1 - changed)
    what = r["model"] + (f" with breaks at {', '.join(r['breaks'])}" if r["breaks"] else
                         " with no break")
    added = (f"the last {unit} was added" if changed == 1 else
             f"the last {changed} {_unit(series, changed)} were added")
    held = ""
    if checked:
        held = (f" (it holds without the last {_list([x for x in ks if x <= checked])} "
                f"{_unit(series, max(checked, 2)) if checked > 1 else unit})")
    return Stability("changed", ks[-1], changed,
                     f"The verdict changed when {added}{held}: with data to {before} the rule "
                     f"chose {what}. Treat it as fragile and revisit it as data arrive.",
                     tuple(reruns))


def _list(ks) -> str:
    ks = [str(k) for k in ks]
    return ks[0] if len(ks) == 1 else ", ".join(ks[:-1]) + " and " + ks[-1]


def _unit(series, k: int) -> str:
    word = {"year": "year", "quarter": "quarter", "month": "month", "week": "week",
            "day": "day"}.get(series.frequency.unit, "period")
    if series.frequency.step != 1:
        word = "period"
    return word if k == 1 else word + "s"


def _same_breaks(a, b) -> bool:
    if len(a) != len(b):
        return False
    for x, y in zip(a, b):
        lo, hi = y.ci95_positions
        if not lo <= x.position <= hi:
            return False
    return True


def stability_periods(series) -> tuple[int, ...]:
    """Periods dropped, 1 up to a season: 1, 2, 3, then doubling up to the season length
    (at least 3 periods, at most 13, a quarter of weekly data), and the season itself."""
    top = int(min(max(series.frequency.season_length, 3), 13))
    ks = [k for k in (1, 2, 3) if k <= top]
    k = 6
    while k < top:
        ks.append(k)
        k *= 2
    if top not in ks:
        ks.append(top)
    return tuple(ks)


# ---------------------------------------------------------------------------------------------
# sentences


def _model_sentence(series, model: Model, ev: Evidence, start_label) -> str:
    words = strategy_words(model.strategy, model.shape, start_label)
    text = f"Chosen model for {series.name}: {words}"
    if model.strategy == "global" and model.shape == ev.reference.split()[-1]:
        return (text + f". No other candidate beat it on past periods by the rule "
                f"(rolling-origin RMSE {num_text(ev.rmse)}).")
    g = ev.gain or 0.0
    better = "better" if g >= 0 else "worse"
    test = (f"Diebold-Mariano one-sided {p_text(ev.p_better)}, {significance(ev.p_better)}"
            if ev.p_better is not None else "no accuracy test")
    return (text + f": on past periods it forecast {pct_text(abs(100 * g), 0)} {better} than "
            f"one {ev.reference.split()[-1]} trend over all history (rolling-origin RMSE "
            f"{num_text(ev.rmse)} against {num_text(ev.reference_rmse)} over {ev.origins} "
            f"origins; {test}).")


def _breaks_sentence(series, model: Model, breaks, search_breaks: int, break_p) -> str:
    if breaks:
        parts = [f"{b.label} ({interval_words(*b.ci95_labels)})" for b in breaks]
        test = f"sup-F {p_text(break_p)}, {significance(break_p)}"
        lead = "The regime changed in " if len(parts) == 1 else "The regimes changed in "
        return lead + ", ".join(parts[:-1]) + (" and " if len(parts) > 1 else "") + parts[-1] + \
            f" ({test})."
    if search_breaks:
        return (f"The break search under the {model.search_shape} shape found {search_breaks} "
                f"break{'s' if search_breaks > 1 else ''} (sup-F {p_text(break_p)}, "
                f"{significance(break_p)}), but the chosen model does not use "
                f"{'them' if search_breaks > 1 else 'it'}.")
    return (f"No break is used: the break search under the {model.search_shape} shape found "
            f"none (sup-F {p_text(break_p)}).")


def _growth_sentence(g: GrowthNow | None, chosen: str = "") -> str | None:
    if g is None:
        return None
    lo, hi = g.ci95
    ci = (f" (95% interval {pct_text(lo)} to {pct_text(hi)})"
          if lo is not None and hi is not None else "")
    model = strategy_words(g.strategy, g.shape)
    if g.since_label:
        model += f", since {g.since_label}"
    units = ""
    if g.per_year_units is not None:
        ulo, uhi = g.per_year_units_ci95
        uci = (f" (95% interval {num_text(ulo)} to {num_text(uhi)})"
               if ulo is not None and uhi is not None else "")
        units = f"{num_text(g.per_year_units)} units a year{uci}"
    pct = (f"{pct_text(g.annualised_pct)} a year{ci}, {g.base}"
           if g.annualised_pct is not None else None)
    if g.shape == "linear":
        body = units + (f"; as {g.base}, {pct_text(g.annualised_pct)} a year{ci}"
                        if g.annualised_pct is not None else "")
    else:
        body = (pct or "") + (f"; in units, {units}" if units else "")
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
                     f"{pct_text(100 * g, 0)} better than one {h.sweep_shape} trend on all "
                     f"history, but that start is not followed: {h.declined}.")
        elif g > 0:
            text += (f" {sweep} did best from {h.sweep_best_label} ({pct_text(100 * g, 0)} "
                     f"better than one {h.sweep_shape} trend on all history).")
        else:
            text += f" {sweep} found no start that beat all history."
    return text


def _coverage_sentence(ev: Evidence) -> str | None:
    c = ev.coverage95
    if c is None or c >= COVERAGE_FLOOR:
        return None
    return (f"On past periods the chosen model's 95% intervals covered only "
            f"{pct_text(100 * c, 0)} of the actual values (80% intervals: "
            f"{pct_text(100 * (ev.coverage80 or 0), 0)}): its ranges are too narrow, so plan "
            f"with wider ones.")


def coverage_caution(v: Verdict) -> str | None:
    """The caution for intervals that covered far below nominal on the rolling origin."""
    return _coverage_sentence(v.evidence)


def _alternatives_sentence(ev: Evidence) -> str | None:
    if not ev.runner_up:
        return None
    parts = []
    for name, rmse, gain in ev.runner_up:
        g = "" if gain is None else (f", {pct_text(abs(100 * gain), 0)} "
                                     f"{'better' if gain >= 0 else 'worse'} than the reference")
        parts.append(f"{name} (RMSE {num_text(rmse)}{g})")
    return "Alternatives, not chosen: " + "; ".join(parts) + "."


def history_sentence(v: Verdict) -> str:
    return _history_sentence(v.history)


def sentences(v: Verdict) -> tuple[str, ...]:
    start_label = v.history.keep_from_label if v.model.strategy == "truncated" else None
    out = [_model_sentence_for(v, start_label),
           _breaks_sentence(_Named(v.series_name), v.model, v.breaks, v.search_breaks,
                            v.evidence.break_p),
           _growth_sentence(v.growth_now, v.model.strategy), _history_sentence(v.history),
           v.diagnosis.sentence, v.forecast_text, _coverage_sentence(v.evidence),
           v.origin_note, v.stability.sentence, _alternatives_sentence(v.evidence)]
    return tuple(s for s in out if s)


@dataclass(frozen=True)
class _Named:
    name: str


def _model_sentence_for(v: Verdict, start_label) -> str:
    return _model_sentence(_Named(v.series_name), v.model, v.evidence, start_label)


def forecast_sentence(forecast, model: Model, start_label: str | None = None) -> str:
    rows = forecast.rows()
    words = strategy_words(model.strategy, model.shape, start_label)
    first, last = rows[0], rows[-1]
    text = f"Forecast ({words}): {num_text(first['mean'])} for {first['label']}"
    if len(rows) > 1:
        text += f" and {num_text(last['mean'])} for {last['label']}"
    return (text + f", with a 95% range of {num_text(last['lower95'])} to "
            f"{num_text(last['upper95'])} for {last['label']}.")


def build(series, runs: list[Run], run_index: int, candidate, basis: str, growth, forecast,
          stability: Stability, explicit, lag1, wandering, searches=None) -> Verdict:
    """The verdict of the chosen candidate (``choose``), with its growth table and forecast."""
    run = runs[run_index]
    model = model_of(candidate, run)
    evidence = evidence_of(runs, run_index, candidate, basis)
    brks = break_dates(series, run.breaks, model)
    found = break_dates(series, run.breaks)
    hist = history_advice(series, model, forecast, run.evaluation, brks, evidence)
    gnow = growth_now(growth, model)
    diag = diagnose(series, model, runs, brks, found, evidence, lag1, wandering,
                    hist.keep_from_label, searches)
    st = candidate.strategy
    origin_note = _origin_note(series, run, brks)
    v = Verdict(series.name, series.frequency.name, model, evidence, brks,
                len(run.breaks.positions), hist, gnow, st.last_shape or st.shape, st.name,
                forecast_sentence(forecast, model, hist.keep_from_label
                                  if model.strategy == "truncated" else None),
                diag, stability, origin_note, ())
    return _replace_sentences(v)


def judged_by(run: Run, position: int) -> int:
    """Origins that know a shortest regime (the search's trimming) after ``position``."""
    h = int(getattr(run.breaks, "trim_periods", 0) or 1)
    return sum(1 for o in run.evaluation.plan.get("origins", []) if int(o) >= position + h)


def _origin_note(series, run: Run, breaks) -> str | None:
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


def _replace_sentences(v: Verdict) -> Verdict:
    from dataclasses import replace

    return replace(v, sentences=sentences(v))
