"""Our trend segment cost as a ruptures cost, so ruptures' PELT and binary segmentation run on it.

``TrendCost`` prices a segment by the SSR of a linear (degree 1) or quadratic (degree 2) trend,
optionally with season indicators re-estimated per segment, through the prefix sums of
``costs.SegmentCost``: O(1) per segment where ruptures' built-in least-squares cost
(``CostLinear``) solves a fresh least-squares problem on every call. On the same design
(columns [1, t] or [1, t, t^2]) the two give the same numbers (checked in the tests).
"""

from __future__ import annotations

import numpy as np
from ruptures.base import BaseCost
from ruptures.exceptions import NotEnoughPoints

from .costs import SegmentCost


class TrendCost(BaseCost):
    """SSR of a polynomial trend on a segment; the signal is the series (first column if 2-D)."""

    model = "regimetrend-trend"

    def __init__(self, degree=1, season_length=1, first_season=0, min_size=None):
        self.degree = int(degree)
        self.season_length = int(season_length)
        self.first_season = int(first_season)
        self.season_index = None  # optional explicit season of each position
        self.min_size = int(min_size) if min_size is not None else self.degree + 2
        self.segment_cost = None
        self.signal = None

    def fit(self, signal) -> "TrendCost":
        """Build the prefix sums for ``signal`` (n,) or (n, d) whose first column is the series."""
        signal = np.asarray(signal, dtype=float)
        y = signal[:, 0] if signal.ndim > 1 else signal
        self.signal = signal.reshape(len(y), -1)  # ruptures reads the length from here
        sidx = None
        if self.season_length > 1:
            sidx = self.season_index
            if sidx is None:
                sidx = (np.arange(len(y)) + self.first_season) % self.season_length
        self.segment_cost = SegmentCost(y, self.degree, sidx, self.season_length,
                                        min_size=self.min_size)
        return self

    def error(self, start, end) -> float:
        """SSR of the trend fitted on positions start..end-1."""
        if end - start < self.min_size:
            raise NotEnoughPoints
        return self.segment_cost.cost(start, end)
