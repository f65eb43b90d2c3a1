"""One evaluation's candidates scored against another reference trend on the same origins.

Under the automatic shape the verdict may choose a model from the evaluation of another shape
(quadratic, say) while everything it says is measured against one trend over all history of the
reference shape (linear). The chosen evaluation holds that trend too, forecast at the same
origins (a global trend uses no breaks, so its errors are the same in every evaluation): its
gains and Diebold-Mariano tests are recomputed against it, so the ranking table and the charts
name the same reference as the sentences. The history sweep keeps its gains over one trend of
its own shape, which the history advice names."""

from __future__ import annotations

from dataclasses import replace

from .accuracy_tests import compare_errors
from .result import Evaluation


def against_reference(evaluation: Evaluation, reference: str) -> Evaluation:
    """``evaluation`` with ``reference`` (a candidate's name) as its reference; unchanged when
    that is already the reference or the candidate is not ranked in it."""
    names = {c.name for c in evaluation.candidates}
    if reference == evaluation.reference or reference not in names:
        return evaluation
    table = evaluation.errors
    e_ref = table.errors(reference)
    ref_rmse = next(c.metrics["rmse"] for c in evaluation.candidates if c.name == reference)
    step = int(evaluation.plan.get("step", 1))
    horizons = e_ref.shape[1]

    def rebased(c):
        gain = 1.0 - c.metrics["rmse"] / ref_rmse if ref_rmse > 0 else None
        if c.name == reference:
            vs: dict = {"statistic": None, "p_value": None, "p_value_better": None,
                        "note": "the reference itself", "per_horizon": []}
        else:
            pooled, by_h = compare_errors(e_ref, table.errors(c.name), step)
            vs = dict(pooled.to_dict(), loss="squared error",
                      pooled_over=f"horizons 1..{horizons}, averaged per origin",
                      per_horizon=[dict(r.to_dict(), horizon=j + 1)
                                   for j, r in enumerate(by_h)])
        return replace(c, vs_global=vs, gain=gain)

    # the history sweep keeps its gains over one trend of its own shape: the history advice
    # names that trend
    return replace(evaluation, reference=reference,
                   candidates=tuple(rebased(c) for c in evaluation.candidates))
