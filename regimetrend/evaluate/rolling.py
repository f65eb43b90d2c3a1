"""Rolling-origin runs (Tashman, 2000): expanding window, origins ``step`` periods apart.

An origin ``o`` is the number of periods known: every candidate is fitted on positions
``0..o-1`` and forecasts ``o..o+H-1``. The last origin is ``n - H`` so that every origin is scored
on all H horizons (a single train/holdout split is the one-origin case ``first_origin = n - H``).

Default first origin: the later of half the series and ``n - H - (K - 1) * step`` with
K = max(24, 2H) origins at most (placed where the recent regimes are), and never before the
shortest history every shape can be fitted on. Then, so that the evaluation can see the latest
change: when a full-sample break b is given with its shortest regime h (the break search's
trimming), the first origin moves later until at least half of the origins know h periods
after b (origin o >= b + h), as long as at least ``MIN_ORIGINS_AFTER`` origins can; where the
series does not allow it (the break is too recent), the plan says why in ``placement``.

Default horizon (``default_horizon``): a planning span per calendar (4 years, 4 quarters, 12
months, 13 weeks, 14 days; common practice), shortened on short series so that the rolling
origin keeps at least two origins per horizon step (O >= 2H, so the pooled Diebold-Mariano
test, which keeps H - 1 autocovariances, has enough origins).

Breaks are found again at every origin from the history up to it only (leak-free) through the
``breaks_at`` callable the caller passes in.
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError, about, option
from ..design import seasonal_columns
from ..metrics import naive_scale
from ..regimes import OriginFits, Strategy

MAX_DEFAULT_ORIGINS = 24
MIN_ORIGINS_AFTER = 3  # origins that must know a shortest regime after the break to move
BASE_HORIZON = {"year": 4, "quarter": 4, "month": 12, "week": 13, "day": 14}


def default_horizon(n: int, unit: str, step: int = 1) -> int:
    """Default forecast horizon for ``n`` periods of a ``unit`` calendar (module docstring):
    the calendar's planning span, at most (n // 2 + 1) // 3 so that O >= 2H origins remain."""
    base = BASE_HORIZON.get(unit, 4) if step == 1 else 4
    return int(max(1, min(base, (n // 2 + 1) // 3)))
FIELDS = ("forecast", "lower80", "upper80", "lower95", "upper95")


@dataclass(frozen=True)
class OriginPlan:
    """Where the rolling origin starts, how far it moves each time and how far it forecasts."""

    first: int
    step: int
    horizon: int
    origins: tuple[int, ...]
    placement: str = "default"  # how the first origin was placed, in words

    def to_dict(self, series=None) -> dict:
        out = {"first_origin": self.first, "step": self.step, "horizon": self.horizon,
               "count": len(self.origins), "origins": list(self.origins),
               "placement": self.placement}
        if series is not None:
            out["first_origin_date"] = series.iso(self.first - 1)
            out["last_origin_date"] = series.iso(self.origins[-1] - 1)
            out["meaning"] = ("an origin is the last period known when the forecast is made; "
                              "the fit uses that period and all before it")
        return out


def plan_origins(n: int, horizon: int, minimum: int, first_origin: int | None = None,
                 step: int = 1, latest_break: int | None = None,
                 shortest: int | None = None, label=str) -> OriginPlan:
    """Origins ``first, first + step, ... <= n - horizon`` (see the module docstring).

    ``latest_break`` and ``shortest`` (the latest full-sample break and the shortest regime of
    the break search) move a default first origin later so that half of the origins know a
    shortest regime after the break; ``label(position)`` names periods in ``placement``."""
    if horizon < 1:
        raise InputError(f"{about('horizon')}: must be at least 1 period")
    if step < 1:
        raise InputError(f"{about('step')}: must be at least 1 period")
    last = n - horizon
    placement = "given" if first_origin is not None else "default"
    if first_origin is None:
        most = max(MAX_DEFAULT_ORIGINS, 2 * horizon)
        first_origin = max(int(math.ceil(n / 2)), last - (most - 1) * step, minimum)
        if latest_break is not None and shortest:
            first_origin, placement = _after_break(first_origin, last, step, int(latest_break),
                                                   int(shortest), horizon, label)
    if first_origin < minimum:
        raise InputError(f"{about('first_origin')}: {first_origin} periods are too few to fit every "
                         f"candidate; use at least {minimum}")
    if first_origin > last:
        raise InputError(f"{about('horizon')} and {option('first_origin')}: a first origin of {first_origin} "
                         f"periods with a horizon of {horizon} needs at least "
                         f"{first_origin + horizon} periods; the series has {n}")
    return OriginPlan(first_origin, step, horizon, tuple(range(first_origin, last + 1, step)),
                      placement)


def _after_break(first: int, last: int, step: int, b: int, h: int, horizon: int, label):
    """(first origin, placement words) so that half of the origins know ``h`` periods after
    the break at ``b`` (module docstring)."""
    need = b + h  # an origin o knows a shortest regime after b when o >= need
    origins = range(first, last + 1, step)
    after = sum(1 for o in origins if o >= need)
    if 2 * after >= len(origins):
        return first, (f"default; {after} of {len(origins)} origins know at least {h} periods "
                       f"after the latest break ({label(b)})")
    can = (last - need) // step + 1 if need <= last else 0
    if can < MIN_ORIGINS_AFTER:
        return first, (f"default; the latest break ({label(b)}) is too recent for the rolling "
                       f"origin to judge: an origin needs {h} periods after it (the shortest "
                       f"regime) and {horizon} more to score, so only {max(can, 0)} of "
                       f"{len(origins)} origins know a regime after it")
    moved = max(first, last - 2 * (can - 1) * step)
    total = (last - moved) // step + 1
    return moved, (f"moved later so that {can} of {total} origins know at least {h} periods "
                   f"after the latest break ({label(b)})")


@dataclass(frozen=True, eq=False)
class ErrorTable:
    """Every rolling-origin forecast: arrays shaped (candidates, origins, horizons)."""

    names: tuple[str, ...]
    origins: np.ndarray        # (O,) periods known at each origin
    targets: np.ndarray        # (O, H) positions forecast
    actual: np.ndarray         # (O, H)
    scale: np.ndarray          # (O,) in-sample seasonal-naive MAE at each origin (for MASE)
    forecast: np.ndarray       # (C, O, H) point forecast (the mean)
    lower80: np.ndarray
    upper80: np.ndarray
    lower95: np.ndarray
    upper95: np.ndarray
    breaks_used: tuple = ()    # (O,) break positions known at each origin
    in_sample: tuple = ()      # (C,) the candidate starts at a full-sample break date

    def index(self, name: str) -> int:
        return self.names.index(name)

    def errors(self, name: str) -> np.ndarray:
        """(O, H) actual minus forecast."""
        return self.actual - self.forecast[self.index(name)]

    def to_csv(self, series, optimistic: bool = False) -> str:
        """One row per forecast: candidate, origin (last period known), horizon, date, actual,
        forecast (mean), interval ends, the naive scale used for MASE, the breaks known at the
        origin and whether the row is optimistic: the breaks were reused from the full sample
        (``optimistic``) or the candidate starts at a full-sample break date; full
        precision."""
        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        w.writerow(["candidate", "origin", "horizon", "date", "actual", "forecast", "lower80",
                    "upper80", "lower95", "upper95", "naive_scale", "breaks_known", "optimistic"])
        known = [";".join(series.label(b) for b in bs) for bs in self.breaks_used] or \
            [""] * len(self.origins)
        origin_dates = [series.iso(int(o) - 1) for o in self.origins]
        target_dates = {int(p): series.iso(int(p)) for p in np.unique(self.targets)}
        for c, name in enumerate(self.names):
            flagged = optimistic or (c < len(self.in_sample) and bool(self.in_sample[c]))
            tag = "yes" if flagged else "no"
            for i in range(len(self.origins)):
                for j in range(self.targets.shape[1]):
                    w.writerow([name, origin_dates[i], j + 1, target_dates[int(self.targets[i, j])],
                                repr(float(self.actual[i, j])),
                                repr(float(self.forecast[c, i, j])),
                                repr(float(self.lower80[c, i, j])),
                                repr(float(self.upper80[c, i, j])),
                                repr(float(self.lower95[c, i, j])),
                                repr(float(self.upper95[c, i, j])),
                                repr(float(self.scale[i])), known[i], tag])
        return buf.getvalue()


def run_rolling(series, strategies: list[Strategy], plan: OriginPlan, seasonality: str,
                season_length: int, breaks_at, window_starts=(), progress=None,
                minimum_window: int = 0, copied=None):
    """Fit and forecast every strategy at every origin.

    ``breaks_at(o)`` returns the break positions known at origin ``o``; the window average at
    ``o`` averages the ``window_starts`` leaving at least ``minimum_window`` periods.
    ``copied`` = {strategy index: (ErrorTable, row)}: rows taken from another table on the same
    origins instead of fitted (forecasts that use no breaks, as an earlier evaluation made
    them). Returns the ``ErrorTable`` and the breaks used at each origin."""
    values = series.values
    first_season = series.first_season()
    O, H, C = len(plan.origins), plan.horizon, len(strategies)
    copied = copied or {}
    fitted = [(c, st) for c, st in enumerate(strategies) if c not in copied]
    out = {f: np.empty((C, O, H)) for f in FIELDS}
    for c, (other, row) in copied.items():
        if not np.array_equal(other.origins, plan.origins) or other.targets.shape[1] != H:
            raise ValueError("copied rows must come from a table on the same origins")
        for f in FIELDS:
            out[f][c] = getattr(other, f)[row]
    scale = np.empty(O)
    used = []
    block = (seasonal_columns(np.arange(series.n + H), first_season, season_length)
             if seasonality == "dummies" else None)
    for i, o in enumerate(plan.origins):
        known = breaks_at(o)
        used.append(tuple(int(b) for b in known))
        fits = OriginFits(values[:o], first_season, seasonality, season_length, known,
                          window_starts, block, minimum_window)
        scale[i] = naive_scale(values[:o], season_length)
        fits.prefit([st for _, st in fitted], H)
        for c, strategy in fitted:
            p = fits.forecast(strategy, H)
            out["forecast"][c, i] = p.mean
            out["lower80"][c, i] = p.lower80
            out["upper80"][c, i] = p.upper80
            out["lower95"][c, i] = p.lower95
            out["upper95"][c, i] = p.upper95
        if progress is not None:
            progress(i + 1, O)
    origins = np.asarray(plan.origins)
    targets = origins[:, None] + np.arange(H)[None, :]
    arrays = dict(out, origins=origins, targets=targets, actual=values[targets], scale=scale)
    for a in arrays.values():
        a.setflags(write=False)  # the record of what was forecast is not to be edited
    table = ErrorTable(tuple(s.key for s in strategies), breaks_used=tuple(used),
                       in_sample=tuple(bool(s.in_sample_start) for s in strategies), **arrays)
    return table, tuple(used)
