"""Growth by regime: how fast each regime grew, with honest intervals, and the change at each break.

One joint least-squares model is fitted on the model scale (logs for the exponential shape): the
regime design of ``regimetrend.regime_design``, the very model the break search dated the
breaks with (same columns, same hinge, same seasonal terms, so the same SSR). What a break may
change follows the break kind:

- ``both``   each regime has its own level and slope (and curvature for the quadratic shape);
- ``slope``  the trend is continuous: it bends at each break (hinge terms zero at the break),
  no jump;
- ``level``  each regime has its own level, the slope is shared (growth cannot differ).

The seasonal terms (when asked for) are shared by all regimes, or change at each break too when
the breaks were searched with seasonal terms per regime.

Every figure is a smooth function of the coefficients, so its standard error comes from the
autocorrelation-robust covariance of the coefficients (by default the HAC with AR(1)
prewhitening and a data-driven bandwidth, ``ols.cov_hac_prewhitened``; Newey-West with a fixed
number of lags when ``lags`` is given; ``GrowthTable.covariance`` says which) and the delta
method (gradients carried exactly by forward-mode differentiation below). Intervals are value
+/- a t quantile times the standard error, except for
figures that are monotone maps of a single log-growth coefficient (the exponential shape's
growth rates and doubling time): those carry the interval of that coefficient through the map,
which keeps them inside their natural bounds (never below -100%).

Per shape, with p periods a year, g the growth per period, "level" the fitted trend level
without seasonal effects:

- exponential: g = e^b - 1; annualised (1 + g)^p - 1; doubling time ln 2 / b periods (b > 0);
- linear: the yearly increase b p in units first; its headline "% a year" is the compound
  annual growth of the fitted line over the regime, from its fitted level at the regime's start
  to its fitted level at the end, ((f1 / f0)^(p / span) - 1) 100 (so a line that rises from 100
  to 200 over 6 years reads 12.2% a year, what a compounding series would need); the yearly
  increase as % of the fitted level at the regime's end and at its start are kept as
  ``annualised_pct_of_end`` and ``annualised_pct_of_start``;
- quadratic: growth at the regime's end (slope there, per period and a year, as % of the level
  at the end) and the average over the regime (the fitted change per period, and the compound
  annual rate from the fitted start level to the fitted end level).

The change of growth across a break is the change of the headline annualised % (percentage
points) with its delta-method interval, and ``p_value`` tests that same change (its Wald
statistic (change / se)^2 on 1 degree of freedom, the same covariance and gradient), so the
interval excludes zero exactly when p < 0.05. The Wald test of equal growth coefficients (slope
per period; slope and curvature for the quadratic shape) is kept as ``slope_wald`` and
``slope_p_value``. Under level-only breaks all regimes share one growth rate: there is no
change to estimate or test.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from collections.abc import Sequence

import numpy as np
from scipy import stats

from . import growth_figures as gf
from . import ols
from .design import TrendSpec
from .errors import InputError, about
from .regime_design import RegimeDesign, model_response
from .series import Series

LEVEL = 0.95
KINDS = ("both", "slope", "level")


# ---------------------------------------------------------------------------------------------
# forward-mode differentiation: a value and its gradient with respect to the coefficients


@dataclass(frozen=True, eq=False)
class _Dual:
    value: float
    grad: np.ndarray

    def __add__(self, other):
        other = _lift(other, self)
        return _Dual(self.value + other.value, self.grad + other.grad)

    __radd__ = __add__

    def __sub__(self, other):
        other = _lift(other, self)
        return _Dual(self.value - other.value, self.grad - other.grad)

    def __rsub__(self, other):
        return _lift(other, self) - self

    def __mul__(self, other):
        other = _lift(other, self)
        return _Dual(self.value * other.value, self.grad * other.value + other.grad * self.value)

    __rmul__ = __mul__

    def __truediv__(self, other):
        other = _lift(other, self)
        v = self.value / other.value
        return _Dual(v, (self.grad - v * other.grad) / other.value)

    def __rtruediv__(self, other):
        return _lift(other, self) / self

    def exp(self):
        v = math.exp(self.value)
        return _Dual(v, v * self.grad)

    def log(self):
        return _Dual(math.log(self.value), self.grad / self.value)


def _lift(x, like: _Dual) -> _Dual:
    return x if isinstance(x, _Dual) else _Dual(float(x), np.zeros_like(like.grad))


# ---------------------------------------------------------------------------------------------
# results


@dataclass(frozen=True)
class Estimate:
    """One growth figure: the value, its delta-method standard error and its 95% interval."""

    value: float | None
    se: float | None
    lower: float | None
    upper: float | None

    @property
    def ci95(self) -> list:
        return [self.lower, self.upper]

    def to_dict(self) -> dict:
        return {"value": _clean(self.value), "se": _clean(self.se), "ci95": [_clean(self.lower),
                                                                             _clean(self.upper)]}


@dataclass(frozen=True)
class RegimeGrowth:
    """Growth figures of one regime; ``figures`` maps a figure name to its ``Estimate``."""

    index: int
    start: int  # first position
    end: int  # last position (inclusive)
    start_date: str
    end_date: str
    start_label: str
    end_label: str
    figures: dict = field(default_factory=dict)
    notes: tuple[str, ...] = ()

    @property
    def periods(self) -> int:
        return self.end - self.start + 1

    def get(self, name: str) -> Estimate | None:
        return self.figures.get(name)

    def growth_dict(self) -> dict:
        """The flat ``growth`` block of a segment: ``name``, ``name_se``, ``name_ci95``."""
        out = {}
        for name, est in self.figures.items():
            out[name] = _clean(est.value)
            out[f"{name}_se"] = _clean(est.se)
            out[f"{name}_ci95"] = [_clean(est.lower), _clean(est.upper)]
        out["notes"] = list(self.notes)
        return out

    def to_dict(self) -> dict:
        return {"index": self.index, "start": self.start_date, "end": self.end_date,
                "start_label": self.start_label, "end_label": self.end_label,
                "start_position": self.start, "end_position": self.end,
                "periods": self.periods, "growth": self.growth_dict()}


@dataclass(frozen=True)
class GrowthChange:
    """The change of growth from one regime to the next: the change of the headline annualised
    % with its interval, and the Wald test of that same change (``wald``, ``p_value``; so the
    two agree); the Wald test of equal growth coefficients as ``slope_wald``."""

    break_index: int
    date: str
    label: str
    annualised_pct_change: Estimate  # percentage points
    wald: float | None
    df: int
    p_value: float | None
    note: str = ""
    slope_wald: float | None = None
    slope_df: int = 1
    slope_p_value: float | None = None

    def to_dict(self) -> dict:
        return {"break": self.break_index, "date": self.date, "label": self.label,
                gf.CHANGE_PCT: _clean(self.annualised_pct_change.value),
                gf.se(gf.CHANGE_PCT): _clean(self.annualised_pct_change.se),
                gf.ci95(gf.CHANGE_PCT): [_clean(self.annualised_pct_change.lower),
                                               _clean(self.annualised_pct_change.upper)],
                "wald": _clean(self.wald), "df": self.df, "p_value": _clean(self.p_value),
                "test": "Wald test of the annualised % change (1 df), the same covariance as "
                        "its interval",
                "slope_wald": _clean(self.slope_wald), "slope_df": self.slope_df,
                "slope_p_value": _clean(self.slope_p_value),
                "note": self.note}


@dataclass(frozen=True, eq=False)
class GrowthTable:
    """Growth of every regime of one series, and the change across each break.

    ``fitted`` holds the regime model's in-sample fitted values in original units (the median
    for the exponential shape), for charts; ``trend`` the same with the seasonal terms at their
    average (each regime's trend alone); ``ssr`` the joint fit's sum of squared residuals on
    the model scale (the break search's SSR for the same breaks; None for separate fits).
    None of these is part of ``to_dict()``."""

    series_name: str
    spec: TrendSpec
    kind: str
    periods_per_year: float
    frequency: str
    hac_lags: int  # Newey-West lags when asked for (``lags``); the rule's lag otherwise
    regimes: tuple[RegimeGrowth, ...]
    changes: tuple[GrowthChange, ...]
    headline: str  # which figure is the headline annualised growth, in words
    fitted: np.ndarray = field(default_factory=lambda: np.zeros(0))
    trend: np.ndarray = field(default_factory=lambda: np.zeros(0))
    ssr: float | None = None
    seasonal_by_regime: bool = False
    covariance: str = ""  # the covariance computed, in words (``covariance_words``)

    @property
    def last(self) -> RegimeGrowth:
        return self.regimes[-1]

    def summary(self) -> str:
        """Plain text: growth a year by regime with 95% intervals and each change's Wald test."""
        from .plaintext import growth_text

        return growth_text(self)

    def to_dict(self) -> dict:
        return {"series": self.series_name, "shape": self.spec.shape, "kind": self.kind,
                "spec": self.spec.to_dict(), "frequency": self.frequency,
                "seasonal_by_regime": self.seasonal_by_regime,
                "periods_per_year": self.periods_per_year,
                "covariance": self.covariance,
                "intervals": "95%, delta method" + (
                    "; exponential growth rates and doubling time carry the interval of the "
                    "log-growth coefficient through the monotone map"
                    if self.spec.log_scale else ""),
                "headline": self.headline,
                "segments": [r.to_dict() for r in self.regimes],
                "changes": [c.to_dict() for c in self.changes]}


def _clean(x):
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


# ---------------------------------------------------------------------------------------------
# the regime model: coefficients beta, their covariance, and each regime's trend in terms of beta


@dataclass(frozen=True, eq=False)
class _RegimeTrend:
    """Trend of one regime: f(t) = theta . [1, u, u^2], u = (t - center) / spread, theta = A beta."""

    start: int
    end: int
    center: float
    spread: float
    A: np.ndarray  # 3 x len(beta)

    def theta(self, beta: np.ndarray) -> list[_Dual]:
        return [_Dual(float(row @ beta), row.copy()) for row in self.A]

    def level(self, beta, t: float) -> _Dual:
        a, b, c = self.theta(beta)
        u = (t - self.center) / self.spread
        return a + b * u + c * (u * u)

    def slope(self, beta, t: float) -> _Dual:
        """Derivative of the trend per period at position t."""
        _, b, c = self.theta(beta)
        u = (t - self.center) / self.spread
        return (b + c * (2.0 * u)) / self.spread

    def curvature(self, beta) -> _Dual:
        """Change of the per-period slope per period (second derivative)."""
        _, _, c = self.theta(beta)
        return c * (2.0 / self.spread ** 2)


@dataclass(frozen=True, eq=False)
class _Model:
    beta: np.ndarray
    cov: np.ndarray
    regimes: tuple[_RegimeTrend, ...]
    lags: int
    fitted: np.ndarray  # in-sample fitted values, original units
    ssr: float | None = None  # joint fit's SSR on the model scale (None for separate fits)
    covariance: str = ""  # what was computed, in words (``covariance_words``)


def covariance_words(lags: int | None) -> str:
    """The coefficient covariance behind every interval and test, as computed: the prewhitened
    HAC (``ols.cov_hac_prewhitened``, the default) or Newey-West with the ``lags`` asked for
    (``ols.cov_hac``)."""
    if lags is None:
        return ("HAC with AR(1) prewhitening (Andrews and Monahan, 1992), Bartlett kernel with "
                "Andrews' (1991) data-driven bandwidth, small-sample factor n/(n-k), "
                "t quantiles")
    return (f"Newey-West HAC, Bartlett kernel, {lags} lags (as asked), small-sample factor "
            f"n/(n-k), t quantiles")


def _check_breaks(n: int, breaks: Sequence[int], spec: TrendSpec, kind: str) -> list[int]:
    positions = sorted(int(b) for b in breaks)
    if len(set(positions)) != len(positions):
        raise InputError("breaks: the same break position is given twice")
    edges = [0] + positions + [n]
    per_regime = spec.trend_terms if kind == "both" else 1
    for i in range(len(edges) - 1):
        if edges[i + 1] - edges[i] < max(per_regime, 1) + 1 or not 0 <= edges[i] < n:
            raise InputError(f"breaks: regime {i + 1} (positions {edges[i]}..{edges[i + 1] - 1}) "
                             f"is too short for a {spec.shape} trend of its own")
    return positions


def _fit_joint(series: Series, spec: TrendSpec, breaks: list[int], kind: str,
               lags: int | None, seasonal_by_regime: bool = False) -> _Model:
    """The regime design that dates the breaks (``regime_design``), fitted by least squares,
    with its HAC covariance and each regime's trend as a map of the coefficients."""
    n = series.n
    first = series.first_season()
    response = model_response(series.values, spec, first)
    design = RegimeDesign(spec, kind, tuple(breaks), n, first, seasonal_by_regime)
    X = design.columns()
    if X.shape[0] - X.shape[1] < 2:
        raise InputError(f"the series has {n} points, too few for {len(breaks) + 1} regimes "
                         f"of a {spec.describe()}")
    try:
        res = ols.fit(X, response.y)
    except ols.RankDeficient as exc:
        raise InputError(f"the regime model cannot be fitted as a {spec.describe()}: {exc}") from None
    L = ols.newey_west_lags(n) if lags is None else int(lags)
    cov = res.cov_hac(L, small_sample=True) if lags is not None else res.cov_hac_prewhitened()
    words = covariance_words(None if lags is None else L)
    fitted = response.y - res.residuals + response.seasonal_offset()
    fitted = np.exp(fitted) if spec.log_scale else fitted
    regimes = tuple(_RegimeTrend(p.start, p.end, p.center, p.spread, p.A) for p in design.pieces)
    return _Model(res.beta, cov, regimes, L, fitted, res.ssr, words)


def _model_from_fits(fits) -> _Model:
    """Independent per-regime fits (``TrendFit`` objects, in time order) as one block model."""
    betas, covs, regimes, lags = [], [], [], []
    offset = 0
    total = sum(f.fit.k for f in fits)
    for f in fits:
        L = ols.newey_west_lags(f.fit.n)
        lags.append(L)
        betas.append(f.fit.beta)
        covs.append(f.fit.cov_hac_prewhitened())
        A = np.zeros((3, total))
        for i in range(f.spec.trend_terms):
            A[i, offset + i] = 1.0
        pos = np.asarray(f.positions)
        regimes.append(_RegimeTrend(int(pos.min()), int(pos.max()), f.scale.center,
                                    f.scale.spread, A))
        offset += f.fit.k
    cov = np.zeros((total, total))
    o = 0
    for c in covs:
        cov[o:o + len(c), o:o + len(c)] = c
        o += len(c)
    fitted = np.concatenate([f.fitted() for f in fits])
    words = covariance_words(None) + "; each regime fitted on its own, so the change across a " \
        "break uses the sum of the two regimes' covariances"
    return _Model(np.concatenate(betas), cov, tuple(regimes), max(lags), fitted, None, words)


# ---------------------------------------------------------------------------------------------
# figures


def _delta(d: _Dual, cov: np.ndarray, z: float) -> Estimate:
    var = float(d.grad @ cov @ d.grad)
    se = math.sqrt(max(var, 0.0))
    if not math.isfinite(d.value):
        return Estimate(None, None, None, None)
    return Estimate(d.value, se, d.value - z * se, d.value + z * se)


def _mapped(b: _Dual, fn, cov: np.ndarray, z: float, increasing: bool = True) -> Estimate:
    """A monotone function of one coefficient: value, delta-method se, mapped interval."""
    var = float(b.grad @ cov @ b.grad)
    se_b = math.sqrt(max(var, 0.0))
    value = fn(b)
    lo, hi = fn(b.value - z * se_b), fn(b.value + z * se_b)
    if not increasing:
        lo, hi = hi, lo
    se = math.sqrt(max(float(value.grad @ cov @ value.grad), 0.0))
    return Estimate(value.value, se, _value(lo), _value(hi))


def _value(x):
    return x.value if isinstance(x, _Dual) else x


def _ratio_pct(num: _Dual, den: _Dual, cov, z) -> Estimate | None:
    if den.value <= 0:
        return None
    return _delta(num / den * 100.0, cov, z)


def _regime_figures(rt: _RegimeTrend, beta, cov, spec: TrendSpec, ppy: float, z: float):
    """All figures of one regime, and notes on those that are undefined."""
    figures: dict[str, Estimate | None] = {}
    notes: list[str] = []
    t0, t1 = float(rt.start), float(rt.end)
    f0, f1 = rt.level(beta, t0), rt.level(beta, t1)
    if spec.log_scale:
        b = rt.slope(beta, t1)  # log growth per period (constant within the regime)
        figures[gf.LOG_GROWTH_PER_PERIOD] = _delta(b, cov, z)

        def per_period(x):
            return (x.exp() - 1.0) * 100.0 if isinstance(x, _Dual) else (math.exp(x) - 1) * 100

        def annual(x):
            return ((x * ppy).exp() - 1.0) * 100.0 if isinstance(x, _Dual) else \
                (math.exp(x * ppy) - 1) * 100

        figures[gf.PER_PERIOD_PCT] = _mapped(b, per_period, cov, z)
        figures[gf.ANNUALISED_PCT] = _mapped(b, annual, cov, z)
        level_end, level_start = f1.exp(), f0.exp()
        figures[gf.LEVEL_START] = _delta(level_start, cov, z)
        figures[gf.LEVEL_END] = _delta(level_end, cov, z)
        figures[gf.PER_PERIOD_UNITS] = _delta(level_end * (b.exp() - 1.0), cov, z)
        figures[gf.ANNUALISED_UNITS] = _delta(level_end * ((b * ppy).exp() - 1.0), cov, z)
        if b.value > 0:
            se_b = math.sqrt(max(float(b.grad @ cov @ b.grad), 0.0))
            lo_b, hi_b = b.value - z * se_b, b.value + z * se_b
            for name, scale in ((gf.DOUBLING_TIME_PERIODS, 1.0), (gf.DOUBLING_TIME_YEARS, ppy)):
                d = math.log(2.0) / (b * scale)
                se = math.sqrt(max(float(d.grad @ cov @ d.grad), 0.0))
                upper = math.log(2.0) / (lo_b * scale) if lo_b > 0 else None
                figures[name] = Estimate(d.value, se, math.log(2.0) / (hi_b * scale), upper)
            if lo_b <= 0:
                notes.append("the 95% interval of growth includes zero, so the doubling time "
                             "has no upper bound")
        else:
            notes.append("the trend is not growing, so it has no doubling time")
        return figures, notes
    figures[gf.LEVEL_START] = _delta(f0, cov, z)
    figures[gf.LEVEL_END] = _delta(f1, cov, z)
    slope_end = rt.slope(beta, t1)
    figures[gf.PER_PERIOD_UNITS] = _delta(slope_end, cov, z)
    figures[gf.ANNUALISED_UNITS] = _delta(slope_end * ppy, cov, z)
    pct = _ratio_pct(slope_end, f1, cov, z)
    if pct is None:
        notes.append("the fitted level at the regime's end is not positive, so growth in % is "
                     "undefined")
    else:
        figures[gf.PER_PERIOD_PCT] = pct
        figures[gf.ANNUALISED_PCT] = _ratio_pct(slope_end * ppy, f1, cov, z)
    if spec.shape == "linear":
        start_pct = _ratio_pct(slope_end * ppy, f0, cov, z)
        if start_pct is not None:
            figures[gf.ANNUALISED_PCT_OF_START] = start_pct
        if pct is not None:
            figures[gf.ANNUALISED_PCT_OF_END] = figures[gf.ANNUALISED_PCT]
        compound = _line_compound(f0, f1, t1 - t0, ppy, cov, z)
        if compound is not None:
            figures[gf.ANNUALISED_PCT] = compound
        elif pct is not None:
            del figures[gf.ANNUALISED_PCT]
            notes.append("the fitted line is not positive at both ends of the regime, so its "
                         "compound growth in % is undefined")
        return figures, notes
    # quadratic: growth at the end (above) and the average over the regime
    span = t1 - t0
    avg = (f1 - f0) / span
    figures[gf.AVERAGE_PER_PERIOD_UNITS] = _delta(avg, cov, z)
    figures[gf.AVERAGE_ANNUALISED_UNITS] = _delta(avg * ppy, cov, z)
    if f0.value > 0 and f1.value > 0:
        cagr = (((f1 / f0).log() * (ppy / span)).exp() - 1.0) * 100.0
        figures[gf.AVERAGE_ANNUALISED_PCT] = _delta(cagr, cov, z)
    else:
        notes.append("the fitted level is not positive at both ends of the regime, so the "
                     "average growth in % is undefined")
    figures[gf.CURVATURE_PER_PERIOD] = _delta(rt.curvature(beta), cov, z)
    return figures, notes


def _line_compound(f0: _Dual, f1: _Dual, span: float, ppy: float, cov, z) -> Estimate | None:
    """Compound annual growth of a fitted line from level f0 to f1 over ``span`` periods, %."""
    if span <= 0 or f0.value <= 0 or f1.value <= 0:
        return None
    return _delta((((f1 / f0).log() * (ppy / span)).exp() - 1.0) * 100.0, cov, z)


def _change_test(prev: _RegimeTrend, nxt: _RegimeTrend, beta, cov, spec: TrendSpec):
    """Wald test of equal growth coefficients across the break between two regimes: the slope
    per period at the break (and the curvature for the quadratic shape). Returns
    (statistic, p-value, degrees of freedom, note)."""
    at = float(nxt.start)
    diffs = [nxt.slope(beta, at) - prev.slope(beta, at)]
    if spec.shape == "quadratic":
        diffs.append(nxt.curvature(beta) - prev.curvature(beta))
    G = np.vstack([d.grad for d in diffs])
    dvec = np.array([d.value for d in diffs])
    if not np.any(G):
        return None, None, len(diffs), ("growth is shared by all regimes under level-only "
                                        "breaks; nothing to test")
    try:
        wald = float(dvec @ np.linalg.solve(G @ cov @ G.T, dvec))
    except np.linalg.LinAlgError:
        return None, None, len(diffs), "the covariance of the growth change is singular; no test"
    return wald, float(stats.chi2.sf(wald, len(diffs))), len(diffs), ""


def _change_estimate(prev_rt, next_rt, beta, cov, spec, ppy, z) -> Estimate:
    """Change of the headline annualised % (percentage points), delta method."""
    def headline(rt):
        t0, t1 = float(rt.start), float(rt.end)
        if spec.log_scale:
            return ((rt.slope(beta, t1) * ppy).exp() - 1.0) * 100.0
        level = rt.level(beta, t1)
        if level.value <= 0:
            return None
        if spec.shape == "linear":
            f0 = rt.level(beta, t0)
            if t1 <= t0 or f0.value <= 0:
                return None
            return (((level / f0).log() * (ppy / (t1 - t0))).exp() - 1.0) * 100.0
        return rt.slope(beta, t1) * ppy / level * 100.0

    a, b = headline(prev_rt), headline(next_rt)
    if a is None or b is None:
        return Estimate(None, None, None, None)
    return _delta(b - a, cov, z)


def _estimate_test(est: Estimate) -> tuple[float | None, float | None]:
    """(Wald statistic, p-value) of ``est`` = 0 on 1 degree of freedom: (value / se)^2, the
    same standard error as the interval, so p < 0.05 exactly when the interval excludes 0."""
    if est.value is None or est.se is None or not est.se > 0:
        return None, None
    w = (est.value / est.se) ** 2
    return w, float(stats.chi2.sf(w, 1))


def _headline_words(spec: TrendSpec) -> str:
    if spec.log_scale:
        return "compound annual growth of the regime's exponential trend"
    if spec.shape == "linear":
        return _linear_words()
    return "growth at the regime's end, a year's worth, as % of the fitted level there"


def _linear_words() -> str:
    return ("compound annual growth of the fitted line from its level at the regime's start to "
            "its level at the end")


def _table(series: Series, spec: TrendSpec, kind: str, model: _Model, level: float,
           seasonal_by_regime: bool = False) -> GrowthTable:
    ppy = series.frequency.periods_per_year
    z = ols.t_quantile(level, max(len(model.fitted) - len(model.beta), 1))
    regimes = []
    for i, rt in enumerate(model.regimes):
        figures, notes = _regime_figures(rt, model.beta, model.cov, spec, ppy, z)
        regimes.append(RegimeGrowth(i + 1, rt.start, rt.end, series.iso(rt.start),
                                    series.iso(rt.end), series.label(rt.start),
                                    series.label(rt.end), figures, tuple(notes)))
    changes = []
    for i in range(1, len(model.regimes)):
        prev, nxt = model.regimes[i - 1], model.regimes[i]
        slope_wald, slope_p, slope_df, note = _change_test(prev, nxt, model.beta, model.cov, spec)
        if kind == "level":  # one growth rate shared by all regimes: no change to show
            est, wald, p = Estimate(None, None, None, None), None, None
            note = ("growth is shared by all regimes under level-only breaks; the break "
                    "shifts the level only")
        else:
            est = _change_estimate(prev, nxt, model.beta, model.cov, spec, ppy, z)
            wald, p = _estimate_test(est)
        changes.append(GrowthChange(i, series.iso(nxt.start), series.label(nxt.start), est,
                                    wald, 1, p, note, slope_wald, slope_df, slope_p))
    return GrowthTable(series.name, spec, kind, ppy, series.frequency.name, model.lags,
                       tuple(regimes), tuple(changes), _headline_words(spec), model.fitted,
                       _trend_line(model, spec), model.ssr, seasonal_by_regime,
                       model.covariance)


def _trend_line(model: _Model, spec: TrendSpec) -> np.ndarray:
    """Each regime's trend over its own periods, seasonal terms at their average (zero for
    effect-coded dummies), in original units (the median for the exponential shape)."""
    pieces = []
    for rt in model.regimes:
        a, b, c = rt.A @ model.beta
        u = (np.arange(rt.start, rt.end + 1, dtype=float) - rt.center) / rt.spread
        pieces.append(a + b * u + c * u * u)
    line = np.concatenate(pieces) if pieces else np.zeros(0)
    return np.exp(line) if spec.log_scale else line


# ---------------------------------------------------------------------------------------------
# entry points


def regime_growth(series: Series, spec: TrendSpec, breaks: Sequence[int] = (), *,
                  kind: str = "both", lags: int | None = None, level: float = LEVEL,
                  seasonal_by_regime: bool = False) -> GrowthTable:
    """Growth of every regime of ``series`` between the break positions ``breaks``.

    ``breaks`` are positions of the first period of each new regime. ``kind`` says what a break
    may change (``both``, ``slope``, ``level``); ``seasonal_by_regime`` lets the seasonal
    dummies change at each break as well; ``lags`` asks for Newey-West with that truncation
    lag instead of the default prewhitened HAC (``covariance_words``).
    """
    if kind not in KINDS:
        raise InputError(f"{about('kind')}: {kind!r} is not one of {', '.join(KINDS)}")
    if not 0 < level < 1:
        raise InputError("growth interval level must be between 0 and 1")
    positions = _check_breaks(series.n, breaks, spec, kind)
    model = _fit_joint(series, spec, positions, kind, lags, seasonal_by_regime)
    return _table(series, spec, kind, model, level,
                  seasonal_by_regime and spec.seasonality == "dummies")


def growth_from_fits(series: Series, fits: Sequence, *, level: float = LEVEL) -> GrowthTable:
    """Growth from regime trends fitted separately (``TrendFit`` objects in time order).

    Each fit keeps its own HAC covariance; fits are independent, so the change across a break is
    tested with the sum of the two covariances.
    """
    fits = list(fits)
    if not fits:
        raise InputError("growth needs at least one fitted regime")
    spec = fits[0].spec
    if any(f.spec.shape != spec.shape for f in fits):
        raise InputError("growth: all regime fits must have the same shape")
    model = _model_from_fits(fits)
    return _table(series, spec, "both", model, level)


def growth_table(source, spec: TrendSpec | None = None, breaks=None, **options) -> GrowthTable:
    """Growth by regime from an ``Analysis`` (its own growth table when it has one), or from a
    ``Series`` with a ``TrendSpec`` and break positions or a ``BreakSet``."""
    if isinstance(source, Series):
        if spec is None:
            raise InputError("growth_table: give the TrendSpec of the trend")
        kind = options.pop("kind", None)
        positions, break_kind = _break_positions(breaks)
        options.setdefault("seasonal_by_regime", _by_regime(breaks))
        return regime_growth(source, spec, positions, kind=kind or break_kind, **options)
    existing = getattr(source, "growth", None)
    if isinstance(existing, GrowthTable) and not options and spec is None and breaks is None:
        return existing
    series = getattr(source, "series", None)
    if not isinstance(series, Series):
        raise InputError("growth_table: expected an Analysis or a Series")
    breaks = getattr(source, "breaks", None) if breaks is None else breaks
    positions, break_kind = _break_positions(breaks)
    kind = options.pop("kind", None) or break_kind
    options.setdefault("seasonal_by_regime", _by_regime(breaks))
    return regime_growth(series, spec or source.spec, positions, kind=kind, **options)


def _by_regime(breaks) -> bool:
    """Whether a BreakSet's search let the seasonal terms change with the regime."""
    return bool(getattr(breaks, "seasonal_by_regime", False))


def _break_positions(breaks) -> tuple[list[int], str]:
    """Positions and break kind from a BreakSet-like object or a plain sequence."""
    if breaks is None:
        return [], "both"
    kind = getattr(breaks, "kind", None)
    kind = kind if kind in KINDS else "both"
    positions = getattr(breaks, "positions", breaks)
    return [int(p) for p in positions], kind
