"""The first break test calibrated by simulation on the series' own design (a Monte Carlo test).

Question answered: is there at least one break of any of the kinds searched? The asymptotic
sup-F table is exact only for long series; with short series, short regimes, the slope kind
and three kinds tried at once, "any kind rejects at 5%" found false breaks in 9% of 100-point
white-noise series and 16-21% with autocorrelated errors (``benchmarks/calibration.py``).

Statistic, for every kind k and position b in the trimmed range: the F statistic of the break
columns D_b given the no-break design Z (trend and shared seasonal terms),
F_k(b) = (u'u / q) / ((SSR_0 - u'u) / (n - p - q)) with u = O_b'e, O_b an orthonormal basis of
M_Z D_b and e = M_Z y (Frisch-Waugh-Lovell); its supremum sup-F_k (Andrews, 1993). With
``robust`` it is multiplied by gamma_0 / omega^2 of the residuals of the model without a break
(the null model), omega^2 the AR(1)-prewhitened Bartlett long-run variance with Andrews' (1991)
bandwidth (Andrews and Monahan, 1992), capped at 1. Estimated under the null, the long-run
variance keeps the statistic close to pivotal whatever the autocorrelation: in 3,000 simulated
100-point series per cell its 5% rejection rate against the asymptotic table stayed at 2-3%
(level, both) and 5-6% (slope) for AR(1) errors with rho from 0 to 0.6, where the factor from
the residuals of the model with the break (which soak up low-frequency autocorrelation) gave
8-14%. Its known cost is power lost to large breaks that inflate the null residuals' long-run
variance (Vogelsang, 1999); measured size-adjusted power stayed at 85-95% of the classical
test's for rho up to 0.3 and about 65-90% at rho 0.6.

Null distribution: the same statistics computed on ``replications`` series of Gaussian white
noise on the same design and trimming (the statistic does not depend on the trend
coefficients or the noise scale), which makes the test exact for white noise and, the statistic
being nearly pivotal, close to its level for autocorrelated errors: a Monte Carlo test (Dufour,
2006). A kind's p-value is the share of simulated series at least as large. With several kinds
the decision is single-step min-p (Westfall and Young, 1993): each kind's p-value is compared
with the simulated distribution of the smallest p-value over kinds, so the chance of a false
break of any kind is the level.

Everything is vectorised over replications and positions. The generator has a fixed seed, so a
series always gets the same p-values.

The null distribution depends on the design only (Z, kinds, degree, trimming, robust scaling,
replications and seed), not on the data, so it is computed once per design and process and kept
(``NullCache``, least recently used first out, bounded in bytes): every later series of the same
length, shape and seasons (a portfolio; a shape whose design equals another's, as the
exponential and linear shapes do on their own scales) reads the same simulated statistics and
gets p-values identical to a fresh simulation. The key holds the exact bytes of Z.
"""

from __future__ import annotations

import hashlib
import math
import threading
from collections import OrderedDict
from dataclasses import dataclass

import numpy as np

REPLICATIONS = 199
SEED = 20261202
MAX_LENGTH = 600  # longer series: the asymptotic table (memory grows as n^2)
CACHE_BYTES = 64 * 2 ** 20  # simulated designs kept per process (the demo analysis: 30 designs, 8 MB)


def break_columns(n: int, positions, kind: str, degree: int) -> np.ndarray:
    """D_b of a kind for every b in ``positions``, (positions, n, q), on a time index scaled to
    [0, 1): level 1{t >= b}; slope (t - b)^p 1{t >= b}, p = 1..degree; both p = 0..degree (the F
    statistic does not depend on the scaling)."""
    t = np.arange(n, dtype=float) / n
    b = np.asarray(positions, dtype=int)
    on = np.arange(n)[None, :] >= b[:, None]
    d = np.where(on, t[None, :] - t[b][:, None], 0.0)
    powers = {"level": [0], "slope": list(range(1, degree + 1)),
              "both": list(range(0, degree + 1))}[kind]
    return np.stack([on.astype(float) if p == 0 else d ** p for p in powers], axis=-1)


@dataclass(frozen=True, eq=False)
class KindScan:
    """One kind's break columns with Z projected out and orthonormalised, per position, so the
    F numerator at b is |O_b' e|^2 and the fit of the break O_b O_b' e."""

    kind: str
    positions: np.ndarray  # candidate break positions
    basis: np.ndarray  # (positions, n, q) orthonormal basis of M_Z D_b

    @property
    def q(self) -> int:
        return self.basis.shape[2]


def kind_scan(q_basis: np.ndarray, kind: str, degree: int, h: int) -> KindScan:
    n = q_basis.shape[0]
    positions = np.arange(h, n - h + 1)
    D = break_columns(n, positions, kind, degree)
    D = D - q_basis @ (q_basis.T @ D)
    D = D - q_basis @ (q_basis.T @ D)  # second pass: re-orthogonalisation
    basis, _ = np.linalg.qr(D)
    return KindScan(kind, positions, basis)


def _orthonormal_basis(Z: np.ndarray) -> np.ndarray:
    norms = np.linalg.norm(Z, axis=0)
    q, r = np.linalg.qr(Z / np.where(norms > 0, norms, 1.0))
    keep = np.abs(np.diag(r)) > 1e-10 * max(np.abs(np.diag(r)).max(), 1e-300)
    return q[:, keep]


def prewhitened_lrv_columns(E: np.ndarray) -> np.ndarray:
    """``ols.prewhitened_long_run_variance`` of every column of E at once."""
    E = np.asarray(E, dtype=float)
    den = np.einsum("ij,ij->j", E[:-1], E[:-1])
    rho = np.where(den > 0, np.einsum("ij,ij->j", E[1:], E[:-1]) / np.where(den > 0, den, 1), 0)
    rho = np.clip(rho, -0.97, 0.97)
    V = E[1:] - rho * E[:-1]
    m = V.shape[0]
    dv = np.einsum("ij,ij->j", V[:-1], V[:-1])
    r = np.where(dv > 0, np.einsum("ij,ij->j", V[1:], V[:-1]) / np.where(dv > 0, dv, 1), 0)
    r = np.clip(r, -0.97, 0.97)
    alpha = 4.0 * r ** 2 / ((1.0 - r) ** 2 * (1.0 + r) ** 2)
    S = 1.1447 * (alpha * m) ** (1.0 / 3.0)
    lrv = np.einsum("ij,ij->j", V, V) / m
    top = int(min(math.ceil(float(S.max())) if S.size else 0, m - 1))
    for j in range(1, top + 1):
        w = np.where(j < S, 1.0 - j / np.where(S > 0, S, 1.0), 0.0)
        lrv = lrv + 2.0 * w * np.einsum("ij,ij->j", V[j:], V[:-j]) / m
    return lrv / (1.0 - rho) ** 2


def robust_factor_columns(E: np.ndarray) -> np.ndarray:
    """min(1, gamma_0 / omega^2) per column (1 where either is not positive)."""
    lrv = prewhitened_lrv_columns(E)
    g0 = np.einsum("ij,ij->j", E, E) / E.shape[0]
    ok = (lrv > 0) & (g0 > 0)
    return np.where(ok, np.minimum(1.0, g0 / np.where(ok, lrv, 1.0)), 1.0)


def supf_paths(scan: KindScan, E: np.ndarray, dof: int) -> tuple[np.ndarray, np.ndarray]:
    """(sup-F, index of the argmax position) for every column of the null residuals E (n x R)."""
    P, n, q = scan.basis.shape
    V = (scan.basis.transpose(0, 2, 1).reshape(P * q, n) @ E).reshape(P, q, -1)
    num = np.einsum("pqr,pqr->pr", V, V)
    ssr0 = np.einsum("ij,ij->j", E, E)
    rest = np.maximum(ssr0[None, :] - num, 1e-12 * ssr0[None, :] + 1e-300)
    F = (num / q) / (rest / (dof - q))
    best = np.argmax(F, axis=0)
    return F[best, np.arange(E.shape[1])], best


def residualise(q_basis: np.ndarray, E: np.ndarray) -> np.ndarray:
    return E - q_basis @ (q_basis.T @ E)


@dataclass(frozen=True)
class Calibration:
    """The calibrated first test: per kind its statistic, argmax, simulated p-value and 95%
    critical value; the min-p adjusted p-values over kinds."""

    statistics: dict  # kind -> (scaled) sup-F of the series
    positions: dict  # kind -> argmax position
    p_values: dict  # kind -> simulated p-value of that kind alone
    adjusted: dict  # kind -> min-p adjusted p-value (Westfall and Young), level over all kinds
    critical95: dict  # kind -> simulated 95% quantile of that kind's statistic
    replications: int
    level: float

    @property
    def p_any(self) -> float:
        """p-value of "no break of any kind searched"."""
        return min(self.adjusted.values())

    def rejects(self, kind: str) -> bool:
        return self.adjusted[kind] <= self.level


def null_scaled_supf(scan: KindScan, E: np.ndarray, dof: int, robust: bool, factor=None
                     ) -> tuple[np.ndarray, np.ndarray]:
    """(sup-F scaled by the null residuals' factor, argmax position) per column of E.
    ``factor``: ``robust_factor_columns(E)`` when already computed (it does not depend on the
    kind)."""
    sup, best = supf_paths(scan, E, dof)
    if robust:
        sup = sup * (robust_factor_columns(E) if factor is None else factor)
    return sup, scan.positions[best]


@dataclass(frozen=True, eq=False)
class NullDesign:
    """What a design's Monte Carlo test needs, data aside: the basis of Z, the kinds' scans and
    the simulated statistics per kind with the replications' min-p over kinds."""

    basis: np.ndarray  # orthonormal basis of Z
    dof: int
    scans: dict  # kind -> KindScan
    boot: dict  # kind -> (replications,) simulated scaled sup-F
    min_rep: np.ndarray  # (replications,) smallest per-kind p-value of each replication
    critical95: dict  # kind -> simulated 95% quantile

    @property
    def nbytes(self) -> int:
        return int(self.basis.nbytes + sum(s.basis.nbytes for s in self.scans.values())
                   + sum(b.nbytes for b in self.boot.values()) + self.min_rep.nbytes)


class NullCache:
    """Simulated null designs by key, least recently used dropped beyond ``limit`` bytes.
    Thread-safe; a process keeps one (``NULLS``)."""

    def __init__(self, limit: int = CACHE_BYTES):
        self.limit = int(limit)
        self._items: OrderedDict = OrderedDict()
        self._bytes = 0
        self._lock = threading.Lock()
        self.hits = self.misses = 0

    def get(self, key):
        with self._lock:
            item = self._items.get(key)
            if item is None:
                self.misses += 1
                return None
            self._items.move_to_end(key)
            self.hits += 1
            return item

    def put(self, key, item: NullDesign) -> None:
        size = item.nbytes
        if size > self.limit:
            return
        with self._lock:
            if key in self._items:
                return
            self._items[key] = item
            self._bytes += size
            while self._bytes > self.limit:
                _, old = self._items.popitem(last=False)
                self._bytes -= old.nbytes

    def clear(self) -> None:
        with self._lock:
            self._items.clear()
            self._bytes = 0
            self.hits = self.misses = 0


NULLS = NullCache()


def null_design(Z: np.ndarray, kinds, degree: int, h: int, robust: bool,
                replications: int = REPLICATIONS, seed: int = SEED,
                cache: NullCache | None = NULLS) -> NullDesign:
    """The simulated null of the first test on design Z (computed, or read from ``cache``)."""
    Z = np.ascontiguousarray(Z, dtype=float)
    kinds = tuple(kinds)
    key = (Z.shape, hashlib.sha1(Z.tobytes()).hexdigest(), kinds, int(degree), int(h),
           bool(robust), int(replications), int(seed))
    found = cache.get(key) if cache is not None else None
    if found is not None:
        return found
    n = Z.shape[0]
    qb = _orthonormal_basis(Z)
    dof = n - qb.shape[1]
    scans = {k: kind_scan(qb, k, degree, h) for k in kinds}
    rng = np.random.default_rng(seed)
    sims = residualise(qb, rng.standard_normal((n, replications)))
    factor = robust_factor_columns(sims) if robust else None
    boot = {k: null_scaled_supf(scan, sims, dof, robust, factor)[0] for k, scan in scans.items()}
    # each replication's p-value against all replications, per kind; the smallest over kinds
    min_rep = np.ones(replications)
    for k in kinds:
        order = np.sort(boot[k])
        at_least = replications - np.searchsorted(order, boot[k], side="left")
        min_rep = np.minimum(min_rep, at_least / (replications + 1))
    crit = {k: float(np.quantile(boot[k], 0.95)) for k in kinds}
    for a in [qb, min_rep, *boot.values(), *(s.basis for s in scans.values())]:
        a.setflags(write=False)  # shared between calls: read only
    made = NullDesign(qb, dof, scans, boot, min_rep, crit)
    if cache is not None:
        cache.put(key, made)
    return made


def calibrate(y: np.ndarray, Z: np.ndarray, kinds, degree: int, h: int, robust: bool = True,
              level: float = 0.05, replications: int = REPLICATIONS, seed: int = SEED,
              cache: NullCache | None = NULLS) -> Calibration:
    """Run the calibrated first test on response y with null design Z (see the module text).
    ``cache=None`` simulates afresh (the results are the same either way)."""
    y = np.asarray(y, dtype=float)
    kinds = tuple(kinds)
    null = null_design(Z, kinds, degree, h, robust, replications, seed, cache)
    qb, dof = null.basis, null.dof
    e = y - qb @ (qb.T @ y)
    factor = robust_factor_columns(e[:, None]) if robust else None
    stats, where = {}, {}
    for k, scan in null.scans.items():
        s, b = null_scaled_supf(scan, e[:, None], dof, robust, factor)
        stats[k], where[k] = float(s[0]), int(b[0])
    boot = null.boot
    p_values = {k: float(1 + np.sum(boot[k] >= stats[k] * (1 - 1e-12))) / (replications + 1)
                for k in kinds}
    adjusted = {k: (float(1 + np.sum(null.min_rep <= p_values[k] * (1 + 1e-12)))
                    / (replications + 1) if len(kinds) > 1 else p_values[k]) for k in kinds}
    return Calibration(stats, where, p_values, adjusted, dict(null.critical95), replications,
                       level)
