"""Confidence intervals for break dates.

Two constructions:

``break_interval``: Bai (1997), in the form of Bai and Perron (2003, section 5.3). For a break
with coefficient change Delta on the changing regressors x_t,

    L (k_hat - k0)  =>  argmax_s V(s),   L = (Delta' Q1 Delta)^2 / (Delta' Omega1 Delta),
    V(s) = W1(-s) - |s|/2             for s <= 0,
           sqrt(phi) W2(s) - xi |s|/2  for s > 0,
    xi = Delta' Q2 Delta / Delta' Q1 Delta,   phi = Delta' Omega2 Delta / Delta' Omega1 Delta,

W1, W2 independent standard Brownian motions, Q_i the second moments of x_t and Omega_i the
long-run variance of x_t u_t in regime i (before: 1, after: 2). We take Omega_i = sigma_i^2 Q_i:
white-noise errors whose variance may differ between the regimes (the heterogeneous form), with
sigma_i^2 = SSR_i / n_i from the fit with the break; optionally sigma_i^2 is the Bartlett
long-run variance of the regime's residuals, for serially correlated errors. The
interval for k0 is [k_hat - floor(c_hi / L) - 1, k_hat - floor(c_lo / L) + 1] with c_lo, c_hi
the (1 -/+ level)/2 quantiles of argmax V; its CDF is evaluated in closed form (derived below)
and inverted with a bracketing root finder.

Trending regressors: Q_i is not constant over time when x_t contains t. What matters for the
argmax is the size of the change near the break, so Delta' Q_i Delta is the mean of
(Delta' x_t)^2 over a neighbourhood of w periods on side i. The neighbourhood is chosen as the
stretch the interval itself covers: start with the whole side, compute the interval, set w to its
95% half-width on that side (at least 2 periods, at most the side), and repeat until w settles
(at most 20 rounds). For a pure level shift (Delta' x_t constant) this changes nothing.

``profile_interval``: the likelihood-ratio confidence set of Hansen (2000),
{b : (SSR(b) - min SSR) / sigma2 <= c}, c = -2 ln(1 - sqrt(level)), reported as its smallest and
largest member. Used for the continuous (slope) kind, where Bai's result does not apply.

Derivation of the CDF of argmax V. On each side the running maximum of W(u) - u/2 is Exp(1).
Rescaling time (u = s xi^2 / phi) turns the right side into r (W(u) - u/2) with r = phi / xi.
For a side in standard units, with the other side's maximum V ~ Exp(rate rho) in those units,
P(argmax beyond t on this side) = E[exp(Y_t - max(V, S_t))], Y_t the process at t and S_t its
running maximum. Integrating V out and using the joint law of (S_t, Y_t) gives

    h(t, rho) = g(t, 1) - g(t, 1 + rho) / (1 + rho),
    g(t, 1)       = (2 + t/2) Phibar(sqrt(t)/2) - sqrt(t) phi(sqrt(t)/2),
    g(t, 1 + rho) = (2 + 1/rho) exp(rho (rho+1) t / 2) Phibar((rho + 1/2) sqrt(t))
                    - Phibar(sqrt(t)/2) / rho,

so G(x) = h(|x|, 1/r) for x < 0 and G(x) = 1 - h(x xi^2 / phi, r) for x > 0. For xi = phi = 1
this is the known symmetric law 1 + sqrt(x / 2 pi) e^(-x/8) - (x+5)/2 Phi(-sqrt(x)/2)
+ 3/2 e^x Phi(-3 sqrt(x)/2) (Yao, 1987; Bai, 1997).
"""

from __future__ import annotations

import math

import numpy as np
from scipy import optimize, special

from .. import ols
from ..errors import InputError

DEFAULT_LEVELS = (0.90, 0.95)


def _log_phibar(z: float) -> float:
    return float(special.log_ndtr(-z))


def _tail_beyond(t: float, rho: float) -> float:
    """h(t, rho): probability that the argmax lies beyond time t on a standard side."""
    if t <= 0.0:
        return rho / (1.0 + rho)
    st = math.sqrt(t)
    phibar_half = math.exp(_log_phibar(st / 2.0))
    g1 = (2.0 + t / 2.0) * phibar_half - st * math.exp(-t / 8.0) / math.sqrt(2.0 * math.pi)
    log_e = rho * (rho + 1.0) * t / 2.0 + _log_phibar((rho + 0.5) * st)
    g2 = (2.0 + 1.0 / rho) * math.exp(log_e) - phibar_half / rho
    return max(0.0, g1 - g2 / (1.0 + rho))


def argmax_cdf(x: float, xi: float = 1.0, phi: float = 1.0) -> float:
    """P(argmax V <= x) for Bai's two-sided process with ratios xi and phi."""
    r = phi / xi
    if x < 0:
        return _tail_beyond(-x, 1.0 / r)
    return 1.0 - _tail_beyond(x * xi * xi / phi, r)


def argmax_quantile(p: float, xi: float = 1.0, phi: float = 1.0) -> float:
    """Inverse of ``argmax_cdf`` by Brent's method on an expanding bracket."""
    if not 0.0 < p < 1.0:
        raise InputError(f"quantile probability must lie strictly between 0 and 1, got {p}")
    f = lambda x: argmax_cdf(x, xi, phi) - p
    at_zero = f(0.0)
    if at_zero == 0.0:
        return 0.0
    step = -1.0 if at_zero > 0 else 1.0  # the CDF at 0 already exceeds p: the root is below 0
    a, b = 0.0, step
    while f(b) * at_zero > 0:
        a, b = b, b * 2.0
        if abs(b) > 1e9:
            raise InputError("break-date interval: argmax quantile did not converge")
    lo, hi = min(a, b), max(a, b)
    return float(optimize.brentq(f, lo, hi, xtol=1e-10, rtol=1e-12))


def _check_levels(levels) -> tuple:
    levels = tuple(float(v) for v in levels)
    for v in levels:
        if not 0.0 < v < 1.0:
            raise InputError(f"confidence level must lie strictly between 0 and 1, got {v}")
    return levels


def _bai_bounds(k_hat: int, L: float, xi: float, phi: float, level: float) -> tuple[int, int]:
    c_lo = argmax_quantile((1.0 - level) / 2.0, xi, phi)
    c_hi = argmax_quantile((1.0 + level) / 2.0, xi, phi)
    return (int(k_hat - math.floor(c_hi / L) - 1), int(k_hat - math.floor(c_lo / L) + 1))


def _long_run_variance(u: np.ndarray) -> float:
    """Bartlett-kernel (Newey-West) long-run variance of a residual stretch, mean zero."""
    n = u.size
    lags = ols.newey_west_lags(n)
    value = float(u @ u) / n
    for j in range(1, min(lags, n - 1) + 1):
        value += 2.0 * (1.0 - j / (lags + 1.0)) * float(u[j:] @ u[:-j]) / n
    return value


def break_interval(y, X, position, segment_start, segment_end, changing: list[int],
                   levels=DEFAULT_LEVELS, *, autocorrelated: bool = False
                   ) -> dict[float, tuple[int, int]]:
    """Bai (1997) interval for the break at ``position`` between [start, position) and
    [position, end); ``changing`` are the columns of X whose coefficients change.

    ``autocorrelated=True`` replaces each regime's noise variance by its Bartlett long-run
    variance (Omega_i = lrv_i Q_i), which widens the interval when residuals are serially
    correlated. Returns {level: (first, last)} of admissible break positions, clipped to
    segment_start + 1 .. segment_end - 1.
    """
    y = np.asarray(y, dtype=float).ravel()
    X = np.asarray(X, dtype=float)
    if X.ndim != 2 or X.shape[0] != y.size:
        raise InputError(f"break-date interval: design has {X.shape[0] if X.ndim == 2 else '?'} "
                         f"rows but the series has {y.size} values")
    start, end, b = int(segment_start), int(segment_end), int(position)
    if not (0 <= start < b < end <= y.size):
        raise InputError(f"break-date interval: position {b} must lie inside the segment "
                         f"{start}..{end - 1}")
    changing = [int(c) for c in changing]
    if not changing or any(c < 0 or c >= X.shape[1] for c in changing):
        raise InputError(f"break-date interval: changing columns {changing} do not name "
                         f"columns 0..{X.shape[1] - 1}")
    levels = _check_levels(levels)
    ys, Xs = y[start:end], X[start:end]
    after = (np.arange(start, end) >= b).astype(float)
    Xc = Xs[:, changing]
    design = np.column_stack([Xs, Xc * after[:, None]])
    try:
        res = ols.fit(design, ys)
    except ols.RankDeficient as exc:
        raise InputError(f"break-date interval at position {b}: the regimes are too short "
                         f"for the design ({exc})") from None
    delta = res.beta[Xs.shape[1]:]
    change = Xc @ delta  # Delta' x_t at every period of the segment
    u = res.residuals
    n1, n2 = b - start, end - b
    if autocorrelated:
        sigma1, sigma2 = _long_run_variance(u[:n1]), _long_run_variance(u[n1:])
    else:
        sigma1 = float(u[:n1] @ u[:n1]) / n1
        sigma2 = float(u[n1:] @ u[n1:]) / n2
    lo_clip, hi_clip = start + 1, end - 1
    whole = {lv: (lo_clip, hi_clip) for lv in levels}
    if sigma1 <= 0.0 or sigma2 <= 0.0:
        exact = (min(max(b, lo_clip), hi_clip),) * 2
        return {lv: exact for lv in levels}
    sq = change ** 2
    w1, w2 = n1, n2
    bounds = whole
    for _ in range(20):
        q1 = float(sq[n1 - w1:n1].mean())
        q2 = float(sq[n1:n1 + w2].mean())
        if q1 <= 0.0 or q2 <= 0.0 or not math.isfinite(q1 * q2):
            return whole
        L = q1 / sigma1
        xi = q2 / q1
        phi = xi * sigma2 / sigma1
        bounds = {lv: _bai_bounds(b, L, xi, phi, lv) for lv in levels}
        lo95, hi95 = bounds[max(levels)]
        new_w1 = int(min(n1, max(2, b - lo95)))
        new_w2 = int(min(n2, max(2, hi95 - b)))
        if (new_w1, new_w2) == (w1, w2):
            break
        w1, w2 = new_w1, new_w2
    return {lv: (max(lo_clip, lo), min(hi_clip, hi)) for lv, (lo, hi) in bounds.items()}


def profile_threshold(level: float) -> float:
    """Hansen's (2000) likelihood-ratio critical value -2 ln(1 - sqrt(level))."""
    level = _check_levels([level])[0]
    return -2.0 * math.log(1.0 - math.sqrt(level))


def profile_interval(ssr_by_position: np.ndarray, positions: np.ndarray, sigma2: float,
                     levels=DEFAULT_LEVELS) -> dict[float, tuple[int, int]]:
    """Hansen (2000) likelihood-ratio set {b : (SSR(b) - min SSR)/sigma2 <= c}, as (min, max)."""
    ssr = np.asarray(ssr_by_position, dtype=float).ravel()
    pos = np.asarray(positions).ravel()
    if ssr.size == 0 or ssr.size != pos.size:
        raise InputError(f"profile interval: {ssr.size} SSR values for {pos.size} positions")
    if not np.all(np.isfinite(ssr)):
        raise InputError("profile interval: the SSR profile contains missing or infinite values")
    sigma2 = float(sigma2)
    if not (sigma2 > 0.0) or not math.isfinite(sigma2):
        raise InputError(f"profile interval: noise variance must be positive, got {sigma2}")
    levels = _check_levels(levels)
    lr = (ssr - ssr.min()) / sigma2
    out = {}
    for lv in levels:
        inside = pos[lr <= profile_threshold(lv)]
        out[lv] = (int(inside.min()), int(inside.max()))
    return out
