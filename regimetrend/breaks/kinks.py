"""Break searches where neighbouring regimes share coefficients: kinks and pure level shifts.

This is the fast increment form of the regime design (``regimetrend.regime_design``): the same
model, written so that a whole profile of break positions is priced in one pass.

A break adds columns that are zero before it. For the kinds handled here:

- ``slope``: hinge terms (t - b)^p for t >= b, p = 1 (and p = 2 for the quadratic shape): the
  trend stays continuous at b and its slope (and curvature) change — a kinked, piecewise trend;
- ``level``: a step 1{t >= b}: the intercept shifts, the slope is shared by all regimes;

plus, with ``seasonal_by_regime``, the seasonal columns times the step. The seasonal dummies
shared by all regimes sit in the base design, so this is the partial structural change model
solved exactly (no back-and-forth iteration is needed for these kinds).

Because the regimes are tied together, segment costs do not add up and the dynamic programme
does not apply. Instead:

- one break, given any fixed design (the base plus other breaks): the SSR at *every* candidate
  position comes from one pass of suffix sums, by Frisch-Waugh-Lovell: with Q an orthonormal
  basis of the fixed design and e its residuals, SSR(b) = SSR0 - r' G^-1 r, r = W_b' e,
  G = W_b'W_b - (Q'W_b)'(Q'W_b). Each entry is a suffix sum of t^q times a fixed vector,
  expanded binomially about b; time is counted back from the last period, so the short suffixes
  of late breaks (the ones analysts need most) carry no cancellation;
- up to two breaks: exact, by scanning the second break for every position of the first
  (``GRID_LENGTH`` caps the series length for two; longer series use the refinement);
- more breaks: a documented refinement. Starting points are the exact ``both`` solution with
  the same number of breaks and the best solution with one break fewer plus the best added
  break; from each, every break in turn is moved to its best position with the others fixed,
  until no move lowers the SSR (at most ``MAX_SWEEPS`` sweeps). The result is a local optimum
  (coordinate-wise), reported as such.
"""

from __future__ import annotations

from math import comb

import numpy as np

from ..regime_design import break_powers

GRID_LENGTH = 1500  # exact two-break grid up to this length
# From this length on, a scan sums the power terms over its own stretch of candidates only
# (the rest of the series enters as one total), instead of over the whole series twice: the
# same sums in another order (equal to about 1e-13), about half the work and memory.
WINDOW_LENGTH = 20_000
MAX_SWEEPS = 20


def break_terms(kind: str, degree: int, seasonal: np.ndarray | None = None) -> list:
    """The columns a break adds in increment form, as (multiplier or None, power) pairs:
    1{t>=b} h (t-b)^p. They span the same space as the regime design's break columns
    (``regime_design.RegimeDesign``), in raw periods so the power sums below stay exact."""
    terms: list[tuple[np.ndarray | None, int]] = [(None, p) for p in break_powers(kind, degree)]
    if seasonal is not None:
        terms += [(seasonal[:, j], 0) for j in range(seasonal.shape[1])]
    return terms


def break_block(n: int, b: int, terms) -> np.ndarray:
    """The columns of one break at position b, explicitly (n x len(terms))."""
    t = np.arange(n, dtype=float)
    on = t >= b
    cols = []
    for h, p in terms:
        c = np.where(on, (t - b) ** p, 0.0)
        cols.append(c if h is None else c * h)
    return np.column_stack(cols)


def design_with_breaks(Z: np.ndarray, positions, terms) -> np.ndarray:
    n = Z.shape[0]
    blocks = [Z] + [break_block(n, b, terms) for b in positions]
    return np.hstack(blocks)


def _orthonormal(X: np.ndarray) -> np.ndarray:
    norms = np.linalg.norm(X, axis=0)
    q, r = np.linalg.qr(X / np.where(norms > 0, norms, 1.0))
    keep = np.abs(np.diag(r)) > 1e-10
    return q[:, keep]


def _extend_orthonormal(base_q: np.ndarray, extra: np.ndarray) -> np.ndarray:
    """An orthonormal basis of [span(base_q), extra] from the basis ``base_q`` already known:
    the extra columns (scaled to unit length) are projected off it twice (classical
    Gram-Schmidt with reorthogonalisation) and factorised on their own, dropping those left
    with no new direction, as ``_orthonormal`` does. On long series this replaces a QR of the
    whole design at every scan by one of the few break columns."""
    if extra.shape[1] == 0:
        return base_q
    norms = np.linalg.norm(extra, axis=0)
    E = extra / np.where(norms > 0, norms, 1.0)
    for _ in range(2):
        E = E - base_q @ (base_q.T @ E)
    q, r = np.linalg.qr(E)
    keep = np.abs(np.diag(r)) > 1e-10
    return np.hstack([base_q, q[:, keep]])


def _basis(fixed: np.ndarray, base: tuple[int, np.ndarray] | None) -> np.ndarray:
    """Orthonormal basis of ``fixed``; with ``base`` = (k, basis of its first k columns) the
    known basis is extended instead of factorising all columns again."""
    if base is None:
        return _orthonormal(fixed)
    return _extend_orthonormal(base[1], fixed[:, base[0]:])


class OneBreakScan:
    """SSR of ``y`` on the fixed design plus one break, for every candidate position at once.

    Early breaks have long suffixes whose columns are nearly in the span of the base trend, so
    G would be a small difference of large numbers. When the fixed design contains every
    polynomial h (t - b)^p the break adds (``complete``; true for the trend and seasonal bases
    used here), the break columns may be replaced by their mirror images h (t - b)^p 1{t < b}
    without changing the column space; breaks in the first half use those short prefixes.
    """

    def __init__(self, y: np.ndarray, fixed: np.ndarray, terms, complete: bool = True,
                 pair_memo: dict | None = None, base: tuple[int, np.ndarray] | None = None):
        self.y = y = np.asarray(y, dtype=float)
        self.n = n = len(y)
        self.terms = terms
        self.complete = complete
        Q = _basis(fixed, base)
        self.e = y - Q @ (Q.T @ y)
        self.ssr0 = float(self.e @ self.e)
        self.Q = Q
        self.t = np.arange(n, dtype=float)
        # The sums of products of break columns depend on n and the terms only, so scans of
        # one search may share them (``pair_memo``).
        self._pair_memo: dict = pair_memo if pair_memo is not None else {}

    def _pair_sums(self, i: int, j: int, qmax: int, suffix: bool) -> np.ndarray | None:
        """``_sums`` of h_i h_j (term multipliers; None = all ones), once per scan: the
        two-break grid asks for the same sums in every block of pairs. None where the
        product is zero everywhere (two different season indicators), which adds nothing."""
        key = (min(i, j), max(i, j), qmax, suffix)
        if key not in self._pair_memo:
            hi, hj = self.terms[i][0], self.terms[j][0]
            if hi is None and hj is None:
                w = np.ones(self.n)
            elif hi is None or hj is None:
                w = np.asarray(hj if hi is None else hi, dtype=float)
            else:
                w = hi * hj
            self._pair_memo[key] = self._sums(w, qmax, suffix)[:, 0, :] if np.any(w) else None
        return self._pair_memo[key]

    def _sums(self, w: np.ndarray, qmax: int, suffix: bool) -> np.ndarray:
        """S[q, m, b] = sum of w_t x_t^q over t >= b (suffix, x = t - (n-1)) or over t < b
        (prefix, x = t), for q = 0..qmax and b = 0..n-1 (w: (n,) or (n, m))."""
        w = w if w.ndim == 2 else w[:, None]
        x = self.t - (self.n - 1) if suffix else self.t
        powers = x[None, :, None] ** np.arange(qmax + 1)[:, None, None]
        prod = powers * w[None, :, :]
        if suffix:
            out = np.cumsum(prod[:, ::-1, :], axis=1)[:, ::-1, :]
        else:
            out = np.concatenate([np.zeros_like(prod[:, :1, :]),
                                  np.cumsum(prod, axis=1)[:, :-1, :]], axis=1)
        return np.moveaxis(out, 1, -1)  # (q, m, n)

    def _window_sums(self, w: np.ndarray, qmax: int, suffix: bool, lo: int, hi: int
                     ) -> np.ndarray:
        """``_sums`` for b = lo..hi only, S[q, m, b - lo]: the stretch cumulated, the rest of
        the series (after hi for suffixes, before lo for prefixes) added as one total."""
        w = w if w.ndim == 2 else w[:, None]
        x = self.t - (self.n - 1) if suffix else self.t
        qs = np.arange(qmax + 1)
        seg = slice(lo, hi + 1)
        prod = x[seg][None, :, None] ** qs[:, None, None] * w[None, seg, :]
        if suffix:
            rest = slice(hi + 1, self.n)
            out = np.cumsum(prod[:, ::-1, :], axis=1)[:, ::-1, :]
        else:
            rest = slice(0, lo)
            out = np.concatenate([np.zeros_like(prod[:, :1, :]),
                                  np.cumsum(prod, axis=1)[:, :-1, :]], axis=1)
        out += ((x[rest][None, :] ** qs[:, None]) @ w[rest])[:, None, :]
        return np.moveaxis(out, 1, -1)  # (q, m, hi - lo + 1)

    def _nonzero_pairs(self, suffix: bool) -> list:
        """Term pairs whose product is not zero everywhere, grouped by their powers:
        [((p1, p2), rows i, columns j, stacked sums (pairs, q, n))]."""
        key = ("pairs", suffix)
        if key not in self._pair_memo:
            kw = len(self.terms)
            groups: dict = {}
            for i in range(kw):
                for j in range(kw):
                    p1, p2 = self.terms[i][1], self.terms[j][1]
                    S = self._pair_sums(i, j, p1 + p2, suffix)
                    if S is not None:
                        groups.setdefault((p1, p2), []).append((i, j, S))
            self._pair_memo[key] = [
                (powers, np.array([g[0] for g in got]), np.array([g[1] for g in got]),
                 np.stack([g[2] for g in got])) for powers, got in groups.items()]
        return self._pair_memo[key]

    @staticmethod
    def _expand(S: np.ndarray, p: int, beta: np.ndarray, cand: np.ndarray) -> np.ndarray:
        """sum of w (x - beta)^p over the stretch, from the power sums S[q, ..., b]."""
        total = np.zeros(cand.shape)
        for q in range(p + 1):
            total = total + comb(p, q) * (-beta) ** (p - q) * S[q][..., cand]
        return total

    def parts(self, candidates) -> dict:
        """Per candidate: r = W'e, QW = Q'W, G = W'MW, and which form of the columns was used."""
        cand = np.asarray(candidates, dtype=np.intp)
        kw, kq = len(self.terms), self.Q.shape[1]
        out = {"cand": cand, "r": np.zeros((cand.size, kw)), "QW": np.zeros((cand.size, kq, kw)),
               "G": np.zeros((cand.size, kw, kw)), "A": np.zeros((cand.size, kw, kw))}
        early: np.ndarray = cand < self.n // 2 if self.complete else np.zeros(cand.size, dtype=bool)
        out["prefix"] = early
        for mask, suffix in ((~early, True), (early, False)):
            if mask.any():
                r, QW, A = self._parts(cand[mask], suffix)
                out["r"][mask], out["QW"][mask], out["A"][mask] = r, QW, A
                out["G"][mask] = A - np.einsum("cqi,cqj->cij", QW, QW)
        return out

    def scan(self, candidates) -> np.ndarray:
        """SSR with one added break at each candidate position."""
        P = self.parts(candidates)
        return np.maximum(self.ssr0 - _gain(P["r"], P["G"], P["A"]), 0.0)

    def _parts(self, cand: np.ndarray, suffix: bool):
        n, terms, Q = self.n, self.terms, self.Q
        beta = cand - (n - 1.0) if suffix else cand.astype(float)
        ones = np.ones(n)
        hs = [ones if h is None else h for h, _ in terms]
        kw = len(terms)
        r = np.empty((cand.size, kw))
        QW = np.empty((cand.size, Q.shape[1], kw))
        windowed = n >= WINDOW_LENGTH and cand.size > 0
        lo = int(cand.min()) if windowed else 0
        at = cand - lo
        for j, (_h, p) in enumerate(terms):
            cols = np.column_stack([hs[j] * self.e, Q * hs[j][:, None]])
            S = (self._window_sums(cols, p, suffix, lo, int(cand.max())) if windowed
                 else self._sums(cols, p, suffix))
            r[:, j] = self._expand(S[:, 0, :], p, beta, at)
            QW[:, :, j] = self._expand(S[:, 1:, :], p, beta[None, :], at).T
        A = np.zeros((cand.size, kw, kw))
        for i in range(kw):
            for j in range(i, kw):
                p = terms[i][1] + terms[j][1]
                pair = self._pair_sums(i, j, p, suffix)
                if pair is not None:
                    A[:, i, j] = A[:, j, i] = self._expand(pair, p, beta, cand)
        return r, QW, A

    def cross(self, b1: np.ndarray, b2: np.ndarray, pre1: np.ndarray, pre2: np.ndarray
              ) -> np.ndarray:
        """W(b1)'W(b2) for pairs b1 < b2 (kw x kw each), in the forms chosen by ``parts``.

        Both suffixes overlap on t >= b2, both prefixes on t < b1; a prefix and a suffix do
        not overlap at all."""
        n, terms = self.n, self.terms
        kw = len(terms)
        out = np.zeros(b1.shape + (kw, kw))
        both_suf = ~pre1 & ~pre2
        both_pre = pre1 & pre2
        for mask, suffix in ((both_suf, True), (both_pre, False)):
            if not mask.any():
                continue
            x1, x2 = b1[mask], b2[mask]
            at = x2 if suffix else x1
            shift = (n - 1.0) if suffix else 0.0
            be1, be2 = x1 - shift, x2 - shift
            block = np.zeros((x1.size, kw, kw))
            for (p1, p2), rows, cols, SS in self._nonzero_pairs(suffix):
                total = 0.0
                for q1 in range(p1 + 1):
                    for q2 in range(p2 + 1):
                        total = total + (comb(p1, q1) * comb(p2, q2)
                                         * (-be1) ** (p1 - q1) * (-be2) ** (p2 - q2)
                                         * SS[:, q1 + q2, at])
                block[:, rows, cols] = np.swapaxes(total, 0, 1)
            out[mask] = block
        return out


def _gain(r: np.ndarray, G: np.ndarray, A: np.ndarray) -> np.ndarray:
    """r' G^-1 r per row, zero where G is numerically singular (no new direction)."""
    k = r.shape[1]
    if k == 1:
        g = G[:, 0, 0]
        ok = g > 1e-10 * np.maximum(A[:, 0, 0], 1e-300)
        return np.where(ok, r[:, 0] ** 2 / np.where(ok, g, 1.0), 0.0)
    gain = np.zeros(r.shape[0])
    try:
        sol = np.linalg.solve(G, r[:, :, None])[:, :, 0]
        gain = np.einsum("ci,ci->c", r, sol)
    except np.linalg.LinAlgError:
        for c in range(r.shape[0]):
            sol, *_ = np.linalg.lstsq(G[c], r[c], rcond=1e-10)
            gain[c] = r[c] @ sol
    return np.clip(gain, 0.0, None)


def best_pair(y, Z, terms, h: int, complete: bool = True, chunk: int = 2_000_000
              ) -> tuple[tuple[int, int] | None, float]:
    """Exact best two breaks (b1 + h <= b2, both h from the ends), all pairs at once.

    Joint Frisch-Waugh-Lovell on the base: with G_i = W_i'M W_i, C = W_1'M W_2 and
    r_i = W_i'e, the gain of the pair is [r1; r2]' [[G1, C], [C', G2]]^-1 [r1; r2]."""
    y = np.asarray(y, dtype=float)
    n = len(y)
    scan = OneBreakScan(y, Z, terms, complete)
    cand = _admissible(h, n - h)
    if cand.size < 2:
        return None, scan.ssr0
    P = scan.parts(cand)
    kw = len(terms)
    i1, i2 = np.nonzero((cand[None, :] - cand[:, None]) >= h)  # i1 row (first), i2 column
    best, best_ssr = None, np.inf
    step = max(1, chunk // max(kw * kw * 4, 1))
    for s0 in range(0, i1.size, step):
        a, b = i1[s0:s0 + step], i2[s0:s0 + step]
        W12 = scan.cross(cand[a], cand[b], P["prefix"][a], P["prefix"][b])
        C = W12 - np.matmul(np.swapaxes(P["QW"][a], 1, 2), P["QW"][b])
        G = np.zeros((a.size, 2 * kw, 2 * kw))
        G[:, :kw, :kw], G[:, kw:, kw:] = P["G"][a], P["G"][b]
        G[:, :kw, kw:], G[:, kw:, :kw] = C, np.swapaxes(C, 1, 2)
        r = np.concatenate([P["r"][a], P["r"][b]], axis=1)
        if kw == 1:
            g1, g2, c = G[:, 0, 0], G[:, 1, 1], G[:, 0, 1]
            det = g1 * g2 - c * c
            ok = det > 1e-10 * np.maximum(P["A"][a, 0, 0] * P["A"][b, 0, 0], 1e-300)
            gain = np.where(ok, (g2 * r[:, 0] ** 2 - 2 * c * r[:, 0] * r[:, 1]
                                 + g1 * r[:, 1] ** 2) / np.where(ok, det, 1.0), 0.0)
        else:
            scale = np.sqrt(np.maximum(np.einsum("cii->ci", G), 1e-300))
            Gs = G / scale[:, :, None] / scale[:, None, :]
            rs = r / scale
            try:
                gain = np.einsum("ci,ci->c", rs, np.linalg.solve(Gs, rs[:, :, None])[:, :, 0])
            except np.linalg.LinAlgError:
                gain = np.array([rs[c] @ np.linalg.lstsq(Gs[c], rs[c], rcond=1e-10)[0]
                                 for c in range(a.size)])
        ssr = scan.ssr0 - np.clip(gain, 0.0, None)
        k = int(np.argmin(ssr))
        if ssr[k] < best_ssr:
            best, best_ssr = (int(cand[a[k]]), int(cand[b[k]])), float(max(ssr[k], 0.0))
    return best, best_ssr


def _admissible(lo: int, hi: int) -> np.ndarray:
    """Positions b with lo <= b <= hi."""
    return np.arange(lo, hi + 1) if hi >= lo else np.zeros(0, dtype=np.intp)


def best_single(y, Z, terms, lo: int, hi: int, others=(), pair_memo: dict | None = None,
                base: tuple[int, np.ndarray] | None = None
                ) -> tuple[int | None, float, np.ndarray, np.ndarray]:
    """Best position in [lo, hi] for one break with ``others`` fixed: (b, ssr, cands, profile).
    ``pair_memo``: sums of break-column products shared by scans of the same n and terms;
    ``base``: (columns of Z, orthonormal basis of Z) to extend (``ScanMemo.base``)."""
    fixed = design_with_breaks(Z, sorted(others), terms)
    scan = OneBreakScan(y, fixed, terms, pair_memo=pair_memo, base=base)
    cand = _admissible(lo, hi)
    if cand.size == 0:
        return None, scan.ssr0, cand, np.zeros(0)
    prof = scan.scan(cand)
    k = int(np.argmin(prof))
    return int(cand[k]), float(prof[k]), cand, prof


def ssr_with(y, Z, terms, positions, base: tuple[int, np.ndarray] | None = None) -> float:
    X = design_with_breaks(Z, sorted(positions), terms)
    Q = _basis(X, base)
    e = y - Q @ (Q.T @ y)
    return float(e @ e)


class ScanMemo:
    """Memo of one-break scans within one search: the same (others, range) is scanned once."""

    def __init__(self, y, Z, terms):
        self.y, self.Z, self.terms = y, Z, terms
        self.memo: dict = {}
        self.pair_memo: dict = {}  # shared by every scan of this memo (``OneBreakScan``)
        self._base: list = []

    @property
    def base(self) -> tuple[int, np.ndarray] | None:
        """(columns of Z, orthonormal basis of Z), factorised once, for series of
        ``WINDOW_LENGTH`` points or more (shorter ones keep one QR per scan, and today's
        numbers to the last bit)."""
        if not self._base:
            long = len(self.y) >= WINDOW_LENGTH
            self._base.append((self.Z.shape[1], _orthonormal(self.Z)) if long else None)
        return self._base[0]

    def best(self, lo: int, hi: int, others) -> tuple[int | None, float]:
        key = (lo, hi, tuple(sorted(others)))
        if key not in self.memo:
            b, s, _, _ = best_single(self.y, self.Z, self.terms, lo, hi, key[2], self.pair_memo,
                                     self.base)
            self.memo[key] = (b, s)
        return self.memo[key]


def refine(y, Z, terms, positions, n, h, scans: ScanMemo | None = None
           ) -> tuple[tuple[int, ...], float]:
    """Move one break at a time to its best position given the others, to a local optimum."""
    scans = scans or ScanMemo(y, Z, terms)
    pos = sorted(int(p) for p in positions)
    current = ssr_with(y, Z, terms, pos, scans.base)
    for _ in range(MAX_SWEEPS):
        moved = False
        for i in range(len(pos)):
            lo = (pos[i - 1] + h) if i > 0 else h
            hi = (pos[i + 1] - h) if i + 1 < len(pos) else n - h
            b, ssr = scans.best(lo, hi, pos[:i] + pos[i + 1:])
            if b is not None and ssr < current - 1e-12 * max(current, 1e-300) and b != pos[i]:
                pos[i], current, moved = b, ssr, True
        if not moved:
            break
    return tuple(pos), current


def tied_search(y, Z, terms, max_breaks: int, h: int, starts_by_m=None,
                scans: ScanMemo | None = None
                ) -> tuple[list[float], list[tuple[int, ...]], list[bool]]:
    """SSR path for 0..max_breaks breaks of a tied kind: (ssr, positions, exact flags).

    ``starts_by_m[m]`` optionally gives a starting segmentation for the refinement with m
    breaks (the exact ``both`` solution); ``scans`` a memo of one-break scans of the same
    y, Z and terms to use and fill."""
    y = np.asarray(y, dtype=float)
    n = len(y)
    scans = scans if scans is not None else ScanMemo(y, Z, terms)
    ssr = [ssr_with(y, Z, terms, (), scans.base)]
    positions: list[tuple[int, ...]] = [()]
    exact = [True]
    if max_breaks >= 1:
        b, s1 = scans.best(h, n - h, ())
        if b is None:
            return ssr, positions, exact
        ssr.append(s1)
        positions.append((b,))
        exact.append(True)
    for m in range(2, max_breaks + 1):
        if (m + 1) * h > n:
            break
        if m == 2 and n <= GRID_LENGTH:
            pair, s2 = best_pair(y, Z, terms, h)
            if pair is None:
                break
            ssr.append(s2)
            positions.append(pair)
            exact.append(True)
            continue
        tries = []
        prev = list(positions[m - 1])
        segs = [0, *prev, n]
        best_add = None
        for i in range(len(segs) - 1):
            b, s = scans.best(segs[i] + h, segs[i + 1] - h, prev)
            if b is not None and (best_add is None or s < best_add[1]):
                best_add = (b, s)
        if best_add is not None:
            tries.append(tuple(sorted(prev + [best_add[0]])))
        if starts_by_m is not None and m < len(starts_by_m) and len(starts_by_m[m]) == m:
            start = tuple(sorted(starts_by_m[m]))
            if start not in tries:
                tries.append(start)
        if not tries:
            break
        results = [refine(y, Z, terms, t, n, h, scans) for t in tries]
        pos, s = min(results, key=lambda r: r[1])
        ssr.append(s)
        positions.append(pos)
        exact.append(False)
    return ssr, positions, exact
