"""What the report reads from an ``Analysis``, gathered in one place as plain values.

The report never computes statistics: it reads the results of the stages before it. A stage
that is missing (a series too short for the rolling origin, say) drops the parts of the report
that need it, and the page says so, instead of failing.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np

from ..series import Series

if TYPE_CHECKING:  # annotations only: the report computes nothing
    from ..design import TrendSpec
    from ..evaluate.rolling import ErrorTable
    from ..forecast import Forecast
    from ..growth import GrowthTable


@dataclass(frozen=True)
class BreakInfo:
    position: int
    label: str
    date: str
    low: int | None  # 95% interval of the break date, positions
    high: int | None


@dataclass(frozen=True, eq=False)
class ReportData:
    series: Series
    spec: TrendSpec | None
    source_name: str
    units: str
    result: dict
    growth: dict | None
    growth_obj: GrowthTable | None
    breaks: tuple[BreakInfo, ...]
    breaks_dict: dict | None
    sup_f_p: float | None
    cusum: dict | None
    evaluation: dict | None
    evaluation_obj: object
    errors: ErrorTable | None
    reference: str | None
    recommended: str | None
    forecast: Forecast | None
    global_forecast: Forecast | None
    regime_fitted: np.ndarray | None
    global_fitted: np.ndarray | None
    cautions: tuple[str, ...] = field(default=())
    regime_trend: np.ndarray | None = None  # regime_fitted with seasonal terms at their average
    global_trend: np.ndarray | None = None  # global_fitted with seasonal terms at their average

    def label(self, position) -> str | None:
        return None if position is None else self.series.label(int(position))

    def iso(self, position) -> str | None:
        return None if position is None else self.series.iso(int(position))


def _get(obj, name, default=None):
    if obj is None:
        return default
    if isinstance(obj, dict):
        return obj.get(name, default)
    return getattr(obj, name, default)


def _to_dict(obj):
    if obj is None:
        return None
    if isinstance(obj, dict):
        return obj
    fn = getattr(obj, "to_dict", None)
    return fn() if callable(fn) else None


def _position(value, series: Series) -> int | None:
    """A break position from an int or a date string."""
    if value is None:
        return None
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, float) and math.isfinite(value):
        return int(round(value))
    try:
        d = np.datetime64(str(value), "D")
    except ValueError:
        return None
    return int(np.searchsorted(series.starts, d))


def _breaks(breakset, series: Series) -> tuple[BreakInfo, ...]:
    items = _get(breakset, "breaks") or ()
    out = []
    for b in items:
        pos = _position(_get(b, "position"), series)
        if pos is None:
            pos = _position(_get(b, "date"), series)
        if pos is None:
            continue
        ci = _get(b, "ci95")
        lo = hi = None
        if ci is not None and len(ci) == 2:
            lo, hi = _position(ci[0], series), _position(ci[1], series)
            if lo is not None:
                lo = max(0, min(lo, series.n - 1))
            if hi is not None:
                hi = max(0, min(hi, series.n - 1))
        out.append(BreakInfo(pos, series.label(pos), series.iso(pos), lo, hi))
    if not out:
        for p in _get(breakset, "positions") or ():
            out.append(BreakInfo(int(p), series.label(int(p)), series.iso(int(p)), None, None))
    return tuple(sorted(out, key=lambda b: b.position))


def _sup_f(breakset) -> float | None:
    from ..evaluate import breakinfo  # the one reader of a BreakSet's sup-F p-value

    return breakinfo.supf_pvalue(breakset)


def _cusum(analysis) -> dict | None:
    """The CUSUM path of the global trend with its band, as the analysis computed it."""
    d = _to_dict(_get(analysis, "cusum"))
    return d if isinstance(d, dict) and "path" in d else None


def _fitted(line, n: int):
    if line is None:
        return None
    arr = np.asarray(line, dtype=float)
    return arr if arr.shape == (n,) else None


def gather(analysis, source_name: str | None = None, units: str | None = None) -> ReportData:
    """Read everything the report shows from ``analysis``; ``units`` of the values, when the
    analyst names them (the series name otherwise)."""
    series = _get(analysis, "series")
    if not isinstance(series, Series):
        raise TypeError("write_report needs an Analysis (with its series)")
    spec = _get(analysis, "spec")
    growth_obj = _get(analysis, "growth")
    breakset = _get(analysis, "breaks")
    evaluation = _get(analysis, "evaluation")
    ev_dict = _to_dict(evaluation)
    rec = _get(_get(evaluation, "recommended"), "name")
    global_fitted = _fitted(_get(analysis, "global_fitted"), series.n)
    regime_fitted = _fitted(_get(growth_obj, "fitted"), series.n)
    cautions = tuple(str(c) for c in (_get(analysis, "cautions") or ()))
    return ReportData(
        series=series, spec=spec,
        source_name=source_name or _get(analysis, "source") or "",
        units=units or _get(analysis, "units") or series.name,
        result=_to_dict(analysis) or {}, growth=_to_dict(growth_obj), growth_obj=growth_obj,
        breaks=_breaks(breakset, series), breaks_dict=_to_dict(breakset),
        sup_f_p=_sup_f(breakset), cusum=_cusum(analysis),
        evaluation=ev_dict,
        evaluation_obj=evaluation, errors=_get(evaluation, "errors"),
        reference=_get(evaluation, "reference"), recommended=rec,
        forecast=_get(analysis, "forecast"), global_forecast=_get(analysis, "global_forecast"),
        regime_fitted=regime_fitted, global_fitted=global_fitted, cautions=cautions,
        regime_trend=_fitted(_get(growth_obj, "trend"), series.n),
        global_trend=_fitted(_get(analysis, "global_trend"), series.n))
