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

from .accuracy_tests import compare_errors
from .scores import score


def origins_known_by(evaluation, length: int) -> np.ndarray:
    """Boolean mask of the origins whose targets all lie in the first ``length`` periods."""
    table = evaluation.errors
    return np.asarray(table.targets[:, -1] < length)


def rescored(evaluation, mask: np.ndarray, names=None) -> dict:
    """{name: CandidateResult scored on the origins in ``mask``} for the ranked candidates
    (or the given ``names``); the reference keeps an empty test."""
    table = evaluation.errors
    keep = np.flatnonzero(mask)
    step = int(evaluation.plan.get("step", 1))
    ref_name = evaluation.reference
    e_ref = table.errors(ref_name)[keep]
    names = names or [c.name for c in evaluation.candidates]
    out = {}
    ref_rmse = None
    scored = {}
    for name in dict.fromkeys([ref_name] + list(names)):
        i = table.index(name)
        m = score(table.actual[keep], table.forecast[i][keep], table.lower80[i][keep],
                  table.upper80[i][keep], table.lower95[i][keep], table.upper95[i][keep],
                  table.scale[keep][:, None])
        scored[name] = m
        if name == ref_name:
            ref_rmse = m["rmse"]
    for name, m in scored.items():
        base = evaluation.candidate(name)
        if name == ref_name:
            vs = {"p_value_better": None, "note": "the reference itself"}
        else:
            pooled, _ = compare_errors(e_ref, table.errors(name)[keep], step, per_horizon=False)
            vs = pooled.to_dict()
        gain = 1.0 - m["rmse"] / ref_rmse if ref_rmse and ref_rmse > 0 else None
        out[name] = dataclasses.replace(base, metrics=m, per_horizon=(), vs_global=vs,
                                        gain=gain)
    return out
