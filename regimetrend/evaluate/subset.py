"""The same rolling origin scored on fewer origins: the cheap path of the stability check.

An origin ``o`` with horizon H forecasts positions ``o .. o + H - 1`` from positions ``0 .. o -
1`` (breaks re-detected on that history). When the last ``k`` periods of the series are dropped,
every origin with ``o + H <= n - k`` is exactly an origin of the rolling origin run on the
shorter series: its forecasts, its breaks and its targets never touch the dropped periods. So
the candidates can be scored again on those origins without refitting anything: metrics and the
Diebold-Mariano test against the reference are recomputed from the stored forecasts.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..metrics import root_mean_square
from .accuracy_tests import compare_pooled


def origins_known_by(evaluation, length: int) -> np.ndarray:
    """Boolean mask of the origins whose targets all lie in the first ``length`` periods."""
    table = evaluation.errors
    return np.asarray(table.targets[:, -1] < length)


def rescored(evaluation, mask: np.ndarray, names=None) -> dict:
    """{name: CandidateResult scored on the origins in ``mask``} for the ranked candidates
    (or the given ``names``) and the reference, which keeps an empty test. What the rule reads
    is recomputed: the RMSE (``metrics`` holds it alone), the gain over the reference and the
    Diebold-Mariano test against it."""
    table = evaluation.errors
    keep = np.flatnonzero(mask)
    step = int(evaluation.plan.get("step", 1))
    ref_name = evaluation.reference
    e_ref = table.errors(ref_name)[keep]
    names = list(dict.fromkeys([ref_name] + list(names or
                                                 [c.name for c in evaluation.candidates])))
    errors = {name: e_ref if name == ref_name else table.errors(name)[keep] for name in names}
    rmse = {name: root_mean_square(e.ravel()) for name, e in errors.items()}
    others = names[1:]
    tests = dict(zip(others, compare_pooled(e_ref, [errors[name] for name in others], step)))
    ref_rmse = rmse[ref_name]
    out = {}
    for name in names:
        vs = tests[name].to_dict() if name in tests else {"p_value_better": None,
                                                          "note": "the reference itself"}
        gain = 1.0 - rmse[name] / ref_rmse if ref_rmse and ref_rmse > 0 else None
        out[name] = dataclasses.replace(evaluation.candidate(name), metrics={"rmse": rmse[name]},
                                        per_horizon=(), vs_global=vs, gain=gain)
    return out
