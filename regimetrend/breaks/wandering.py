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

Breaks fitted to a random walk absorb part of its wandering, so on short series the break
model's residuals can pass both checks. A second reading (``Wandering.trend_reading``) looks at
one trend over all history: its residuals wander (both checks) and the breaks leave the
residuals still persistent (AR(1) at least ``REMAINS``, 0.6): the breaks did not explain the
wandering. A real jump or kink takes the persistence out (residual AR(1) near 0 after the
break), but so little separates a curve fitted by the wrong shape from a random walk here that
the second reading is used only across shapes (``wanders_under_every_shape``: when some shape's
model leaves little persistence, the persistence was a curve). Measured on 40 draws each
(linear shape, quarterly; ``benchmarks/calibration.py``, wandering rows): random walks with
drift flagged 55/72/88% by the first reading alone and 78/88/100% with the second at 60, 120
and 240 points; a planted jump or kink with white errors 0%, with AR(1) errors of rho 0.5
7/5/0%.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .. import ols

KPSS_CRITICAL_5 = 0.146  # trend case, 5% (Kwiatkowski et al., 1992, Table 1; from memory)
PERSISTENT = 0.8
REMAINS = 0.6  # breaks that leave residual AR(1) this high did not explain a wandering trend


@dataclass(frozen=True)
class Wandering:
    """The wandering verdict and the two statistics behind it."""

    wandering: bool
    kpss: float | None  # KPSS statistic of the chosen model's residuals
    kpss_critical: float
    ar1: float | None  # bias-corrected AR(1) coefficient of those residuals
    lags: int
    trend_kpss: float | None = None  # the same two statistics for one trend over all history
    trend_ar1: float | None = None  # (None when the model has no break)

    def trend_reading(self) -> bool:
        """The second reading: one trend's residuals wander and the breaks leave the model's
        residuals persistent (AR(1) at least ``REMAINS``)."""
        return bool(self.trend_kpss is not None and self.trend_ar1 is not None
                    and self.ar1 is not None and _wanders(self.trend_kpss, self.trend_ar1)
                    and self.ar1 >= REMAINS)

    def to_dict(self) -> dict:
        def num(v):
            return None if v is None or not math.isfinite(v) else float(v)
        return {"wandering": bool(self.wandering), "kpss": num(self.kpss),
                "kpss_critical_5": float(self.kpss_critical), "ar1": num(self.ar1),
                "lags": int(self.lags), "trend_kpss": num(self.trend_kpss),
                "trend_ar1": num(self.trend_ar1)}


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


def _statistics(residuals, design) -> tuple[float, float] | None:
    """(KPSS statistic, bias-corrected AR(1)) of residuals, or None when they cannot be read."""
    e = np.asarray(residuals, dtype=float)
    n = e.size
    scale = float(np.max(np.abs(e))) if n else 0.0
    if n < 8 or not scale > 0 or not math.isfinite(scale):
        return None
    e = e / scale  # scale-free; guards sums of squares against overflow
    return kpss_statistic(e, kpss_lags(n)), ols.residual_ar1(e, ols.smooth_columns(design))


def _wanders(eta: float, rho: float) -> bool:
    return bool(math.isfinite(eta) and eta > KPSS_CRITICAL_5 and rho >= PERSISTENT)


def assess(residuals, design, trend_residuals=None, trend_design=None) -> Wandering:
    """The verdict for the residuals of a fitted break model with its design matrix (the
    first reading); ``trend_residuals`` and ``trend_design`` (one trend over all history, when
    the model has breaks) are read too, for ``Wandering.trend_reading``."""
    lags = kpss_lags(np.asarray(residuals).size)
    own = _statistics(residuals, design)
    if own is None:
        return Wandering(False, None, KPSS_CRITICAL_5, None, lags)
    eta, rho = own
    trend = (_statistics(trend_residuals, trend_design) if trend_residuals is not None
             else None)
    t_eta, t_rho = trend if trend is not None else (None, None)
    return Wandering(_wanders(eta, rho), eta if math.isfinite(eta) else None, KPSS_CRITICAL_5,
                     rho, lags, t_eta if t_eta is not None and math.isfinite(t_eta) else None,
                     t_rho)


def wanders_under_every_shape(assessments) -> bool:
    """Across the break searches of several trend shapes: the series wanders when one of them
    reads as wandering (either reading) and no shape's model leaves residuals less persistent
    than ``REMAINS`` (a shape that does explains the persistence as a curve, not a random
    walk)."""
    found = [w for w in assessments if w is not None]
    if not any(w.wandering or w.trend_reading() for w in found):
        return False
    return all(w.ar1 is not None and w.ar1 >= REMAINS for w in found)
