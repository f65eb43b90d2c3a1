"""Does the series wander like a random walk around its trend? (stochastic, not broken, trend)

Break tests, their intervals and trend extrapolation assume deviations from the trend that
return to it. When they behave like a random walk, a trend with breaks is the wrong model:
breaks are found (or missed) by accident and the CUSUM paths drift whatever happened. Two
statistics of the residuals of the chosen break model decide it together:

- the KPSS statistic (Kwiatkowski, Phillips, Schmidt and Shin, 1992) with a trend: the
  partial sums S_t of the residuals, eta = sum S_t^2 / (n^2 omega^2), omega^2 the Bartlett
  long-run variance with floor(4 (n/100)^(1/4)) lags (their l4); stationarity is rejected at 5%
  above 0.146 (their table for the trend case; from memory);
- the residuals' AR(1) coefficient, bias-corrected (``ols.residual_ar1``), at least
  ``PERSISTENT`` (0.8).

KPSS alone rejects for merely persistent stationary errors (measured 16-17% at rho 0.6 and
60-240 points), and a high AR(1) coefficient alone is common in short stationary samples; both
together flagged 69-98% of random walks of 60-240 points and few series with rho up to 0.6
(``benchmarks/calibration.py``). The verdict qualifies the breaks; it does not remove them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .. import ols

KPSS_CRITICAL_5 = 0.146  # trend case, 5% (Kwiatkowski et al., 1992, Table 1; from memory)
PERSISTENT = 0.8


@dataclass(frozen=True)
class Wandering:
    """The wandering verdict and the two statistics behind it."""

    wandering: bool
    kpss: float | None  # KPSS statistic of the chosen model's residuals
    kpss_critical: float
    ar1: float | None  # bias-corrected AR(1) coefficient of those residuals
    lags: int

    def to_dict(self) -> dict:
        def num(v):
            return None if v is None or not math.isfinite(v) else float(v)
        return {"wandering": bool(self.wandering), "kpss": num(self.kpss),
                "kpss_critical_5": float(self.kpss_critical), "ar1": num(self.ar1),
                "lags": int(self.lags)}


def kpss_lags(n: int) -> int:
    """floor(4 (n/100)^(1/4)) (Kwiatkowski et al., 1992, l4)."""
    return int(math.floor(4.0 * (n / 100.0) ** 0.25))


def kpss_statistic(residuals, lags: int) -> float:
    """eta = sum S_t^2 / (n^2 omega^2), omega^2 the Bartlett long-run variance with ``lags``."""
    e = np.asarray(residuals, dtype=float)
    n = e.size
    s = np.cumsum(e)
    lrv = float(e @ e) / n
    for j in range(1, min(lags, n - 1) + 1):
        lrv += 2.0 * (1.0 - j / (lags + 1.0)) * float(e[j:] @ e[:-j]) / n
    if not lrv > 0:
        return math.nan
    return float(s @ s) / (n * n * lrv)


def assess(residuals, design) -> Wandering:
    """The verdict for the residuals of a fitted break model with its design matrix."""
    e = np.asarray(residuals, dtype=float)
    n = e.size
    lags = kpss_lags(n)
    scale = float(np.max(np.abs(e))) if n else 0.0
    if n < 8 or not scale > 0 or not math.isfinite(scale):
        return Wandering(False, None, KPSS_CRITICAL_5, None, lags)
    e = e / scale  # scale-free; guards sums of squares against overflow
    eta = kpss_statistic(e, lags)
    rho = ols.residual_ar1(e, ols.smooth_columns(design))
    flag = bool(math.isfinite(eta) and eta > KPSS_CRITICAL_5 and rho >= PERSISTENT)
    return Wandering(flag, eta if math.isfinite(eta) else None, KPSS_CRITICAL_5, rho, lags)
