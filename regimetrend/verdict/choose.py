"""The rule that chooses one model per series among the evaluation's candidates.

RULE (``RULE`` below, shown with every verdict)

1. Break searches. With ``--shape auto`` (the default) the full-sample break search runs under
   every shape the series allows (exponential only for positive values). The rolling-origin
   evaluation runs under the linear shape; under the other shape that needs fewest breaks when
   it needs fewer than the linear one (ties go to the exponential shape, which has as few terms
   as the linear one); and under every other shape that needs as many breaks as the linear one
   when that is at least one (an exponential series with one break in its growth rate would
   otherwise be judged only with breaks dated by the linear search). All evaluations use
   the same origins. An explicit ``--shape`` runs one evaluation under that shape, and only
   models of that shape are chosen. An evaluation run for a shape needing as many breaks as
   the linear one takes part in step 3 only when its winner uses breaks (its break-free
   candidates were already judged in the linear evaluation).
2. Within one evaluation the candidates considered are the global trend and the window average
   (of any shape under ``auto``; they use no breaks) and the break-aware strategies of the
   evaluation's own shape (so their breaks come from their own shape's search). The global
   trend of the evaluation's shape is kept unless another candidate has a lower rolling-origin
   RMSE and either (a) the Diebold-Mariano test finds it more accurate at the 5% level, or
   (b) it is break-aware, at least 10% better and the sup-F test finds a break at the 5%
   level (for break dates given by the analyst, the F test of those dates), or (c) the
   series wanders (the break search's wandering flag) and it is at least 10% better (with a
   wandering series break tests cannot separate a break from the wandering, so accuracy alone
   decides). Among the candidates that qualify the lowest RMSE wins.
3. Between the evaluations' winners (``auto`` only; taken in the order linear, exponential,
   quadratic, the survivor against the next), the one using fewer breaks (global
   trends and window averages use none) is kept unless the other has a lower RMSE and either
   the Diebold-Mariano test on the shared origins finds it more accurate at the 5% level or it
   is at least 10% better with a significant break in its own search. With equally many breaks
   a quadratic trend (one term more) must likewise be more accurate by the test or at least 10%
   better than a linear or exponential one; otherwise the lower RMSE wins. Parsimony, then
   evidence.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..evaluate import breakinfo
from ..evaluate.accuracy_tests import compare_errors
from ..evaluate.recommend import ALPHA, LARGE_GAIN, recommend
from .fields import BREAK_FREE, Evidence, Model, Run

RULE = ("One model is chosen per series. Each rolling-origin evaluation keeps the global trend "
        "of its shape unless another candidate has a lower RMSE and either the Diebold-Mariano "
        f"test finds it more accurate at the {ALPHA:.0%} level, or it is regime-aware, at least "
        f"{LARGE_GAIN:.0%} better and the sup-F test (for break dates given by the analyst, the F "
        f"test of those dates) finds a break at the {ALPHA:.0%} level, or "
        f"the series wanders and it is at least {LARGE_GAIN:.0%} better. Under the automatic "
        "shape, the linear evaluation, that of the shape needing fewest breaks when fewer, and "
        "that of every shape needing as many breaks (at least one) each give a winner; of two "
        "winners "
        "the one using fewer breaks is kept unless the other is "
        f"more accurate by the Diebold-Mariano test or at least {LARGE_GAIN:.0%} better with a "
        "significant break; with as many breaks, a quadratic trend must be more accurate by the "
        f"test or at least {LARGE_GAIN:.0%} better than a linear or exponential one.")


def search_shapes(searches: dict, explicit: str | None) -> tuple[str, ...]:
    """Shapes that get a rolling-origin evaluation (rule step 1). ``searches``: {shape:
    BreakSet} in the order linear, exponential, quadratic."""
    if explicit:
        return (explicit,)
    base = "linear"
    count = {s: len(b.positions) for s, b in searches.items()}
    order = {"exponential": 0, "quadratic": 1}
    fewer = [s for s in searches if s != base and count[s] < count[base]]
    others = [s for s in searches if s != base and count[s] == count[base] > 0]
    if fewer:
        others.append(min(fewer, key=lambda s: (count[s], order.get(s, 2))))
    return (base, *sorted(others, key=lambda s: order.get(s, 2)))


def supf(breakset):
    """The sup-F p-value of a break search, or for dates the analyst gave the F test of those
    dates (``evaluate.breakinfo``)."""
    return breakinfo.supf_pvalue(breakset)


def eligible(candidate, run_shape: str, explicit: str | None) -> bool:
    """Rule step 2: the candidate is considered in the evaluation of ``run_shape``."""
    return considered(candidate.strategy, run_shape, explicit)


def considered(st, run_shape: str, explicit: str | None) -> bool:
    """``eligible`` for a strategy (``regimes.Strategy``): what an evaluation after the first
    needs to offer (``analyze``)."""
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
    p = supf(run.breaks) if break_p == "search" else break_p
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


def _complexity(candidate, run: Run) -> tuple[int, int]:
    """(breaks used, extra trend terms): a quadratic trend has one term more than a linear or
    exponential one; parsimony compares breaks first, then terms."""
    return uses_breaks(candidate, run), int(candidate.strategy.shape == "quadratic")


def _errors(run: Run, name: str, mask=None):
    e = run.evaluation.errors.errors(name)
    return e if mask is None else e[np.flatnonzero(mask)]


def choose(runs: list[Run], explicit: str | None, wandering: bool = False, rescored=None,
           masks=None, break_p=None):
    """Rule steps 2 and 3: (run index, CandidateResult, basis).

    ``rescored`` (stability reruns) gives per run {name: CandidateResult} scored on fewer
    origins (``masks``), and ``break_p`` per run the sup-F p of the shortened series' search."""
    winners = []
    ps = [supf(r.breaks) for r in runs] if break_p is None else list(break_p)
    for i, run in enumerate(runs):
        pool = rescored[i] if rescored is not None else None
        best, basis = _within(run, pool, explicit, wandering, ps[i])
        if i and uses_breaks(best, run) == 0 and \
                len(run.breaks.positions) >= len(runs[0].breaks.positions):
            continue  # a run kept for its own break dates that wins with none adds nothing
        winners.append((i, best, basis, run))
    i, best, basis, run = winners[0]
    for j, other, obasis, orun in winners[1:]:
        ka, kb = _complexity(best, run), _complexity(other, orun)
        ra, rb = best.metrics["rmse"], other.metrics["rmse"]
        if ka == kb:
            if rb < ra:
                i, best, basis, run = j, other, f"{obasis}; lower RMSE than {best.name}", orun
            continue
        simple, complex_ = ((i, best, basis, run), (j, other, obasis, orun)) if ka < kb else \
            ((j, other, obasis, orun), (i, best, basis, run))
        more_breaks = max(ka, kb)[0] > min(ka, kb)[0]
        mask = masks[0] if masks is not None else None
        dm, _ = compare_errors(_errors(simple[3], simple[1].name, mask),
                               _errors(complex_[3], complex_[1].name, mask),
                               int(runs[0].evaluation.plan.get("step", 1)))
        p = dm.p_value_better
        rs, rc = simple[1].metrics["rmse"], complex_[1].metrics["rmse"]
        gain = 1.0 - rc / rs if rs > 0 else 0.0
        bp = ps[complex_[0]]
        backed = not more_breaks or (bp is not None and bp < ALPHA)
        what = "more breaks" if more_breaks else "a curved trend"
        if rc < rs and ((p is not None and p < ALPHA) or (gain >= LARGE_GAIN and backed)):
            i, best, basis, run = complex_[0], complex_[1], \
                f"{complex_[2]}; {what}, but more accurate than {simple[1].name}", \
                complex_[3]
        else:
            fewer = "fewer breaks" if more_breaks else "a straight or exponential trend"
            i, best, basis, run = simple[0], simple[1], \
                f"{simple[2]}; {fewer} than {complex_[1].name}", simple[3]
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
                    break_p=supf(own.breaks), basis=basis,
                    coverage95=m.get("coverage95"), coverage80=m.get("coverage80"),
                    origins=int(ev0.plan.get("count", 0)), runner_up=tuple(others[:2]),
                    break_test=breakinfo.test_name(own.breaks),
                    breaks_given=bool(getattr(own.breaks, "given", False)))
