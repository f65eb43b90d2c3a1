"""Searches for long series: ruptures' greedy segmentations on our segment cost, polished exactly.

From ``BOTTOM_UP_LENGTH`` points on (method ``auto``) the ``both`` kind's breaks are found by
ruptures' bottom-up segmentation (``ruptures.BottomUp``) running on our prefix-sum segment cost
(``costs.SegmentCost``), then polished exactly (``polish``) to a local optimum of the penalised
objective SSR + penalty x breaks that PELT minimises globally. PELT's candidate set barely
prunes on trends, so its work grows with the square of the length; the bottom-up start and the
polish grow about linearly. Binary segmentation (``ruptures.Binseg``) and the sliding window
(``ruptures.Window``) run on the same cost for comparison in
``benchmarks/bench_portfolio_long.py``, which measures all of them against PELT.

ruptures' ``BottomUp`` builds its starting partition with a Python loop over every position at
every level of halving (O(n log n) interpreted steps: 10 s of a 1,000,000-point search);
``HalvingBottomUp`` builds the same partition (each segment of at least twice the minimum
length split at the admissible point nearest its middle, the lower one on a tie, as ruptures
does) in O(n / min_size) steps; the merging is ruptures' own.
"""

from __future__ import annotations

import numpy as np
import ruptures
from ruptures.base import BaseCost
from ruptures.detection.bottomup import Bnode

from .costs import SegmentCost

# From here on, ruptures' bottom-up segmentation polished exactly replaces PELT (auto method):
# on planted series it found PELT's breaks 4.9x faster at 20,000 points and 5x at 50,000
# (benchmarks/bench_portfolio_long.py); PELT's candidate set barely prunes on trends.
BOTTOM_UP_LENGTH = 20_000


class GivenCost(BaseCost):
    """A ``SegmentCost`` already built for the series, as a ruptures cost (fit only records
    the length ruptures reads)."""

    model = "regimetrend-given"

    def __init__(self, cost: SegmentCost, min_size: int):
        self.segment_cost = cost
        self.min_size = int(min_size)
        self.signal: np.ndarray | None = None

    def fit(self, signal) -> "GivenCost":
        self.signal = np.asarray(signal, dtype=float).reshape(self.segment_cost.n, -1)
        return self

    def error(self, start, end) -> float:
        return self.segment_cost.cost(start, end)


class HalvingBottomUp(ruptures.BottomUp):
    """ruptures' ``BottomUp`` with its starting partition built without a per-position loop."""

    def _grow_tree(self):
        n, h = self.n_samples, self.min_size
        if self.jump != 1:  # the shortcut holds for every position admissible only
            return super()._grow_tree()
        stack, cuts = [(0, n)], []
        while stack:
            start, end = stack.pop()
            if end - start >= 2 * h:  # ruptures splits at the admissible point nearest the middle
                mid = (start + end) // 2
                stack.append((mid, end))
                stack.append((start, mid))
            else:
                cuts.append((start, end))
        cuts.sort()
        return [Bnode(start, end, self.cost.error(start, end)) for start, end in cuts]


def _ruptures_breaks(algo, n: int, penalty: float) -> list[int]:
    return [int(b) for b in algo.predict(pen=float(penalty)) if 0 < b < n]


def bottom_up_start(cost: SegmentCost, penalty: float, h: int) -> list[int]:
    """ruptures' bottom-up segmentation on our cost, stopped by the penalty (unpolished)."""
    n = cost.n
    algo = HalvingBottomUp(custom_cost=GivenCost(cost, h), min_size=h, jump=1).fit(np.zeros(n))
    return _ruptures_breaks(algo, n, penalty)


def binseg_start(cost: SegmentCost, penalty: float, h: int) -> list[int]:
    """ruptures' binary segmentation on our cost, stopped by the penalty (unpolished)."""
    n = cost.n
    algo = ruptures.Binseg(custom_cost=GivenCost(cost, h), min_size=h, jump=1).fit(np.zeros(n))
    return _ruptures_breaks(algo, n, penalty)


def window_start(cost: SegmentCost, penalty: float, h: int) -> list[int]:
    """ruptures' sliding-window search (width twice the minimum regime) on our cost."""
    n = cost.n
    algo = ruptures.Window(width=2 * h, custom_cost=GivenCost(cost, h), min_size=h,
                           jump=1).fit(np.zeros(n))
    return _ruptures_breaks(algo, n, penalty)


STARTS = {"bottom-up": bottom_up_start, "binary segmentation": binseg_start,
          "window": window_start}


def bottom_up_search(cost: SegmentCost, penalty: float, h: int,
                     max_sweeps: int = 20) -> tuple[int, ...]:
    """Minimise SSR + penalty x (number of breaks): ruptures' bottom-up segmentation on our
    segment cost, then ``polish``. Bottom-up starts from a fine regular partition and merges
    the neighbours whose merger costs least while that saves more than the penalty: fast,
    greedy, and its breaks sit on its starting grid or a few points off the optimum."""
    return greedy_search(cost, penalty, h, "bottom-up", max_sweeps)


def greedy_search(cost: SegmentCost, penalty: float, h: int, start: str = "bottom-up",
                  max_sweeps: int = 20) -> tuple[int, ...]:
    """One of ruptures' searches (``STARTS``) on our cost, polished exactly."""
    h = max(int(h), cost.min_size)
    if cost.n < 2 * h:
        return ()
    return polish(cost, STARTS[start](cost, penalty, h), penalty, h, max_sweeps)


def polish(cost: SegmentCost, positions, penalty: float, h: int,
           max_sweeps: int = 20) -> tuple[int, ...]:
    """A local optimum of SSR + penalty x breaks from the breaks ``positions``, exact on our
    cost: every break in turn moves to its best position between its neighbours (one
    vectorised pricing of all candidates), and a break is dropped whenever that lowers the
    objective; a pair of neighbouring breaks is replaced by one when one break between their
    neighbours does better (a greedy start can bracket a level shift with two breaks a few
    points apart). Sweeps repeat until nothing changes."""
    n = cost.n
    pos = sorted(int(p) for p in positions)
    for _ in range(max_sweeps):
        changed = False
        i = 0
        while i < len(pos):
            a = pos[i - 1] if i > 0 else 0
            c = pos[i + 1] if i + 1 < len(pos) else n
            cand = np.arange(a + h, c - h + 1)
            if cand.size:
                total = cost.costs(np.full(cand.size, a), cand) + cost.costs(cand, np.full(
                    cand.size, c))
                k = int(np.argmin(total))
                if float(cost.cost(a, c)) <= float(total[k]) + penalty:
                    del pos[i]  # the break does not pay for itself
                    changed = True
                    continue
                if int(cand[k]) != pos[i] and total[k] < cost.cost(a, pos[i]) + cost.cost(
                        pos[i], c):
                    pos[i] = int(cand[k])
                    changed = True
            i += 1
        i = 0
        while i + 1 < len(pos):  # two neighbouring breaks that one break does better than
            a = pos[i - 1] if i > 0 else 0
            c = pos[i + 2] if i + 2 < len(pos) else n
            cand = np.arange(a + h, c - h + 1)
            two = (cost.cost(a, pos[i]) + cost.cost(pos[i], pos[i + 1])
                   + cost.cost(pos[i + 1], c) + penalty)
            total = cost.costs(np.full(cand.size, a), cand) + cost.costs(cand, np.full(
                cand.size, c))
            k = int(np.argmin(total))
            if float(total[k]) < two:
                pos[i:i + 2] = [int(cand[k])]
                changed = True
            i += 1
        if not changed:
            break
    return tuple(pos)
