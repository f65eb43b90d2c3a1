"""Chow (1960) F test of a break at a known position.

The coefficients of ``X_changing`` may differ before and after ``position`` (the first period
of the new regime); those of ``X_fixed`` (for example seasonal terms) are shared by both
regimes. Restricted model: y on [X_changing, X_fixed]. Unrestricted model: y on
[X_changing, X_changing * 1{t >= position}, X_fixed]. Then

    F = ((SSR_r - SSR_u) / df1) / (SSR_u / df2),  df1 = columns of X_changing,
    df2 = n - 2 * columns(X_changing) - columns(X_fixed),

with the p-value from the F(df1, df2) distribution (exact for Gaussian white-noise errors).
A perfect unrestricted fit has no finite statistic: it is returned as None (p-value 0).
"""

from __future__ import annotations

import numpy as np
from scipy import stats

from .. import ols
from ..errors import InputError


def _as_matrix(a, n: int, name: str) -> np.ndarray:
    a = np.asarray(a, dtype=float)
    if a.ndim == 1:
        a = a.reshape(n, -1) if a.size else np.zeros((n, 0))
    if a.ndim != 2 or a.shape[0] != n:
        raise InputError(f"Chow test: {name} must have one row per period ({n}), "
                         f"got shape {a.shape}")
    return a


def chow_test(y, X_changing, X_fixed, position) -> dict:
    """F test of a break at exactly ``position``; returns statistic, p_value, df1, df2."""
    y = np.asarray(y, dtype=float).ravel()
    n = y.size
    Xc = _as_matrix(X_changing, n, "the changing terms")
    Xf = _as_matrix(X_fixed if X_fixed is not None else np.zeros((n, 0)), n, "the shared terms")
    kc, kf = Xc.shape[1], Xf.shape[1]
    if kc == 0:
        raise InputError("Chow test: at least one term must be allowed to change")
    b = int(position)
    if not 0 < b < n:
        raise InputError(f"Chow test: break position {b} must lie between 1 and {n - 1}")
    if min(b, n - b) < kc:
        raise InputError(f"Chow test: a break at position {b} leaves a regime with fewer than "
                         f"{kc} periods, too few to fit its own trend")
    df1, df2 = kc, n - 2 * kc - kf
    if df2 <= 0:
        raise InputError(f"Chow test: {n} periods are too few for {2 * kc + kf} coefficients")
    after = (np.arange(n) >= b).astype(float)[:, None]
    try:
        restricted = ols.fit(np.column_stack([Xc, Xf]), y)
        unrestricted = ols.fit(np.column_stack([Xc, Xc * after, Xf]), y)
    except ols.RankDeficient as exc:
        raise InputError(f"Chow test at position {b}: the design cannot be fitted on both "
                         f"sides ({exc})") from None
    ssr_u = unrestricted.ssr
    gain = max(restricted.ssr - ssr_u, 0.0)
    if ssr_u <= 0.0:
        statistic = float("inf") if gain > 0 else float("nan")
        p_value = 0.0 if gain > 0 else float("nan")
    else:
        statistic = (gain / df1) / (ssr_u / df2)
        p_value = float(stats.f.sf(statistic, df1, df2))
    # JSON-safe: a perfect fit has no finite statistic (reported as None).
    finite = lambda v: float(v) if np.isfinite(v) else None
    return {"statistic": finite(statistic), "p_value": finite(p_value),
            "df1": int(df1), "df2": int(df2)}
