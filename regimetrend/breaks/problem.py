"""The break problem on the model scale: response, base design, break columns, trimming.

The model is the regime design (``regimetrend.regime_design``), the same one the strategies
forecast with and growth reports: the base design (trend polynomial in the scaled time index,
plus the shared seasonal dummies) and, for each break b, columns that are zero before b:

- ``level``: 1{t >= b}                                     (a jump, shared slope)
- ``slope``: (t - b)^p 1{t >= b}, p = 1..degree             (a kink: continuous trend)
- ``both``:  every trend coefficient free per regime

plus, with ``seasonal_by_regime``, the seasonal columns times 1{t >= b}. The searches use the
increment form of the same columns (``kinks.break_terms``: (t - b)^p 1{t >= b}, p = 0..degree
for ``both``), which spans the same space; ``trend_poly`` reads each regime's trend from the
regime design, so the jump at a break, its slope change and its curvature change are per period
on the model scale whatever the parameterisation.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .. import ols
from ..design import TimeScale, TrendSpec, seasonal_columns, trend_columns
from ..errors import InputError, about, option, setting
from ..regime_design import KINDS, RegimeDesign, model_response  # noqa: F401 (KINDS re-exported)
from . import kinks
from .shared_seasons import JointSummary, joint_both


KEPT_DESIGN_VALUES = 30_000_000  # joint fits kept per problem, by the size of their designs


@dataclass(frozen=True, eq=False)
class BreakProblem:
    spec: TrendSpec
    y: np.ndarray  # model scale, seasonal pattern removed under ``adjust``
    pattern: np.ndarray | None  # the removed pattern (``adjust``), model scale
    first_season: int
    scale: TimeScale
    trend: np.ndarray  # n x (degree+1), [1, u, u^2]
    seasonal: np.ndarray | None  # n x (s-1) effect-coded, for ``dummies``
    season_idx: np.ndarray | None
    seasonal_by_regime: bool
    h: int  # minimum regime length in periods
    # ``both`` fits of the searches by partialling out the regime trends (``shared_seasons``):
    # the same SSR to rounding, for the searches that report no fit (``find_break_positions``)
    light_joint: bool = False
    _scans: dict = field(default_factory=dict, repr=False)

    def scans(self, kind: str) -> "kinks.ScanMemo":
        """The memo of one-break scans of ``kind`` (tied kinds): the search, the sequential
        tests and the added-break statistics ask for the same scans, which on long series
        are the bulk of the work; each is computed once per problem."""
        if kind not in self._scans:
            self._scans[kind] = kinks.ScanMemo(self.y, self.base, self.terms(kind))
        return self._scans[kind]

    @property
    def n(self) -> int:
        return len(self.y)

    @property
    def degree(self) -> int:
        return self.spec.trend_terms - 1

    @property
    def base(self) -> np.ndarray:
        if self.seasonal is None:
            return self.trend
        return np.hstack([self.trend, self.seasonal])

    @property
    def base_count(self) -> int:
        return self.base.shape[1]

    def terms(self, kind: str) -> list:
        extra = self.seasonal if self.seasonal_by_regime else None
        return kinks.break_terms(kind, self.degree, extra)

    def changing(self, kind: str) -> int:
        """Coefficients that change at a break of this kind."""
        return len(self.terms(kind))

    def model_key(self, kind: str) -> str:
        return f"{'quadratic' if self.degree == 2 else 'linear'}-{kind}"

    def regime_design(self, kind: str, positions) -> RegimeDesign:
        """The shared regime design of this series with breaks of ``kind`` at ``positions``."""
        return RegimeDesign(self.spec, kind, tuple(positions), self.n, self.first_season,
                            self.seasonal_by_regime)

    def design(self, kind: str, positions) -> np.ndarray:
        return self.regime_design(kind, positions).columns(seasonal=self.seasonal)

    def fit(self, kind: str, positions) -> ols.LeastSquaresFit:
        """The joint fit with breaks of ``kind`` at ``positions``. One search asks for the same
        fit many times (the seasonal back-and-forth, the sequential tests, the break
        descriptions), so each is computed once per problem and kept, read only."""
        key = (kind, tuple(int(p) for p in positions))
        found = self._fits.get(key)
        if found is not None:
            return found
        X = self.design(kind, positions)
        try:
            found = ols.fit(X, self.y)
        except ols.RankDeficient as exc:
            raise InputError(f"the break model with regimes starting at "
                             f"{', '.join(str(p) for p in positions)} cannot be fitted: {exc}; "
                             f"{self.remedy(len(positions))}") from None
        for a in (found.beta, found.residuals, found.X, found.xtx_inv):
            a.setflags(write=False)
        kept = self._fits
        kept[key] = found
        # Long series: each kept fit holds its n x k design, so the oldest are let go once the
        # designs kept pass KEPT_DESIGN_VALUES (a million points kept about 20 of them, 2 GB).
        while len(kept) > 1 and sum(f.X.size for f in kept.values()) > KEPT_DESIGN_VALUES:
            del kept[next(iter(kept))]
        return found

    @cached_property
    def _fits(self) -> dict:
        return {}

    def both_summary(self, positions) -> JointSummary:
        """SSR, residuals and shared seasonal part of the ``both`` fit at ``positions``, what
        the searches and the sequential tests read. With ``light_joint`` (and seasonal terms
        not changing by regime) from ``shared_seasons.joint_both``, kept per break set; else,
        or where that regression is near singular, from the full fit (``fit``, which raises the
        InputError of dependent columns)."""
        key = tuple(int(p) for p in positions)
        if self.light_joint and not self.seasonal_by_regime:
            kept = self._light
            found = kept.get(key)
            if found is None:
                found = joint_both(self.y, self.seasonal, key, self.degree)
                if found is not None:
                    kept[key] = found
            if found is not None:
                return found
        fit = self.fit("both", key)
        return JointSummary(fit.ssr, fit.residuals, self.seasonal_part(fit))

    @cached_property
    def _light(self) -> dict:
        return {}

    @cached_property
    def segment_costs(self) -> dict:
        """Segment costs of the response less a joint fit's seasonal part, by that fit's break
        set (``search._cost_less_season``)."""
        return {}

    def remedy(self, m: int) -> str:
        """Which settings to change when a break model's columns are dependent: regimes too
        short to tell a trend from the seasonal pattern, or too many breaks."""
        ways = [f"longer regimes ({setting('trim', 2 * self.h)})"] if 4 * self.h <= self.n else []
        ways.append(f"fewer breaks ({setting('max_breaks', max(m - 1, 0))})")
        if self.spec.seasonality == "none":
            return "use " + " or ".join(ways)
        ways += [setting("seasonality", "none"), f"another {option('season_length')}"]
        return (f"regimes of {self.h} periods are too short to tell the trend from the "
                f"{self.spec.season_length}-period seasonal pattern: use {', '.join(ways[:-1])} "
                f"or {ways[-1]}")

    def most_breaks(self) -> int:
        """Most breaks the joint model can be fitted with. Regimes of at least ``h`` points fit
        ``n // h - 1`` breaks, but with a shared seasonal pattern and ``h`` at most one season,
        regimes all exactly ``h`` long (possible when ``h`` divides ``n``) cannot be told from
        the seasonal pattern: the regime trends then form a sawtooth that repeats every
        season, which the seasonal dummies also fit (48 monthly points, breaks at 12, 24, 36).
        One break fewer leaves some regime longer than a season, which settles it."""
        most = max(self.n // self.h - 1, 0)
        if self.confounded_regimes() and self.n % self.h == 0:
            most = max(most - 1, 0)
        return most

    def confounded_regimes(self) -> bool:
        """Whether regimes of ``h`` points can be confounded with the shared seasonal pattern
        (shared seasonal dummies and ``h`` at most one season)."""
        return (self.seasonal is not None and not self.seasonal_by_regime
                and self.h <= self.spec.season_length)

    def seasonal_part(self, fit: ols.LeastSquaresFit) -> np.ndarray:
        """The shared seasonal component of a joint fit (zero when there is none): the regime
        design puts the shared seasonal columns right after the first regime's trend terms."""
        if self.seasonal is None:
            return np.zeros(self.n)
        k = self.trend.shape[1]
        return self.seasonal @ fit.beta[k:k + self.seasonal.shape[1]]

    def trend_poly(self, fit: ols.LeastSquaresFit, kind: str, positions, regime: int):
        """Regime ``regime``'s trend on the model scale, as a function of (float) positions."""
        piece = self.regime_design(kind, positions).pieces[regime]
        beta = fit.beta
        return lambda t: piece.value(beta, t)


def default_min_length(spec: TrendSpec, seasonal_by_regime: bool) -> int:
    """Default shortest regime: one seasonal cycle for seasonal series, so a late break can be
    found one cycle before the end (at least trend terms + 2 points; with seasonal terms per
    regime, every season plus the trend terms and one degree of freedom); for series without
    seasons max(6, 2 k + 2) points, k the trend terms (common practice: enough for a trend
    with a few residual degrees of freedom)."""
    k = spec.trend_terms
    if spec.seasonality != "none" and spec.season_length > 1:
        s = spec.season_length
        if seasonal_by_regime and spec.seasonality == "dummies":
            return s + k
        return max(s, k + 2)
    return max(6, 2 * k + 2)


def min_length_needed(spec: TrendSpec, seasonal_by_regime: bool) -> int:
    """Fewest points a regime can have and still be fitted with one residual degree of freedom."""
    k = spec.trend_terms
    if seasonal_by_regime and spec.seasonality == "dummies":
        return spec.season_length + k
    return k + 1


def resolve_trim(trim, n: int, spec: TrendSpec, seasonal_by_regime: bool) -> int:
    """Minimum regime length in periods from ``--trim`` (share below 1, else periods)."""
    need = min_length_needed(spec, seasonal_by_regime)
    if trim is None:
        return default_min_length(spec, seasonal_by_regime)
    try:
        value = float(trim)
    except (TypeError, ValueError):
        raise InputError(f"{about('trim')}: {trim!r} is not a number") from None
    if not math.isfinite(value) or value <= 0:
        raise InputError(f"{about('trim')}: must be a share between 0 and 0.5 or a number of "
                         f"periods, got {trim!r}")
    if value < 1:
        if value >= 0.5:
            raise InputError(f"{about('trim')}: a share must be below 0.5, got {trim!r}")
        h = int(math.ceil(value * n))
    else:
        if value != int(value):
            raise InputError(f"{about('trim')}: a number of periods must be whole, got {trim!r}")
        h = int(value)
    if h < need:
        raise InputError(f"{about('trim')}: regimes of {h} periods are too short for a "
                         f"{spec.describe()}; use at least {need}")
    return h


def build_problem(series, spec: TrendSpec, seasonal_by_regime: bool, trim,
                  light_joint: bool = False) -> BreakProblem:
    """Model-scale response and designs for ``series`` under ``spec`` (``light_joint``: see
    ``BreakProblem.both_summary``)."""
    n = series.n
    positions = np.arange(n)
    first = series.first_season()
    response = model_response(series.values, spec, first)
    scale = TimeScale.for_positions(positions)
    trend = trend_columns(positions, spec.shape, scale)
    s = spec.season_length
    seasonal = seasonal_columns(positions, first, s) if spec.seasonality == "dummies" else None
    by_regime = bool(seasonal_by_regime) and seasonal is not None
    h = resolve_trim(trim, n, spec, by_regime)
    return BreakProblem(spec=spec, y=response.y, pattern=response.pattern, first_season=first,
                        scale=scale, trend=trend, seasonal=seasonal,
                        season_idx=response.season_idx, seasonal_by_regime=by_regime, h=h,
                        light_joint=light_joint)
