"""Segment cost: the sum of squared residuals of a trend fitted on a stretch [a, b) of a series.

Every break search asks for thousands of these costs, so they come from prefix sums of the
cross-products of the trend columns with the response: one segment costs O(k^3) arithmetic
whatever its length, and whole blocks of segments are priced at once with numpy.

Numerics (measured by ``benchmarks/bench_breaks.py``, checked in ``tests/test_breaks_search.py``):
plain prefix moments of [1, u, u^2] on a global scaled index get the SSR of 12-point segments at
the end of a 5,000-point series wrong by up to 6% (quadratic) and 6e-6 (linear), relative,
because the columns are nearly collinear there and the segment sums are small differences of
large totals. This module's costs are within 1e-10 (quadratic) and 2e-9 (linear) of a
refined least-squares fit on the same segments. It avoids both losses:

- the columns are re-centred on each segment and made orthogonal over it (discrete orthogonal
  polynomials 1, tau, tau^2 - S2/L with tau = t - midpoint), so the polynomial block of the
  normal equations is diagonal and known exactly in closed form from the segment length;
- the response is first reduced by the global least-squares trend of the same degree (which
  changes no segment cost, since every segment's columns span that trend) and the prefix sums of
  x^q y are accumulated in extended precision and stored as two doubles (high and low part), so
  differences of prefix sums keep about 19 significant digits of the totals.

With ``season_length`` s > 1 the seasonal indicators change with the regime as well
(``seasonal_by_regime``): each segment then has s season means plus the polynomial slope terms
(k = trend terms + s - 1 coefficients). The season counts and the polynomial sums per season are
integers, computed exactly; only their y cross-products use the extended prefix sums.
"""

from __future__ import annotations

import numpy as np


def _split_prefix(values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Prefix sums (with a leading zero row) in extended precision, split into two doubles."""
    ext = np.zeros((values.shape[0] + 1,) + values.shape[1:], dtype=np.longdouble)
    np.cumsum(values.astype(np.longdouble), axis=0, out=ext[1:])
    hi = ext.astype(np.float64)
    lo = (ext - hi.astype(np.longdouble)).astype(np.float64)
    return hi, lo


def _diff(prefix: tuple[np.ndarray, np.ndarray], a, b) -> np.ndarray:
    """Segment sums from split prefix sums; a and b broadcast (gathered once per axis)."""
    hi, lo = prefix
    return (hi[b] - hi[a]) + (lo[b] - lo[a])


def _global_trend_residual(y: np.ndarray, degree: int, season_index: np.ndarray | None,
                           season_length: int) -> np.ndarray:
    """y minus its least-squares polynomial (and season means) over the whole series.

    Subtracting a function that every segment's design can represent leaves every segment cost
    unchanged; it only shrinks the numbers the prefix sums carry."""
    n = len(y)
    u = (np.arange(n) - (n - 1) / 2.0) / max((n - 1) / 2.0, 1.0)
    cols = [u ** p for p in range(0, degree + 1)]
    if season_index is not None and season_length > 1:
        cols = cols[1:] + [(season_index == j).astype(float) for j in range(season_length)]
    X = np.column_stack(cols)
    if n <= X.shape[1]:
        return y - y.mean()
    beta, *_ = np.linalg.lstsq(X, y, rcond=None)
    return y - X @ beta


class SegmentCost:
    """SSR of a polynomial trend of ``degree`` 0 (mean), 1 (linear) or 2 (quadratic) on any segment.

    ``season_index`` (0..s-1 per position) with ``season_length`` s > 1 adds season indicators
    that are re-estimated on every segment. ``min_size`` is the shortest segment priced; shorter
    ones cost ``inf`` (so they can never be chosen).
    """

    def __init__(self, y, degree: int = 1, season_index=None, season_length: int = 1,
                 min_size: int | None = None):
        y = np.asarray(y, dtype=float)
        if y.ndim != 1:
            raise ValueError("y must be one-dimensional")
        if degree not in (0, 1, 2):
            raise ValueError("degree must be 0, 1 or 2")
        self.n = n = len(y)
        self.degree = degree
        self.season_length = s = int(season_length) if season_index is not None else 1
        self.n_params = degree + s if s > 1 else degree + 1
        self.min_size = int(min_size) if min_size is not None else self.n_params + 1
        sidx = None if s == 1 else np.asarray(season_index, dtype=int)
        work = _global_trend_residual(y, degree, sidx, s)
        # Integer time about a global integer centre keeps every x^q exact in a double.
        self._c = n // 2
        x = np.arange(n, dtype=float) - self._c
        self._pyy = _split_prefix(work * work)
        self._py = [_split_prefix(work * x ** q) for q in range(degree + 1)]
        if s > 1:
            ind = np.zeros((n, s))
            ind[np.arange(n), sidx] = 1.0
            self._pcount = np.vstack([np.zeros((1, s)), np.cumsum(ind, axis=0)])
            self._px = [np.vstack([np.zeros((1, s)), np.cumsum(ind * (x ** q)[:, None], axis=0)])
                        for q in range(1, degree + 1)]
            self._psy = _split_prefix(ind * work[:, None])

    # -- public ------------------------------------------------------------------------------
    def cost(self, a: int, b: int) -> float:
        """SSR of the trend fitted on positions a..b-1.

        Without season indicators this is plain float arithmetic on the prefix sums, the same
        operations in the same order as ``costs`` (so the same value to the last bit), about
        ten times faster per call: ruptures' searches ask for one segment at a time, a million
        times on a long series."""
        if self.season_length > 1:
            return float(self.costs(np.asarray([a]), np.asarray([b]))[0])
        a, b = int(a), int(b)
        if b - a < self.min_size or a < 0 or b > self.n:
            return float(np.inf)
        L = float(b - a)

        def diff(prefix):
            hi, lo = prefix
            return (hi.item(b) - hi.item(a)) + (lo.item(b) - lo.item(a))

        syy = diff(self._pyy)
        m = (a + b - 1) / 2.0 - self._c
        y0 = diff(self._py[0])
        ssr = syy - y0 * y0 / L
        if self.degree >= 1:
            x1 = diff(self._py[1])
            r1 = x1 - m * y0
            ssr = ssr - r1 * r1 / (L * (L * L - 1.0) / 12.0)
        if self.degree >= 2:
            x2 = diff(self._py[2])
            y2 = x2 - 2.0 * m * x1 + m * m * y0
            s2 = L * (L * L - 1.0) / 12.0
            r2 = y2 - s2 / L * y0
            ssr = ssr - r2 * r2 / (L * (L * L - 1.0) * (L * L - 4.0) / 180.0)
        return ssr if not ssr < 0.0 else 0.0

    def costs(self, starts, ends) -> np.ndarray:
        """SSR for every pair (starts, ends), broadcast together; ``inf`` where too short.

        Pass a row of starts and a column of ends to price a whole block of segments at once
        (the exact search does this); the prefix sums are gathered once per axis."""
        a = np.clip(np.asarray(starts, dtype=np.intp), 0, self.n)
        b = np.clip(np.asarray(ends, dtype=np.intp), 0, self.n)
        length = b - a
        ok = (length >= self.min_size) & (np.asarray(starts) >= 0) & (np.asarray(ends) <= self.n)
        L = np.where(ok, length, self.min_size).astype(float)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            if self.season_length > 1:
                ssr = self._costs_seasonal(a, b, L)
            else:
                ssr = self._costs_plain(a, b, L)
        return np.where(ok, np.maximum(ssr, 0.0), np.inf)

    # -- internals ---------------------------------------------------------------------------
    def _poly_cross(self, a, b, L):
        """Segment sums of y, tau*y and (tau^2 - S2/L)*y with tau = t - segment midpoint."""
        m = (a + b - 1) / 2.0 - self._c
        y0 = _diff(self._py[0], a, b)
        out = [y0]
        if self.degree >= 1:
            x1 = _diff(self._py[1], a, b)
            out.append(x1 - m * y0)
        if self.degree >= 2:
            x2 = _diff(self._py[2], a, b)
            y2 = x2 - 2.0 * m * x1 + m * m * y0
            s2 = L * (L * L - 1.0) / 12.0
            out.append(y2 - s2 / L * y0)
        return out, m

    @staticmethod
    def _poly_norms(L):
        """Squared norms of the orthogonal polynomials 1, tau, tau^2 - S2/L over L points."""
        return [L, L * (L * L - 1.0) / 12.0, L * (L * L - 1.0) * (L * L - 4.0) / 180.0]

    def _costs_plain(self, a, b, L):
        syy = _diff(self._pyy, a, b)
        cross, _ = self._poly_cross(a, b, L)
        norms = self._poly_norms(L)
        ssr = syy
        for p, r in enumerate(cross):
            ssr = ssr - r * r / norms[p]
        return ssr

    def _costs_seasonal(self, a, b, L):
        """Season means plus polynomial slope terms, by the Schur complement on the seasons."""
        d = self.degree
        syy = _diff(self._pyy, a, b)
        cnt = self._pcount[b] - self._pcount[a]  # (..., s)
        sy = _diff(self._psy, a, b)  # (..., s)
        cross, m = self._poly_cross(a, b, L)
        norms = self._poly_norms(L)
        safe = np.where(cnt > 0, cnt, 1.0)
        ssr = syy - np.sum(np.where(cnt > 0, sy * sy / safe, 0.0), axis=-1)
        if d == 0:
            return ssr
        # Sums of the polynomial columns within each season: tau^q expanded about the midpoint.
        mm = m[..., None]
        raw = [cnt] + [self._px[q - 1][b] - self._px[q - 1][a] for q in range(1, d + 1)]
        cols = [raw[1] - mm * raw[0]]  # per season: sum of p1 = tau
        if d == 2:
            tau2 = raw[2] - 2 * mm * raw[1] + mm * mm * raw[0]
            s2L = ((L * L - 1.0) / 12.0)[..., None]
            cols.append(tau2 - s2L * cnt)  # per season: sum of p2 = tau^2 - S2/L
        # H = P - C' diag(1/cnt) C, v = r_p - C' diag(1/cnt) sy
        inv = np.where(cnt > 0, 1.0 / safe, 0.0)
        v = [cross[1] - np.sum(cols[0] * sy * inv, axis=-1)]
        H11 = norms[1] - np.sum(cols[0] * cols[0] * inv, axis=-1)
        if d == 1:
            return ssr - np.where(H11 > 0, v[0] * v[0] / np.where(H11 > 0, H11, 1.0), 0.0)
        v.append(cross[2] - np.sum(cols[1] * sy * inv, axis=-1))
        # p1 and p2 are orthogonal over the segment, but the season means couple them.
        H22 = norms[2] - np.sum(cols[1] * cols[1] * inv, axis=-1)
        H12 = 0.0 - np.sum(cols[0] * cols[1] * inv, axis=-1)
        det = H11 * H22 - H12 * H12
        good = det > 1e-12 * np.maximum(H11 * H22, 1e-300)
        det = np.where(good, det, 1.0)
        quad = (H22 * v[0] ** 2 - 2 * H12 * v[0] * v[1] + H11 * v[1] ** 2) / det
        return ssr - np.where(good, quad, 0.0)
