"""The regime design: the one piecewise trend model behind break dates, strategies and growth.

The break search dates breaks with this model, the ``separate`` and ``continuous`` strategies
forecast with it, and the growth table reports it; all three build their matrices here, so the
growth of a regime is the growth of the model that found its dates.

Response (``model_response``): the values on the model scale (logs for the exponential shape),
less the seasonal pattern under ``adjust`` (classical decomposition over the fitted stretch).

Columns (``RegimeDesign.columns``), the base first, then what each break adds, in time order.
A break at position b is the first period of the new regime; u is the scaled time index of the
fitted positions (``design.TimeScale``), u_b its value at b:

1. the first regime's trend terms [1, u (, u^2)];
2. the shared effect-coded seasonal dummies (``dummies``);
3. for each break b, by kind:
   - ``level``: the step 1{t >= b} (the level jumps, the slope is shared);
   - ``slope``: the hinges (u - u_b)^p 1{t >= b}, p = 1..degree: zero at b itself, so the trend
     is continuous and bends there (b + 1 is the first period on the new slope);
   - ``both``: the new regime's own trend terms on its own rows, on its own scaled index
     (every trend coefficient free; for ``both`` the first block is also limited to the first
     regime's rows). The last regime may take its own shape (``last_shape``) when both
     shapes share the modelling scale;
4. with ``seasonal_by_regime``, for each break the seasonal dummies times 1{t >= b}.

Positions beyond the fitted stretch belong to the last regime, so the same columns give the
forecast rows. ``RegimeDesign.pieces`` expresses each regime's trend as a polynomial
theta . [1, v, v^2] in its own scaled index v, with theta = A beta: growth differentiates it,
the break description evaluates it. The fast increment form of the tied searches
(``breaks/kinks.py``) spans the same columns (checked in the tests).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from .design import (
    TimeScale,
    TrendSpec,
    season_index,
    seasonal_columns,
    seasonal_pattern,
    to_model_scale,
    trend_columns,
)
from .errors import InputError, about

KINDS = ("level", "slope", "both")


@dataclass(frozen=True, eq=False)
class ModelResponse:
    """The response on the model scale, with the seasonal pattern removed under ``adjust``."""

    y: np.ndarray
    pattern: np.ndarray | None  # the removed seasonal effects (length s), model scale
    season_idx: np.ndarray | None  # season of each position (seasonal specs only)

    def seasonal_offset(self) -> np.ndarray:
        """The removed pattern at every position (zeros without ``adjust``)."""
        if self.pattern is None:
            return np.zeros(len(self.y))
        return self.pattern[self.season_idx]


def model_response(values, spec: TrendSpec, first_season: int) -> ModelResponse:
    """Values 0..n-1 on the model scale, seasonally adjusted under ``adjust``."""
    y = to_model_scale(values, spec)
    positions = np.arange(len(y))
    sidx = None
    if spec.seasonality != "none" and spec.season_length > 1:
        sidx = season_index(positions, first_season, spec.season_length)
    pattern = None
    if spec.seasonality == "adjust":
        pattern = seasonal_pattern(y, positions, first_season, spec.season_length)
        y = y - pattern[sidx]
    y = np.asarray(y, dtype=float)
    y.setflags(write=False)
    return ModelResponse(y, pattern, sidx)


def break_powers(kind: str, degree: int) -> tuple[int, ...]:
    """Powers p of the terms (t - b)^p 1{t >= b} a break of ``kind`` adds in increment form."""
    if kind == "level":
        return (0,)
    if kind == "slope":
        return tuple(range(1, max(degree, 1) + 1))
    if kind == "both":
        return tuple(range(degree + 1))
    raise InputError(f"{about('kind')}: {kind!r} is not one of {', '.join(KINDS)}")


def _terms(shape: str) -> int:
    return 3 if shape == "quadratic" else 2


@dataclass(frozen=True)
class RegimePiece:
    """One regime's trend on the model scale: theta . [1, v, v^2], v = (t - center) / spread,
    theta = A beta (A is 3 x k; its third row is zero for straight-line regimes)."""

    start: int  # first position
    end: int  # last position (inclusive)
    center: float
    spread: float
    A: np.ndarray

    def theta(self, beta) -> np.ndarray:
        return self.A @ np.asarray(beta, dtype=float)

    def value(self, beta, t) -> np.ndarray:
        """The regime's trend at (float) positions t, extended beyond the regime."""
        a, b, c = self.theta(beta)
        v = (np.asarray(t, dtype=float) - self.center) / self.spread
        return a + b * v + c * v * v


@dataclass(frozen=True, eq=False)
class RegimeDesign:
    """The piecewise design of ``n`` fitted positions (0..n-1) with breaks of one kind."""

    spec: TrendSpec
    kind: str
    breaks: tuple[int, ...]
    n: int
    first_season: int = 0
    seasonal_by_regime: bool = False
    last_shape: str | None = None  # ``both`` only: the last regime's own shape

    def __post_init__(self):
        break_powers(self.kind, 1)  # checks the kind
        object.__setattr__(self, "breaks", tuple(sorted(int(b) for b in self.breaks)))
        if any(not 0 < b < self.n for b in self.breaks):
            raise InputError(f"breaks: every break must lie inside positions 1..{self.n - 1}")
        if self.last_shape == self.spec.shape:
            object.__setattr__(self, "last_shape", None)
        if self.last_shape is not None:
            if self.kind != "both":
                raise InputError("a last-regime shape needs breaks of kind both")
            if (self.last_shape == "exponential") != self.spec.log_scale:
                raise InputError(f"{self.spec.shape} then {self.last_shape}: the regimes need "
                                 f"different modelling scales")
        if not self.has_seasonal_dummies:
            object.__setattr__(self, "seasonal_by_regime", False)

    # -- layout ----------------------------------------------------------------------------
    @property
    def has_seasonal_dummies(self) -> bool:
        return self.spec.seasonality == "dummies" and self.spec.season_length > 1

    @property
    def degree(self) -> int:
        return self.spec.trend_terms - 1

    @cached_property
    def scale(self) -> TimeScale:
        """The scaled index of all fitted positions (base trend, hinges and steps)."""
        return TimeScale.for_range(0, self.n)

    @property
    def bounds(self) -> tuple[int, ...]:
        return (0, *self.breaks, self.n)

    @property
    def shapes(self) -> tuple[str, ...]:
        """The shape of each regime's trend."""
        m = len(self.breaks)
        return tuple([self.spec.shape] * m + [self.last_shape or self.spec.shape])

    @cached_property
    def regime_scales(self) -> tuple[TimeScale, ...]:
        """Each regime's own scaled index (``both``); the common one otherwise."""
        if self.kind != "both":
            return (self.scale,) * (len(self.breaks) + 1)
        b = self.bounds
        return tuple(TimeScale.for_range(b[i], b[i + 1])
                     for i in range(len(b) - 1))

    @property
    def seasonal_count(self) -> int:
        return self.spec.season_length - 1 if self.has_seasonal_dummies else 0

    @property
    def base_count(self) -> int:
        """Columns of the base: the first regime's trend terms and the shared seasonal terms."""
        return _terms(self.shapes[0]) + self.seasonal_count

    def break_count(self, i: int) -> int:
        """Trend columns break i (0-based) adds."""
        if self.kind == "both":
            return _terms(self.shapes[i + 1])
        return len(break_powers(self.kind, self.degree))

    @property
    def k(self) -> int:
        trend = self.base_count + sum(self.break_count(i) for i in range(len(self.breaks)))
        return trend + (len(self.breaks) * self.seasonal_count if self.seasonal_by_regime else 0)

    def regime_of(self, positions) -> np.ndarray:
        """Regime (0..m) of each position; positions after the last break are in the last."""
        return np.searchsorted(np.asarray(self.breaks, dtype=float),
                               np.asarray(positions, dtype=float), side="right")

    # -- columns ---------------------------------------------------------------------------
    def columns(self, positions=None, seasonal=None) -> np.ndarray:
        """Design rows at ``positions`` (default the fitted ones, 0..n-1). ``seasonal`` may pass
        the seasonal dummies of those positions in (callers that cache them)."""
        positions = np.arange(self.n) if positions is None else np.asarray(positions)
        t = positions.astype(float)
        if self.has_seasonal_dummies and seasonal is None:
            seasonal = seasonal_columns(positions.astype(int), self.first_season,
                                        self.spec.season_length)
        regime = self.regime_of(t)
        blocks = []
        for r in range(len(self.breaks) + 1):
            if r == 0:
                first = trend_columns(t, self.shapes[0], self.regime_scales[0])
                if self.kind == "both":
                    first = first * (regime == 0)[:, None]
                blocks.append(first)
                if seasonal is not None:
                    blocks.append(seasonal)
                continue
            b = self.breaks[r - 1]
            if self.kind == "both":
                own = trend_columns(t, self.shapes[r], self.regime_scales[r])
                blocks.append(own * (regime == r)[:, None])
            else:
                on = t >= b
                d = self.scale.u(t) - self.scale.u(b)
                blocks.append(np.column_stack([np.where(on, d ** p, 0.0)
                                               for p in break_powers(self.kind, self.degree)]))
        if self.seasonal_by_regime and seasonal is not None:
            for b in self.breaks:
                blocks.append(seasonal * (t >= b)[:, None])
        return np.hstack(blocks)

    # -- reading a fit ---------------------------------------------------------------------
    def seasonal_part(self, beta, positions=None, seasonal=None) -> np.ndarray:
        """The seasonal component (shared and, per regime, what changed) at ``positions``."""
        positions = np.arange(self.n) if positions is None else np.asarray(positions)
        if not self.has_seasonal_dummies:
            return np.zeros(len(positions))
        if seasonal is None:
            seasonal = seasonal_columns(positions.astype(int), self.first_season,
                                        self.spec.season_length)
        beta = np.asarray(beta, dtype=float)
        k0, s1 = _terms(self.shapes[0]), self.seasonal_count
        part = seasonal @ beta[k0:k0 + s1]
        if self.seasonal_by_regime:
            start = self.k - len(self.breaks) * s1
            t = positions.astype(float)
            for i, b in enumerate(self.breaks):
                coef = beta[start + i * s1: start + (i + 1) * s1]
                part = part + (seasonal @ coef) * (t >= b)
        return part

    @cached_property
    def pieces(self) -> tuple[RegimePiece, ...]:
        """Each regime's trend polynomial as a linear map of the coefficients."""
        m, k = len(self.breaks), self.k
        k0, s1 = _terms(self.shapes[0]), self.seasonal_count
        offsets = [0]  # first column of each regime's (or break's) trend block
        col = k0 + s1
        for i in range(m):
            offsets.append(col)
            col += self.break_count(i)
        out = []
        for r in range(m + 1):
            A = np.zeros((3, k))
            if self.kind == "both":
                for j in range(_terms(self.shapes[r])):
                    A[j, offsets[r] + j] = 1.0
                sc = self.regime_scales[r]
            else:
                sc = self.scale
                for j in range(k0):
                    A[j, j] = 1.0
                for i in range(r):
                    ub = float(sc.u(self.breaks[i]))
                    for j, p in enumerate(break_powers(self.kind, self.degree)):
                        c = offsets[i + 1] + j
                        # (v - u_b)^p in powers of v
                        if p == 0:
                            A[0, c] += 1.0
                        elif p == 1:
                            A[0, c] -= ub
                            A[1, c] += 1.0
                        else:
                            A[0, c] += ub * ub
                            A[1, c] -= 2.0 * ub
                            A[2, c] += 1.0
            out.append(RegimePiece(self.bounds[r], self.bounds[r + 1] - 1, sc.center, sc.spread,
                                   A))
        return tuple(out)

    def trend(self, beta, positions=None) -> np.ndarray:
        """The fitted trend (no seasonal terms) at ``positions``, each from its own regime."""
        positions = np.arange(self.n) if positions is None else np.asarray(positions)
        regime = self.regime_of(positions)
        out = np.empty(len(positions))
        for r, piece in enumerate(self.pieces):
            at = regime == r
            out[at] = piece.value(beta, positions[at])
        return out
