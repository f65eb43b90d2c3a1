"""What a break search returns: the breaks, the regimes between them, the tests and the drift.

Positions are 0-based period indices. A break at position b is the first period of a new
regime; regime j covers positions ``start .. end`` (both inclusive) in ``segments``. Every result
is a frozen dataclass with ``to_dict()`` giving plain JSON values (NaN and infinities -> None).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from ..design import TrendSpec


def _num(v):
    """A JSON-safe number: float or None."""
    if v is None:
        return None
    v = float(v)
    return v if math.isfinite(v) else None


@dataclass(frozen=True)
class Break:
    """One break: where the new regime starts, how sure we are, and how the trend changed."""

    position: int
    date: str  # ISO date of the first period of the new regime
    label: str  # that period in the series' own notation
    ci90: tuple[int, int]  # first and last admissible position
    ci95: tuple[int, int]
    ci90_dates: tuple[str, str]
    ci95_dates: tuple[str, str]
    interval_method: str
    jump: float  # level change of the trend at the break, original units
    jump_model: float  # the same on the model scale (log points for the exponential shape)
    slope_change: float  # change of the trend's slope per period at the break, model scale
    slope_change_pct: float | None  # exponential: change of growth, percentage points/period
    curvature_change: float | None  # quadratic: change of the t^2 coefficient per period^2
    f_statistic: float  # partial F of this break given the others (F scale)
    # a date the analyst gave (``breaks.given``): no date interval applies (ci90 and ci95 are
    # the date itself, for the stages that read them; JSON and text show none), and the
    # partial F has an F-law ``p_value`` because the date was not searched for
    given: bool = False
    p_value: float | None = None

    def to_dict(self) -> dict:
        out = {"position": int(self.position), "date": self.date, "label": self.label,
               "date_given": bool(self.given)}
        if self.given:
            out.update({"ci90": None, "ci95": None, "ci90_positions": None,
                        "ci95_positions": None})
        else:
            out.update({"ci90": list(self.ci90_dates), "ci95": list(self.ci95_dates),
                        "ci90_positions": [int(v) for v in self.ci90],
                        "ci95_positions": [int(v) for v in self.ci95]})
        return {**out,
                "interval_method": self.interval_method,
                "jump": _num(self.jump), "jump_model_scale": _num(self.jump_model),
                "slope_change": _num(self.slope_change),
                "slope_change_pct": _num(self.slope_change_pct),
                "curvature_change": _num(self.curvature_change),
                "f_statistic": _num(self.f_statistic), "p_value": _num(self.p_value)}


@dataclass(frozen=True)
class Segment:
    """One regime and its fitted trend in readable per-period units."""

    start: int  # first position
    end: int  # last position (inclusive)
    n: int
    start_date: str
    end_date: str
    start_label: str
    end_label: str
    level: float  # trend at the regime's first period, original units (median for exponential)
    slope: float  # per period at the regime's first period, model scale
    growth_pct: float | None  # exponential: growth in % per period
    curvature: float | None  # quadratic: coefficient of (periods since start)^2

    def to_dict(self) -> dict:
        return {"start": self.start_date, "end": self.end_date,
                "start_label": self.start_label, "end_label": self.end_label,
                "start_position": int(self.start), "end_position": int(self.end),
                "n": int(self.n), "level": _num(self.level), "slope": _num(self.slope),
                "growth_pct": _num(self.growth_pct), "curvature": _num(self.curvature)}


@dataclass(frozen=True)
class SupFTest:
    """sup-F of no break against one (Andrews, 1993), with its asymptotic p-value."""

    statistic: float
    p_value: float | None
    critical95: float | None
    model: str
    trim_share: float

    def to_dict(self) -> dict:
        return {"statistic": _num(self.statistic), "p_value": _num(self.p_value),
                "critical_95": _num(self.critical95), "model": self.model,
                "trim_share": float(self.trim_share)}


@dataclass(frozen=True)
class SequentialStep:
    """sup-F(l+1 | l) (Bai and Perron, 1998): is there one more break than l?"""

    breaks_before: int
    statistic: float
    p_value: float | None
    position: int | None  # where the extra break would go

    def to_dict(self) -> dict:
        return {"breaks_before": int(self.breaks_before), "statistic": _num(self.statistic),
                "p_value": _num(self.p_value),
                "position": None if self.position is None else int(self.position)}


@dataclass(frozen=True)
class EventTest:
    """Chow (1960) test of a break at exactly a date the analyst named."""

    event: str
    position: int
    date: str
    label: str
    statistic: float | None
    p_value: float | None
    df1: int
    df2: int

    def to_dict(self) -> dict:
        return {"event": self.event, "position": int(self.position), "date": self.date,
                "label": self.label, "statistic": _num(self.statistic),
                "p_value": _num(self.p_value), "df1": int(self.df1), "df2": int(self.df2)}


@dataclass(frozen=True)
class CusumSummary:
    method: str
    statistic: float
    p_value: float | None
    first_crossing: int | None

    def to_dict(self) -> dict:
        return {"method": self.method, "statistic": _num(self.statistic),
                "p_value": _num(self.p_value),
                "first_crossing": None if self.first_crossing is None
                else int(self.first_crossing)}


@dataclass(frozen=True)
class JointTest:
    """F test of all the analyst's break dates together against no break (the dates are
    given, not searched for, so the F law applies; scaled like the other tests)."""

    statistic: float
    p_value: float | None
    df1: int
    df2: int

    def to_dict(self) -> dict:
        return {"statistic": _num(self.statistic), "p_value": _num(self.p_value),
                "df1": int(self.df1), "df2": int(self.df2)}


@dataclass(frozen=True)
class BreakTests:
    supf: SupFTest
    sequential: tuple[SequentialStep, ...]
    chow: tuple[EventTest, ...]
    cusum: tuple[CusumSummary, ...]
    joint: JointTest | None = None  # breaks at the analyst's dates: their joint F test

    def to_dict(self) -> dict:
        return {"supf": self.supf.to_dict(),
                "joint": self.joint.to_dict() if self.joint is not None else None,
                "sequential": [s.to_dict() for s in self.sequential],
                "chow": [c.to_dict() for c in self.chow],
                "cusum": [c.to_dict() for c in self.cusum]}


@dataclass(frozen=True)
class Drift:
    """Where the single global trend first left its 5% CUSUM band."""

    position: int
    date: str
    label: str
    method: str

    @property
    def first_crossing(self) -> int:
        return self.position

    def to_dict(self) -> dict:
        return {"position": int(self.position), "date": self.date, "label": self.label,
                "method": self.method}


@dataclass(frozen=True, eq=False)
class BreakSet:
    """The breaks found in a series' trend, with the evidence for them."""

    spec: TrendSpec
    n: int
    kind: str  # chosen kind: level, slope or both
    kind_requested: str
    criterion: str
    criterion_path: tuple[float, ...]  # chosen kind, m = 0..M
    criterion_paths: dict = field(default_factory=dict)  # kind -> path (all kinds searched)
    ssr_path: tuple[float, ...] = ()
    trim_periods: int = 0
    trim_share: float = 0.0
    breaks: tuple[Break, ...] = ()
    tests: BreakTests | None = None
    drift: Drift | None = None
    segments: tuple[Segment, ...] = ()
    positions: tuple[int, ...] = ()
    method: str = ""
    exact: bool = True  # the chosen break set is a proven global optimum
    iterations: int = 1  # partial-structure rounds (kind ``both`` with shared seasonal terms)
    seasonal_by_regime: bool = False
    notes: tuple[str, ...] = ()
    max_breaks: int = 0  # most breaks searched (the default cap resolved; see detect_breaks)
    given: bool = False  # the dates were given by the analyst, not searched for
    wandering: Any = None  # ``wandering.Wandering``: random-walk-like residuals (qualifies breaks)

    @property
    def source(self) -> str:
        """Where the dates come from, in words."""
        return "given by the analyst" if self.given else "found by the search"

    @property
    def is_wandering(self) -> bool:
        """The residuals of the chosen model wander like a random walk (``breaks/wandering``)."""
        return bool(self.wandering is not None and self.wandering.wandering)

    @property
    def n_breaks(self) -> int:
        return len(self.positions)

    @property
    def last_regime_start(self) -> int:
        """First position of the regime that holds at the end of the series (0 if no break)."""
        return self.positions[-1] if self.positions else 0

    def bounds(self) -> tuple[tuple[int, int], ...]:
        """Regimes as (first, one-past-last) position pairs: cheap, for the regime strategies."""
        cuts = (0, *self.positions, self.n)
        return tuple(zip(cuts[:-1], cuts[1:]))

    def summary(self, series=None, growth=None) -> str:
        """Plain text: breaks with intervals, tests, regimes (with ``growth``, a GrowthTable,
        when given), notes; ``series`` gives labels in its own notation (see ``plaintext``)."""
        from ..plaintext import breaks_text

        return breaks_text(self, series, growth)

    def to_dict(self) -> dict:
        return {"spec": self.spec.to_dict(), "n": int(self.n), "kind": self.kind,
                "kind_requested": self.kind_requested, "criterion": self.criterion,
                "criterion_path": {str(m): _num(v) for m, v in enumerate(self.criterion_path)},
                "criterion_paths": {k: {str(m): _num(v) for m, v in enumerate(path)}
                                    for k, path in self.criterion_paths.items()},
                "ssr_path": {str(m): _num(v) for m, v in enumerate(self.ssr_path)},
                "trim": {"periods": int(self.trim_periods), "share": float(self.trim_share)},
                "n_breaks": self.n_breaks,
                "positions": [int(p) for p in self.positions],
                "breaks": [b.to_dict() for b in self.breaks],
                "tests": self.tests.to_dict() if self.tests is not None else None,
                "drift": self.drift.to_dict() if self.drift is not None else None,
                "segments": [s.to_dict() for s in self.segments],
                "method": self.method, "exact": bool(self.exact),
                "iterations": int(self.iterations),
                "seasonal_by_regime": bool(self.seasonal_by_regime),
                "max_breaks": int(self.max_breaks), "dates_given": bool(self.given),
                "dates_source": self.source, "notes": list(self.notes),
                "wandering": self.wandering.to_dict() if self.wandering is not None else None}
