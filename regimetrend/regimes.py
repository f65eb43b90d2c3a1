"""Regime strategies: five ways to forecast a trend whose growth regime may have changed.

Every strategy fits on the history known at an origin (positions ``0..o-1``), is told where the
breaks are (first periods of new regimes, as found from that same history), and forecasts
positions ``o..`` with 80% and 95% prediction intervals in original units.

- ``global``: one trend over all history (the baseline every other strategy is measured against).
- ``separate``: one trend per regime, fitted jointly in one least-squares fit with the seasonal
  terms shared by all regimes and one pooled residual variance; forecasts come from the last
  regime's trend. The last regime may take its own shape (linear and quadratic share the level
  scale, so they mix in one joint fit). A last regime whose shape needs another modelling scale
  (logs against levels) cannot share terms with the earlier regimes in one fit: that model is
  exactly ``truncated`` with the last regime's shape, so it is not offered twice.
- ``truncated``: the trend fitted only on the history from a start: the last detected break, a
  user event, or a fixed start of the history sweep.
- ``continuous``: a piecewise trend joined at the breaks (hinge terms ``max(t - b, 0)`` on the
  time index, zero up to the break; quadratic pieces add squared hinges), so the slope changes
  at a break but the trend has no jump.
- ``window-average``: the average of the forecasts of the same trend fitted on several
  estimation windows that all end at the origin (Pesaran and Pick, 2011), a hedge when the
  break date is uncertain. Interval ends are averaged quantile by quantile (quantile averaging).

The joint fits (``separate``, ``continuous``) are the regime design of ``regime_design`` (kinds
``both`` and ``slope``), the same model the break search dates breaks with and growth reports.
They go through the least-squares core, and their forecasts use the core's ``predict`` at the
design's rows after the history (the last regime's), then the same back-transform as a single
trend (lognormal mean for the exponential shape).

Each strategy is an entry of the strategy table (``strategy_table``, where the five above are
registered): its forecaster, its words and how the comparison offers it. ``OriginFits.forecast``
and ``strategy_forecast`` look strategies up there, so a registered one is scored and forecast
like these; ``OriginFits`` offers the cached fits the forecasters build on.

Breaks that leave a regime too short for its own trend are ignored (the regime joins the one
before it), so a strategy never fails because a break was found close to an origin.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from . import ols
from .design import (
    SHAPES,
    TimeScale,
    TrendSpec,
    seasonal_columns,
    to_model_scale,
    trend_columns,
)
from .errors import InputError, about
from .ols import t_quantile
from .regime_design import ModelResponse, RegimeDesign, model_response
from .strategy_table import StrategyKind, strategy_kind, strategy_kinds
from .trendfit import PointForecasts, TrendFit, fit_trend

LAYOUTS = {"separate": "both", "continuous": "slope"}  # joint strategy -> regime design kind
TERMS = {"linear": 2, "exponential": 2, "quadratic": 3}


@dataclass(frozen=True)
class Strategy:
    """One candidate: a strategy, its shape, and (separate) the last regime's shape or
    (truncated) a fixed first position; ``start=None`` means "from the last break"."""

    name: str
    shape: str = "linear"
    last_shape: str | None = None
    start: int | None = None
    start_label: str | None = None  # how a fixed start is named (a date, or "event ...")
    from_break: int = 1  # truncated without a fixed start: the k-th last usable break
    # the fixed start is a break date found on the full sample: the fit knows where a break
    # is that an origin's own history may not show yet (optimistic, labelled so everywhere)
    in_sample_start: bool = False
    # window-average: the evaluation's window rule (see ``window_rule``), carried so that the
    # final forecast averages the same windows the rolling origin scored; None = the default
    minimum_window: int | None = field(default=None, compare=False)
    window_spacing: int | None = field(default=None, compare=False)

    def __post_init__(self):
        kind = strategy_kind(self.name)
        for s in (self.shape, self.last_shape):
            if s is not None and s not in SHAPES:
                raise InputError(f"{about('shape')}: {s!r} is not one of {', '.join(SHAPES)}")
        if self.last_shape == self.shape:
            object.__setattr__(self, "last_shape", None)
        if self.last_shape is not None and not kind.mixed_shapes:
            raise InputError(f"a last-regime shape applies to the separate strategy, not to "
                             f"{self.name}")
        if self.last_shape is not None and ((self.shape == "exponential")
                                            != (self.last_shape == "exponential")):
            raise InputError(f"separate {self.shape} then {self.last_shape}: the regimes need "
                             f"different modelling scales; use truncated {self.last_shape}")

    @property
    def key(self) -> str:
        """Plain unique name, e.g. ``separate linear then quadratic``, ``truncated linear``."""
        name = f"{self.name} {self.shape}"
        if self.last_shape:
            name += f" then {self.last_shape}"
        if self.start is not None:
            name += f" from {self.start_label or self.start}"
        elif self.kind.from_breaks and self.from_break > 1:
            name += f" from break {self.from_break} before the end"
        return name

    @property
    def regime_aware(self) -> bool:
        return self.kind.regime_aware

    @property
    def kind(self) -> StrategyKind:
        """This strategy's entry in the strategy table."""
        return strategy_kind(self.name)

    def describe(self) -> str:
        """This candidate in plain words (from the strategy table)."""
        return self.kind.words(self)

    def to_dict(self) -> dict:
        return {"strategy": self.name, "shape": self.shape, "last_shape": self.last_shape,
                "start": self.start_label if self.start is not None else None,
                "from_break": self.from_break if self.kind.from_breaks else None,
                "name": self.key, "description": self.describe()}


def standard_strategies(shapes=SHAPES, mixed=True, earlier_breaks: int = 0,
                        main_shape: str | None = None) -> list[Strategy]:
    """Every standard strategy of the strategy table with each shape (once, with
    ``main_shape``, for those not tried with every shape), plus fits whose last regime changes
    shape between linear and quadratic (when both are in ``shapes``), plus fits of
    ``main_shape`` from the 2nd .. (earlier_breaks + 1)-th last break."""
    main = main_shape or shapes[0]
    kinds = [k for k in strategy_kinds() if k.standard]
    out = []
    for kind in kinds:
        for shape in (shapes if kind.every_shape else (main,)):
            out.append(Strategy(kind.name, shape))
    for kind in kinds:
        if kind.from_breaks:
            for k in range(2, earlier_breaks + 2):
                out.append(Strategy(kind.name, main, from_break=k))
    if mixed:
        for kind in kinds:
            if not kind.mixed_shapes:
                continue
            for a in shapes:
                for b in shapes:
                    if a != b and "exponential" not in (a, b):
                        out.append(Strategy(kind.name, a, last_shape=b))
    return out


def usable_breaks(breaks, origin: int, first_need: int, last_need: int) -> tuple[int, ...]:
    """Breaks inside ``1..origin-1`` that leave every regime ``first_need`` points and the last
    one ``last_need``; a break too close to the one before it (or to the origin) is dropped."""
    kept, prev = [], 0
    for b in sorted(int(b) for b in breaks):
        if b - prev >= first_need and b < origin:
            kept.append(b)
            prev = b
    while kept and origin - kept[-1] < last_need:
        kept.pop()
    return tuple(kept)


def joint_knots(breaks, origin: int, shape: str, seasonality: str,
                last_shape: str | None = None) -> tuple[int, ...]:
    """The breaks a joint fit (separate or continuous) of ``shape`` uses up to ``origin``:
    every regime keeps one point more than the shape's trend terms, the last one two more (of
    ``last_shape``); with seasonal adjustment at least two."""
    first_need = TERMS[shape] + 1
    last_need = TERMS[last_shape or shape] + 2
    if seasonality == "adjust":
        first_need = last_need = max(last_need, 2)
    return usable_breaks(breaks, origin, first_need, last_need)


@dataclass(frozen=True, eq=False)
class PiecewiseFit(TrendFit):
    """A joint least-squares fit of the regime design (``regime_design.RegimeDesign``: kind
    ``both`` for the separate strategy, ``slope`` for the continuous one); forecasts use
    TrendFit's back-transform at the design's rows after the history (the last regime's)."""

    regimes: RegimeDesign | None = None

    @property
    def regime_design(self) -> RegimeDesign:
        if self.regimes is None:
            raise ValueError("a piecewise fit needs its regime design")
        return self.regimes

    def design(self, positions, seasonal=None) -> np.ndarray:
        """Design rows at ``positions``; ``seasonal`` may pass their seasonal columns in."""
        return self.regime_design.columns(np.asarray(positions), seasonal)


class OriginFits:
    """All fits made on one stretch of history, cached so strategies share them.

    ``values`` is the history known at the origin; ``breaks`` the first periods of new regimes
    found from it. ``spec_for(shape)`` gives the TrendSpec of each shape with the common
    seasonality."""

    def __init__(self, values, first_season: int, seasonality: str, season_length: int,
                 breaks=(), window_starts=(), season_block=None, minimum_window: int = 0):
        self.values = np.asarray(values, dtype=float)
        self.origin = len(self.values)
        self.first_season = int(first_season)
        self.seasonality = seasonality
        self.season_length = int(season_length)
        self.breaks = tuple(sorted(int(b) for b in breaks))
        self.window_starts = tuple(int(s) for s in window_starts)
        self.minimum_window = int(minimum_window)  # shortest window the window average uses
        self._trends: dict = {}
        self._forecasts: dict = {}
        self._blocks: dict = {}  # batched forecasts' fields as rows (see ``_keep``)
        self._designs: dict = {}  # joint-fit design matrices shared by shapes with equal columns
        self._specs: dict = {}
        self._y: dict = {}
        self._season_block = season_block
        self._ahead = 0  # periods forecast after the origin, once known (``prefit``)

    def spec_for(self, shape: str) -> TrendSpec:
        if shape not in self._specs:
            self._specs[shape] = TrendSpec(shape, self.seasonality, self.season_length)
        return self._specs[shape]

    # -- single trends -------------------------------------------------------------------
    def _seasonal(self, start: int, stop: int) -> np.ndarray:
        """Effect-coded seasonal columns of positions start..stop-1 (from a shared block)."""
        block = self._season_block
        if block is None or len(block) < stop:
            block = seasonal_columns(np.arange(stop), self.first_season, self.season_length)
            self._season_block = block
        return block[start:stop]

    def _model_y(self, spec: TrendSpec) -> np.ndarray:
        if spec.log_scale not in self._y:
            self._y[spec.log_scale] = to_model_scale(self.values, spec)
        return self._y[spec.log_scale]

    def _design(self, spec: TrendSpec, scale: TimeScale, start: int, stop: int) -> np.ndarray:
        X = trend_columns(np.arange(start, stop), spec.shape, scale)
        if spec.seasonality == "dummies":
            X = np.hstack([X, self._seasonal(start, stop)])
        return X

    def trend(self, shape: str, start: int = 0) -> TrendFit:
        """The single trend fitted on positions start..origin-1 (what ``fit_trend`` fits; the
        seasonal columns come from a block shared by every fit)."""
        key = (shape, start)
        if key in self._trends:
            return self._trends[key]
        spec = self.spec_for(shape)
        positions = np.arange(start, self.origin)
        if spec.seasonality == "adjust":
            fit = fit_trend(self.values[start:], positions, spec, self.first_season,
                            _what(start))
        else:
            need = spec.minimum_points()
            if len(positions) < need:
                raise InputError(f"{_what(start)} has {len(positions)} points; a "
                                 f"{spec.describe()} needs at least {need}")
            scale = TimeScale.for_range(start, self.origin)
            X = self._design(spec, scale, start, self.origin)
            try:
                result = ols.fit(X, self._model_y(spec)[start:])
            except ols.RankDeficient as exc:
                raise InputError(f"{_what(start)} cannot be fitted as a {spec.describe()}: "
                                 f"{exc}") from None
            fit = TrendFit(spec, positions, self.first_season, scale, result, None)
        self._trends[key] = fit
        return fit

    def trend_forecast(self, shape: str, start: int, positions) -> PointForecasts:
        key = (shape, start, len(positions))
        if key not in self._forecasts:
            fit = self.trend(shape, start)
            X_new = None
            if fit.spec.seasonality != "adjust":
                X_new = self._design(fit.spec, fit.scale, int(positions[0]),
                                     int(positions[-1]) + 1)
            self._forecasts[key] = forecast_points(fit, positions, X_new)
        return self._forecasts[key]

    def latest_start(self, shape: str, k: int = 1) -> int:
        """First period of the k-th last regime start whose history is long enough for its own
        ``shape`` trend (all history when there are fewer usable breaks)."""
        need = self.spec_for(shape).minimum_points()
        kept = usable_breaks(self.breaks, self.origin, 1, need)
        return kept[-k] if len(kept) >= k else 0

    # -- joint fits -----------------------------------------------------------------------
    def piecewise(self, layout: str, shape: str, last_shape: str | None = None) -> TrendFit:
        last_shape = last_shape or shape
        key = (layout, shape, last_shape)
        if key in self._trends:
            return self._trends[key]
        spec = self.spec_for(shape)
        knots = joint_knots(self.breaks, self.origin, shape, spec.seasonality, last_shape)
        while True:
            if not knots:
                fit = self.trend(last_shape)
                self._trends[key] = fit
                return fit
            try:
                fit = self._joint_fit(spec, layout, knots, last_shape)
                break
            except ols.RankDeficient as exc:
                if spec.seasonality != "dummies":
                    raise InputError(f"the {layout} {shape} trend cannot be fitted to the "
                                     f"history up to position {self.origin}: {exc}") from None
                # Regimes each at most one season long: their trends are confounded with the
                # shared seasonal pattern (a sawtooth is both); the oldest break goes first.
                knots = knots[1:]
        self._trends[key] = fit
        return fit

    def _joint_fit(self, spec: TrendSpec, layout: str, knots, last_shape: str) -> PiecewiseFit:
        """The joint fit of the regime design with ``knots`` (``ols.RankDeficient`` when its
        columns are dependent)."""
        response = self._response(spec)
        design = RegimeDesign(spec, LAYOUTS[layout], knots, self.origin, self.first_season,
                              last_shape=last_shape if layout == "separate" else None)
        positions = np.arange(self.origin)
        scale = TimeScale.for_range(0, self.origin)
        proto = PiecewiseFit(spec, positions, self.first_season, scale, None,  # type: ignore[arg-type]
                             response.pattern,
                             design)
        X = self._joint_design(proto, 0, self.origin)
        result = ols.fit(X, response.y)
        return PiecewiseFit(spec, positions, self.first_season, scale, result, response.pattern,
                            design)

    def _joint_design(self, fit: PiecewiseFit, start: int, stop: int) -> np.ndarray:
        """Design rows ``start..stop-1`` of a joint fit, cached: the history's rows and the
        forecast rows after it come from one build (each row depends on its position alone),
        and linear and exponential pieces have the same columns, so their fits share one
        matrix. The history's rows are read-only (the least-squares core keeps them, nobody
        edits them); rows after the origin are a copy of their own."""
        d = fit.regime_design
        columns = tuple("quadratic" if sh == "quadratic" else "linear" for sh in d.shapes)
        key = (d.kind, columns, d.breaks, d.spec.seasonality)
        block = self._designs.get(key)
        if block is None or len(block) < stop:
            end = max(stop, self.origin + self._ahead)
            block = fit.design(np.arange(end), self._seasonal(0, end)
                               if fit.spec.seasonality == "dummies" else None)
            block.setflags(write=False)
            self._designs[key] = block
        return block[start:stop] if start == 0 else block[start:stop].copy()

    def _response(self, spec: TrendSpec) -> ModelResponse:
        """The history on the model scale (seasonally adjusted under ``adjust``), cached."""
        key = ("response", spec.log_scale)
        if key not in self._y:
            self._y[key] = model_response(self.values, spec, self.first_season)
        return self._y[key]

    # -- strategies -----------------------------------------------------------------------
    def forecast(self, strategy: Strategy, horizon: int) -> PointForecasts:
        """Forecasts of ``strategy`` for the ``horizon`` periods after the origin (its
        forecaster in the strategy table)."""
        return strategy.kind.forecast(self, strategy, horizon)

    def positions_after(self, horizon: int) -> np.ndarray:
        """The ``horizon`` positions after the origin."""
        return np.arange(self.origin, self.origin + horizon)

    def joint_forecast(self, layout: str, shape: str, last_shape: str | None,
                       horizon: int) -> PointForecasts:
        """Forecasts of the joint fit ``piecewise(layout, shape, last_shape)``, cached."""
        positions = self.positions_after(horizon)
        key = (layout, shape, last_shape or shape, "fc", horizon)
        if key not in self._forecasts:
            self._ahead = max(self._ahead, int(horizon))  # the design is built with these rows
            fit = self.piecewise(layout, shape, last_shape)
            X_new = None
            if isinstance(fit, PiecewiseFit):
                X_new = self._joint_design(fit, self.origin, self.origin + horizon)
            elif fit.spec.seasonality != "adjust":
                X_new = self._design(fit.spec, fit.scale, self.origin, self.origin + horizon)
            self._forecasts[key] = forecast_points(fit, positions, X_new)
        return self._forecasts[key]

    def truncated_start(self, strategy: Strategy) -> int:
        """First period of a trend fitted from a start: a fixed start (all history when it is
        too recent for this origin) or the ``from_break``-th last usable break."""
        if strategy.start is None:
            return self.latest_start(strategy.shape, strategy.from_break)
        if self.origin - strategy.start < self.spec_for(strategy.shape).minimum_points():
            return 0
        return strategy.start

    def single_starts(self, strategy: Strategy) -> tuple[int, ...]:
        """Starts of the single trends a strategy forecasts from (empty for joint fits)."""
        starts = strategy.kind.single_starts
        return tuple(starts(self, strategy)) if starts is not None else ()

    def prefit(self, strategies, horizon: int) -> None:
        """Fit every single trend the strategies need, one batched QR per design: shapes with
        the same trend columns (linear and exponential: [1, u]) share one QR over the union of
        their window starts, only their responses differ (a window's numbers do not depend on
        the other windows of its batch)."""
        positions = self.positions_after(horizon)
        for by_shape in self.prefit_plan(strategies, horizon).values():
            union = sorted(set().union(*by_shape.values()))
            if not self._prefit_group(list(by_shape), union, positions, by_shape):
                for shape, pending in by_shape.items():  # one singular window: as before,
                    self._prefit_group([shape], pending, positions)  # shape by shape

    def prefit_plan(self, strategies, horizon: int) -> dict:
        """{trend columns: {shape: window starts not fitted yet}} of the single trends the
        strategies need; a shape with a lone start is left out (it is fitted one by one)."""
        positions = self.positions_after(horizon)
        wanted: dict = {}
        for st in strategies:
            wanted.setdefault(st.shape, set()).update(self.single_starts(st))
        groups: dict = {}
        for shape, starts in wanted.items():
            pending = self._pending(shape, sorted(starts), positions)
            if len(pending) >= 2:
                columns = "quadratic" if shape == "quadratic" else "linear"
                groups.setdefault(columns, {})[shape] = pending
        return groups

    def _pending(self, shape: str, starts, positions) -> list:
        """Window starts of ``shape`` whose forecasts are not cached yet."""
        return [s for s in starts if (shape, s, len(positions)) not in self._forecasts]

    def prefit_windows(self, shape: str, starts, positions) -> None:
        """Fit the single trends of several window starts in one batched QR (see
        ``batched_forecasts``) and cache their forecasts; ``adjust`` keeps the one-by-one path."""
        self._prefit_group([shape], self._pending(shape, starts, positions), positions)

    def _prefit_group(self, shapes, pending, positions, keep=None) -> bool:
        """Batched fits of the windows ``pending`` for shapes sharing one design (one QR);
        ``keep[shape]`` limits the forecasts kept to that shape's own starts. False when a
        window's design is singular (nothing kept: the one-by-one path reports it)."""
        spec = self.spec_for(shapes[0])
        if spec.seasonality == "adjust" or len(pending) < 2:
            return True
        first = np.asarray(pending, dtype=float)
        last = float(self.origin - 1)
        center = (first + last) / 2.0  # TimeScale.for_positions of each window
        spread = np.maximum((last - first) / 2.0, 1.0)
        p0, p1 = int(positions[0]), int(positions[-1]) + 1
        X = self._stacked_design(spec, center, spread, 0, self.origin)
        X[np.arange(self.origin)[None, :] < first[:, None]] = 0.0
        X_new = self._stacked_design(spec, center, spread, p0, p1)
        specs = [self.spec_for(sh) for sh in shapes]
        good, got = batched_fields(X, [self._model_y(sp) for sp in specs], np.asarray(pending),
                                   X_new, [sp.log_scale for sp in specs])
        if len(good) < len(pending):
            return False
        for shape, fields in zip(shapes, got):
            own = None if keep is None else set(keep[shape])
            for w, s in enumerate(pending):
                if own is None or s in own:
                    self._keep(shape, s, positions, fields[:, w])
        return True

    def _keep(self, shape: str, start: int, positions, block) -> None:
        """Cache a batched single-trend forecast; ``block`` holds its six fields (mean, median,
        interval ends) as rows, kept too for the window average."""
        key = (shape, start, len(positions))
        self._forecasts[key] = PointForecasts(np.asarray(positions), *block)
        self._blocks[key] = block

    def _stacked_design(self, spec, center, spread, start: int, stop: int) -> np.ndarray:
        """(windows, stop - start, k) designs: [1, u, (u^2)] on each window's own time scale,
        then the shared seasonal columns."""
        season = self._seasonal(0, stop) if spec.seasonality == "dummies" else None
        return _stacked_rows(spec, np.arange(start, stop, dtype=float)[None, :], center,
                             spread, season, slice(start, stop))

    def window_starts_for(self, shape: str) -> tuple[int, ...]:
        """Starts of the windows averaged here: those leaving at least the minimum window (and
        never fewer points than the shape's own fit needs); all history when none does."""
        need = max(self.spec_for(shape).minimum_points(), self.minimum_window)
        starts = [s for s in self.window_starts if self.origin - s >= need]
        return tuple(starts) if starts else (0,)

    def window_average(self, shape: str, positions) -> PointForecasts:
        starts = self.window_starts_for(shape)
        self.prefit_windows(shape, starts, positions)
        parts = [self.trend_forecast(shape, s, positions) for s in starts]
        kept = [self._blocks.get((shape, s, len(positions))) for s in starts]
        blocks = [b for b in kept if b is not None]
        if len(blocks) < len(parts):  # fitted one by one
            fields = ("mean", "median", "lower80", "upper80", "lower95", "upper95")
            blocks = [np.array([getattr(p, f) for f in fields]) for p in parts]
        # one (fields, windows, horizons) array and one mean instead of one per field
        avg = np.stack(blocks, axis=1).mean(axis=1)
        return PointForecasts(np.asarray(positions), *avg)


def forecast_points(fit: TrendFit, positions, X_new=None) -> PointForecasts:
    """``TrendFit.forecast`` with cached t quantiles: the mean and the prediction standard
    error at the design rows as the core's ``predict`` computes them (s^2 (1 + x'(X'X)^-1 x));
    the intervals are mean +/- t se on the model scale and are back-transformed as in
    ``trendfit`` (lognormal mean for logs)."""
    positions = np.atleast_1d(np.asarray(positions, dtype=int))
    X_new = fit.design(positions) if X_new is None else X_new
    core = fit.fit
    X_new = np.atleast_2d(np.asarray(X_new, dtype=float))
    leverage = np.einsum("ij,jk,ik->i", X_new, core.xtx_inv, X_new)
    se = np.sqrt(np.maximum(core.sigma2 * (1.0 + leverage), 0.0))
    m = X_new @ core.beta + fit.seasonal_offset(positions)
    df = core.df_resid
    q80, q95 = t_quantile(0.80, df), t_quantile(0.95, df)
    ends = (m - q80 * se, m + q80 * se, m - q95 * se, m + q95 * se)
    if fit.spec.log_scale:
        return PointForecasts(positions, *np.exp(np.stack((m + se * se / 2.0, m) + ends)))
    return PointForecasts(positions, m, m.copy(), *ends)


def batched_forecasts(X, y, starts, X_new, log_scale: bool, positions):
    """Least squares of one response on W designs at once (rows before each window's start
    are zero, so they add nothing to its fit), then forecasts as in ``forecast_points``.

    The arithmetic is that of ``ols.fit`` and ``LeastSquaresFit.predict`` (column scaling,
    Householder QR, one step of iterative refinement, s^2 (1 + x'(X'X)^-1 x)), stacked over the
    windows so that numpy makes one call per step instead of one per window; the tests check
    it against the one-by-one fits. Returns None when any window's design is rank deficient."""
    got = batched_forecasts_many(X, [y], starts, X_new, [log_scale], positions)
    return None if got is None else got[0]


def batched_forecasts_many(X, ys, starts, X_new, log_scales, positions):
    """``batched_forecasts`` for several responses on the same W designs (linear and
    exponential trends share their columns): the QR, (X'X)^-1 and leverages are computed once,
    the y-dependent steps once per response. Returns one list of forecasts per response, or
    None when any window's design is rank deficient."""
    good, got = batched_fields(X, ys, starts, X_new, log_scales)
    if len(good) < X.shape[0]:
        return None
    return [[PointForecasts(positions, *fields[:, w]) for w in range(len(good))]
            for fields in got]


def batched_fields(X, ys, starts, X_new, log_scales):
    """The arithmetic of ``batched_forecasts_many`` on W designs whose rows before
    ``starts[w]`` are zero, skipping rank-deficient windows: (indices of the windows fitted,
    one (6, fitted, H) array per response of mean, median, lower80, upper80, lower95, upper95
    as rows)."""
    W, n, k = X.shape
    starts = np.asarray(starts)
    n_w = n - starts
    norms = np.linalg.norm(X, axis=1)
    good = np.flatnonzero(~np.any(norms == 0, axis=1))
    if len(good) < W:
        X, X_new, norms, starts, n_w = X[good], X_new[good], norms[good], starts[good], n_w[good]
    Xs = X / norms[:, None, :]
    q, r = np.linalg.qr(Xs, mode="reduced")
    diag = np.abs(np.diagonal(r, axis1=1, axis2=2))
    fine = diag.min(axis=1) > diag.max(axis=1) * 1e-12 * np.maximum(n_w, k)
    if not np.all(fine):
        good = good[fine]
        X, X_new, norms, starts, n_w = X[fine], X_new[fine], norms[fine], starts[fine], n_w[fine]
        Xs, q, r = Xs[fine], q[fine], r[fine]
    G = len(good)
    r_inv = np.linalg.solve(r, np.broadcast_to(np.eye(k), (G, k, k)))
    xtx_inv = np.einsum("wij,wkj->wik", r_inv, r_inv) / (norms[:, :, None] * norms[:, None, :])
    df = n_w - k
    lev = np.einsum("whi,wij,whj->wh", X_new, xtx_inv, X_new)
    # (G, 1) t quantiles; the interval arithmetic below is elementwise, so doing it on the
    # (G, H) arrays at once gives each window the numbers its own row would
    q80 = np.array([[t_quantile(0.80, int(d))] for d in df]).reshape(G, 1)
    q95 = np.array([[t_quantile(0.95, int(d))] for d in df]).reshape(G, 1)
    inside = np.arange(n)[None, :] >= starts[:, None]
    out = []
    for y, log_scale in zip(ys, log_scales):
        yy = np.where(inside, y[None, :], 0.0)
        qty = np.einsum("wnk,wn->wk", q, yy)
        beta_s = np.linalg.solve(r, qty[..., None])[..., 0]
        resid = yy - np.einsum("wnk,wk->wn", Xs, beta_s)
        beta_s = beta_s + np.linalg.solve(r, np.einsum("wnk,wn->wk", q, resid)[..., None])[..., 0]
        beta = beta_s / norms
        resid = yy - np.einsum("wnk,wk->wn", X, beta)
        ssr = np.einsum("wn,wn->w", resid, resid)
        sigma2 = ssr / df
        m = np.einsum("whk,wk->wh", X_new, beta)
        se = np.sqrt(np.maximum(sigma2[:, None] * (1.0 + lev), 0.0))
        ends = (m - q80 * se, m + q80 * se, m - q95 * se, m + q95 * se)
        if log_scale:
            out.append(np.exp(np.stack((m + se * se / 2.0, m) + ends)))
        else:
            out.append(np.stack((m, m.copy()) + ends))
    return good, out


def _stacked_rows(spec, t, center, spread, season, rows) -> np.ndarray:
    """(windows, periods, k) design rows at positions ``t`` (one row of positions per window,
    or one shared): [1, u, (u^2)] on each window's own time scale, then the seasonal columns
    of ``season[rows]``."""
    u = (t - center[:, None]) / spread[:, None]
    p = 3 if spec.shape == "quadratic" else 2
    k = p + (season.shape[1] if season is not None else 0)
    X = np.empty(u.shape + (k,))
    X[..., 0] = 1.0
    X[..., 1] = u
    if p == 3:
        X[..., 2] = u * u
    if season is not None:
        X[..., p:] = season[rows][None] if isinstance(rows, slice) else season[rows]
    return X


def _what(start: int) -> str:
    return "the history" if start == 0 else f"the history from position {start + 1}"


def minimum_window(specs) -> int:
    """Shortest estimation window the evaluation fits: every spec's minimum number of points,
    two seasonal cycles when there are seasonal terms, and at least 8 periods (common
    practice). The rolling origin's first origin and the window average both use it."""
    specs = list(specs)
    s = max(sp.season_length for sp in specs)
    seasonal = any(sp.seasonality != "none" for sp in specs)
    return max(max(sp.minimum_points() for sp in specs), 2 * s if seasonal else 0, 8)


def window_spacing(first_origin: int, minimum_window: int, count: int = 10) -> int:
    """Periods between window starts: about ``count`` starts fit before the first origin, each
    leaving ``minimum_window`` periods; 0 when not even one window fits (all history only)."""
    room = first_origin - minimum_window
    if room <= 0:
        return 0
    return max(1, int(np.ceil(room / max(count - 1, 1))))


def window_rule_grid(spacing: int, last_origin: int, minimum_window: int) -> tuple[int, ...]:
    """Starts 0, g, 2g, ... up to ``last_origin - minimum_window`` (g = ``spacing``)."""
    if spacing <= 0:
        return (0,)
    return tuple(range(0, max(last_origin - minimum_window, 0) + 1, int(spacing)))


def window_rule(strategy: Strategy, spec: TrendSpec, n: int, window_count: int = 10,
                minimum: int | None = None, spacing: int | None = None) -> tuple[int, int]:
    """(minimum window, spacing) of a window average fitted on ``n`` periods.

    Explicit ``minimum``/``spacing`` come first, then those the strategy carries (``compare``
    stores the rolling origin's rule on its window-average candidates), then the default: the
    minimum window of all shapes with this seasonality (as ``compare`` computes it when every
    shape is tried) and a spacing that puts about ``window_count`` starts in the ``n`` periods.
    The starts are then the same grid, extended to the full sample, as the rolling origin
    scored: at an origin o the windows are the grid starts leaving at least the minimum."""
    if minimum is None:
        minimum = strategy.minimum_window
    if minimum is None:
        minimum = minimum_window(TrendSpec(sh, spec.seasonality, spec.season_length)
                                 for sh in SHAPES)
    if spacing is None:
        spacing = strategy.window_spacing
    if spacing is None:
        spacing = window_spacing(n, minimum, window_count)
    return int(minimum), int(spacing)


def strategy_forecast(series, strategy: Strategy, breaks, horizon: int, spec: TrendSpec,
                      window_count: int = 10, minimum_window: int | None = None,
                      window_spacing: int | None = None):
    """Fit ``strategy`` on all of ``series`` (breaks = first periods of new regimes) and return
    a dated ``Forecast`` of the next ``horizon`` periods in original units.

    A window average uses the rule of ``window_rule`` (the rolling origin's minimum window and
    grid spacing when the strategy came from ``compare``), so the forecast recommended is the
    one the rolling origin evaluated, refitted with the data since the last origin."""
    from .forecast import Forecast

    n = series.n
    minimum, spacing = window_rule(strategy, spec, n, window_count, minimum_window,
                                   window_spacing)
    fits = OriginFits(series.values, series.first_season(), spec.seasonality,
                      spec.season_length, breaks, window_rule_grid(spacing, n, minimum),
                      minimum_window=minimum)
    points = fits.forecast(strategy, horizon)
    starts = series.frequency.future(series.starts[-1], horizon)
    labels = tuple(series.frequency.label(s) for s in starts)
    singles = fits.single_starts(strategy)
    start = singles[0] if len(singles) == 1 else 0  # joint fits and averages use all history
    used = TrendSpec(strategy.last_shape or strategy.shape, spec.seasonality, spec.season_length)
    return Forecast(strategy.key + " (" + used.describe() + ")", used, starts, labels, points,
                    int(start))
