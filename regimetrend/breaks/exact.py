"""Exact break search: the global minimum SSR for 0..M breaks by dynamic programming.

Bai and Perron (2003): with c(i, j) the cost of one regime on positions i..j-1 and h the minimum
regime length, F_m(j) = min_i F_{m-1}(i) + c(i, j) is the best SSR of positions 0..j-1 cut into
m+1 regimes. The tables F and their arg-mins are (M+1) x (n+1): memory O(n M). Costs are priced
in blocks of ends against all starts (``SegmentCost.costs`` with a row and a column), so the only
Python loop is over blocks; a block holds at most about two million costs whatever n is.

For long series (``PELT_LENGTH`` points and more) the search switches to PELT (Killick,
Fearnhead and Eckley, 2012) on the same segment cost, with a penalty per break matched to the
BIC (``bic_penalty``). ``pelt_search`` follows ruptures' ``Pelt`` step for step (the tests check
that both give the same breaks on ``ruptures_cost.TrendCost``) but prices the surviving
candidates in one numpy call per period; ruptures' own loop calls the cost once per candidate,
which is fine for a few thousand points and slow for 100,000. From
``long_search.BOTTOM_UP_LENGTH`` points on (method ``auto``) ``long_search.bottom_up_search``
takes PELT's place: ruptures' bottom-up segmentation on our cost, polished exactly to a local
optimum of the same penalised objective.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .costs import SegmentCost

PELT_LENGTH = 5000  # exact search below this length, PELT from here on
_BLOCK_ELEMENTS = 2_000_000


@dataclass(frozen=True)
class SearchPath:
    """Best break positions and their SSR for each number of breaks 0..M."""

    ssr: tuple[float, ...]  # ssr[m] = minimum SSR with m breaks (inf if impossible)
    positions: tuple[tuple[int, ...], ...]  # positions[m] = the m break positions

    @property
    def max_breaks(self) -> int:
        return len(self.ssr) - 1


def max_feasible_breaks(n: int, h: int) -> int:
    """Most breaks that fit n points with regimes of at least h points."""
    return max(n // h - 1, 0)


def exact_search(cost: SegmentCost, max_breaks: int, h: int) -> SearchPath:
    """Global-minimum segmentations with 0..max_breaks breaks, regimes of at least h points."""
    n = cost.n
    h = max(int(h), cost.min_size)
    M = min(int(max_breaks), max_feasible_breaks(n, h))
    F = np.full((M + 1, n + 1), np.inf)
    arg = np.zeros((M + 1, n + 1), dtype=np.intp)
    starts = np.arange(n + 1)
    block = max(1, _BLOCK_ELEMENTS // (n + 1))
    for j0 in range(h, n + 1, block):
        ends = np.arange(j0, min(j0 + block, n + 1))
        C = cost.costs(starts[None, :], ends[:, None])  # (len(ends), n+1)
        F[0, ends] = C[:, 0]
        # a regime's start must leave room for m earlier regimes of h points each
        for m in range(1, M + 1):
            lo = m * h
            if lo > ends[-1] - h:
                break
            total = F[m - 1, lo:][None, :] + C[:, lo:]
            k = np.argmin(total, axis=1)
            F[m, ends] = total[np.arange(len(ends)), k]
            arg[m, ends] = k + lo
    ssr, positions = [], []
    for m in range(M + 1):
        ssr.append(float(F[m, n]))
        positions.append(_backtrack(arg, m, n) if np.isfinite(F[m, n]) else ())
    return SearchPath(tuple(ssr), tuple(positions))


def _backtrack(arg: np.ndarray, m: int, n: int) -> tuple[int, ...]:
    out, end = [], n
    for level in range(m, 0, -1):
        end = int(arg[level, end])
        out.append(end)
    return tuple(sorted(out))


def segmentation_ssr(cost: SegmentCost, positions) -> float:
    """Total SSR of a given segmentation (regime-by-regime costs)."""
    bounds = [0, *positions, cost.n]
    return float(sum(cost.cost(a, b) for a, b in zip(bounds[:-1], bounds[1:])))


def pelt_search(cost: SegmentCost, penalty: float, h: int) -> tuple[int, ...]:
    """Minimise SSR + penalty x (number of breaks) by PELT (Killick, Fearnhead and Eckley,
    2012), regimes of at least h points, vectorised over the candidate set.

    Same recursion and pruning rule as ruptures' ``Pelt`` (a candidate start s is dropped once
    F(s) + c(s, t) exceeds F(t) + penalty), so on ``ruptures_cost.TrendCost`` both give the same
    breaks (checked in the tests); this version prices all surviving candidates with one numpy
    call per period, which is what makes n = 100,000 practical. Memory is O(n).
    """
    n = cost.n
    h = max(int(h), cost.min_size)
    pen = float(penalty)
    F = np.full(n + 1, np.inf)
    F[0] = -pen
    last = np.zeros(n + 1, dtype=np.intp)
    R = np.array([0], dtype=np.intp)
    for t in range(h, n + 1):
        ready = R <= t - h
        cand = R[ready]
        if cand.size:
            vals = F[cand] + cost.costs(cand, t) + pen
            k = int(np.argmin(vals))
            F[t], last[t] = vals[k], cand[k]
            keep = np.ones(R.size, dtype=bool)
            keep[ready] = vals <= F[t] + pen
            R = R[keep]
        if np.isfinite(F[t]) and t <= n - h:
            R = np.append(R, t)
    out, t = [], n
    while t > 0:
        t = int(last[t])
        if t > 0:
            out.append(t)
    return tuple(sorted(out))


def bic_penalty(y: np.ndarray, changing: int) -> float:
    """Penalty per break that makes SSR + pen*m mimic the BIC n ln(SSR/n) + p ln n.

    Near the optimum d[n ln SSR] = n dSSR / SSR = dSSR / sigma^2, so a break (q changing
    coefficients plus its date) is worth (q + 1) ln(n) sigma^2. sigma is estimated robustly from
    first differences (MAD / 0.6745 / sqrt 2), which a few breaks do not move."""
    d = np.diff(np.asarray(y, dtype=float))
    mad = np.median(np.abs(d - np.median(d))) / 0.6745
    sigma2 = max((mad / np.sqrt(2.0)) ** 2, 1e-300)
    return (changing + 1) * np.log(len(y)) * sigma2
