"""Forecast-accuracy tests: Diebold and Mariano (1995) with the Harvey, Leybourne and Newbold
(1997) small-sample correction.

For a loss differential d_t (t = 1..T) between two forecasts of the same targets,

    DM  = dbar / sqrt(V / T),   V = gamma_0 + 2 * sum_{k=1}^{h-1} gamma_k,
    gamma_k = (1/T) * sum_{t=k+1}^{T} (d_t - dbar)(d_{t-k} - dbar),

where h - 1 is the number of autocovariances kept (h-step forecasts overlap for h - 1 periods).
HLN multiply DM by sqrt((T + 1 - 2h + h(h-1)/T) / T) and compare it with Student's t on T - 1
degrees of freedom.

Horizon dependence in a rolling origin with origins ``step`` periods apart:
- per horizon h: the h-step errors of successive origins share ceil(h/step) - 1 overlapping
  shocks, so that many autocovariances are kept (h - 1 when the step is one period);
- pooled over horizons 1..H: the loss differential of an origin is the average over its H
  horizons, and the averages of origins less than H periods apart overlap, so ceil(H/step) - 1
  autocovariances are kept.
The HLN factor is applied with h = (autocovariances kept) + 1. When the truncated variance
estimate is not positive (possible with few origins and many lags), Bartlett weights
1 - k/h are used instead, which keep it non-negative (Newey and West, 1987).

Sign: d_t = loss(reference) - loss(candidate), so a positive statistic means the candidate is
more accurate than the reference.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import special


@dataclass(frozen=True)
class DMResult:
    """Diebold-Mariano test of equal accuracy; ``statistic`` is HLN-corrected."""

    statistic: float | None
    p_value: float | None          # two-sided
    p_value_better: float | None   # one-sided: the candidate is more accurate
    df: int
    lags: int
    raw_statistic: float | None
    mean_difference: float
    bartlett: bool

    def to_dict(self) -> dict:
        return {"statistic": _num(self.statistic), "p_value": _num(self.p_value),
                "p_value_better": _num(self.p_value_better), "df": self.df, "lags": self.lags,
                "raw_statistic": _num(self.raw_statistic),
                "mean_loss_difference": _num(self.mean_difference),
                "bartlett_weights": self.bartlett}


def _num(x):
    return None if x is None or not math.isfinite(x) else float(x)


def autocovariances(d: np.ndarray, lags: int, mean: float | None = None) -> np.ndarray:
    """gamma_0..gamma_lags with divisor T, as in Diebold and Mariano (1995); ``mean`` is d's
    mean when the caller has it already."""
    d = np.asarray(d, dtype=float)
    T = d.size
    c = d - (d.mean() if mean is None else mean)
    return np.array([float(c[k:] @ c[:T - k]) / T for k in range(lags + 1)])


def _statistic(d: np.ndarray, lags: int):
    """(HLN statistic or None, raw DM or None, mean difference, lags used, Bartlett used)."""
    T = d.size
    lags = max(0, min(int(lags), T - 1)) if T else 0
    dbar = float(d.mean()) if T else float("nan")
    if T < 2:
        return None, None, dbar, lags, False
    g = autocovariances(d, lags, dbar)
    v = g[0] + 2.0 * g[1:].sum()
    bartlett = False
    if not v > 0:
        w = 1.0 - np.arange(1, lags + 1) / (lags + 1.0)
        v = g[0] + 2.0 * float(w @ g[1:])
        bartlett = True
    if not v > 0:  # identical losses: nothing to test
        return None, None, dbar, lags, bartlett
    raw = dbar / math.sqrt(v / T)
    h = lags + 1
    factor = (T + 1 - 2 * h + h * (h - 1) / T) / T
    stat = raw * math.sqrt(factor) if factor > 0 else float("nan")
    return (stat if math.isfinite(stat) else None), raw, dbar, lags, bartlett


def _tests(diffs, lags_list) -> list[DMResult]:
    """DM tests of several loss differentials, p-values from one vectorised t call
    (``special.stdtr(df, -x)`` is Student's t upper tail, the number ``stats.t.sf(x, df)``
    returns, without the distribution object's argument handling)."""
    parts = [_statistic(np.asarray(d, dtype=float), L) for d, L in zip(diffs, lags_list)]
    dfs = np.array([max(np.asarray(d).size - 1, 1) for d in diffs], dtype=float)
    stats_ = np.array([p[0] if p[0] is not None else np.nan for p in parts])
    p_better = special.stdtr(dfs, -stats_)
    p_two = 2.0 * special.stdtr(dfs, -np.abs(stats_))
    out = []
    for i, (stat, raw, dbar, lags, bart) in enumerate(parts):
        T = np.asarray(diffs[i]).size
        if stat is None:
            out.append(DMResult(None, None, None, max(T - 1, 0), lags, raw, dbar, bart))
        else:
            out.append(DMResult(stat, float(p_two[i]), float(p_better[i]), T - 1, lags, raw,
                                dbar, bart))
    return out


def diebold_mariano(loss_diff, lags: int) -> DMResult:
    """HLN-corrected Diebold-Mariano test on a loss differential with ``lags`` autocovariances."""
    return _tests([np.asarray(loss_diff, dtype=float)], [lags])[0]


def overlap_lags(horizon: int, step: int) -> int:
    """Autocovariances kept for ``horizon``-step errors of origins ``step`` periods apart."""
    return max(0, int(math.ceil(horizon / max(step, 1))) - 1)


def compare_errors(e_ref: np.ndarray, e_cand: np.ndarray, step: int, per_horizon: bool = True
                   ) -> tuple[DMResult, list]:
    """Pooled and per-horizon DM tests on squared-error loss (the pooled test alone, and an
    empty list, with ``per_horizon=False``: the stability reruns read only that one).

    ``e_ref`` and ``e_cand`` are (origins x horizons) arrays of forecast errors."""
    e_ref = np.asarray(e_ref, dtype=float)
    e_cand = np.asarray(e_cand, dtype=float)
    d = e_ref ** 2 - e_cand ** 2
    H = d.shape[1]
    diffs = [d.mean(axis=1)] + ([d[:, j] for j in range(H)] if per_horizon else [])
    lags = [overlap_lags(H, step)] + ([overlap_lags(j + 1, step) for j in range(H)]
                                      if per_horizon else [])
    res = _tests(diffs, lags)
    return res[0], res[1:]


def compare_pooled(e_ref: np.ndarray, e_cands, step: int) -> list[DMResult]:
    """``compare_errors(e_ref, e, step, per_horizon=False)[0]`` for each ``e`` of ``e_cands``,
    with the p-values of all from one vectorised t call (the same numbers, one call): the
    stability reruns test every candidate against the reference on fewer origins."""
    e_ref = np.asarray(e_ref, dtype=float)
    diffs, lags = [], []
    for e in e_cands:
        d = e_ref ** 2 - np.asarray(e, dtype=float) ** 2
        diffs.append(d.mean(axis=1))
        lags.append(overlap_lags(d.shape[1], step))
    return _tests(diffs, lags) if diffs else []
