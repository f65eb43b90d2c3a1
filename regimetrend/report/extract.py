"""What the report reads from an ``Analysis``, gathered in one place as plain values.

The report never computes statistics: it reads the results of the stages before it. A stage
that is missing (a series too short for the rolling origin, say) drops the parts of the report
that need it, and the page says so, instead of failing.
"""

from __future__ import annotations

from dataclasses import dataclass, field, is_dataclass, replace
from typing import TYPE_CHECKING

import numpy as np

from ..series import Series

if TYPE_CHECKING:  # annotations only: the report computes nothing
    from ..analysis import Analysis
    from ..breaks.result import BreakSet
    from ..design import TrendSpec
    from ..evaluate.rolling import ErrorTable
    from ..forecast import Forecast
    from ..verdict import Verdict


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
    result: dict  # Analysis.to_dict(), the JSON of the report
    growth: dict | None  # GrowthTable.to_dict(), what the tables and sentences read
    breaks: tuple[BreakInfo, ...]
    breaks_dict: dict | None
    sup_f_p: float | None
    cusum: dict | None
    evaluation: dict | None  # Evaluation.to_dict()
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
    break_test: str = "sup-F test"  # the test behind ``sup_f_p`` (``breakinfo.test_name``)
    breaks_given: bool = False  # the break dates were given by the analyst, not searched for
    verdict: Verdict | None = None  # the chosen model and its sentences
    # the breaks the chosen model uses (``Verdict.breaks``; the search's without a verdict)
    # and the search's breaks it does not use (drawn only labelled as the search's)
    model_breaks: tuple[BreakInfo, ...] = ()
    unused_breaks: tuple[BreakInfo, ...] = ()
    # the change the diagnosis names when neither the model nor the chosen shape's search has it
    # (another shape's search dated it): drawn with the unused breaks, named in the caption
    cited_break: BreakInfo | None = None

    def label(self, position) -> str | None:
        return None if position is None else self.series.label(int(position))

    def iso(self, position) -> str | None:
        return None if position is None else self.series.iso(int(position))


def _breaks(breakset: BreakSet | None, series: Series) -> tuple[BreakInfo, ...]:
    if breakset is None:
        return ()
    out = [BreakInfo(b.position, b.label, b.date, None, None) if b.given  # no interval
           else BreakInfo(b.position, b.label, b.date, int(b.ci95[0]), int(b.ci95[1]))
           for b in breakset.breaks]
    return tuple(sorted(out, key=lambda b: b.position))


def _fitted(line, n: int, start: int = 0):
    """A fitted line over all ``n`` periods; a line fitted from ``start`` on (a truncated
    trend) is padded with NaN before it, so it is drawn only where it was fitted."""
    if line is None:
        return None
    arr = np.asarray(line, dtype=float)
    if arr.ndim == 1 and 0 < start and arr.size == n - start:
        return np.concatenate([np.full(start, np.nan), arr])
    return arr if arr.shape == (n,) else None


def _model_breaks(verdict, found: tuple[BreakInfo, ...]):
    """(the breaks the chosen model uses, the search's breaks it does not use): the verdict's
    break dates with their 95% intervals; every break found when there is no verdict."""
    if verdict is None:
        return found, ()
    given = {b.position for b in found if b.low is None}  # the analyst's dates: no interval
    used = tuple(BreakInfo(b.position, b.label, b.date, None, None) if b.position in given
                 else BreakInfo(b.position, b.label, b.date, int(b.ci95_positions[0]),
                                int(b.ci95_positions[1])) for b in verdict.breaks)
    at = {b.position for b in used}
    return used, tuple(b for b in found if b.position not in at)


def _cited_break(verdict, found) -> BreakInfo | None:
    """The break the diagnosis names as the change, when it is neither a break of the model
    nor one of the chosen shape's search (``found``): then another shape's search dated it."""
    b = verdict.diagnosis.cited_break if verdict is not None else None
    if b is None or b.position in {f.position for f in found} or \
            b.position in {m.position for m in verdict.breaks}:
        return None
    lo, hi = b.ci95_positions
    return BreakInfo(int(b.position), b.label, b.date, int(lo), int(hi))


def gather(analysis: Analysis, source_name: str | None = None,
           units: str | None = None) -> ReportData:
    """Read everything the report shows from ``analysis`` (its typed fields; a stage that is
    None, as in a hand-made stand-in, drops the parts that need it); ``units`` of the values,
    when the analyst names them (the series name otherwise)."""
    from ..evaluate import breakinfo  # the one reader of a BreakSet's sup-F p-value

    series = getattr(analysis, "series", None)
    if not isinstance(series, Series):
        raise TypeError("write_report needs an Analysis (with its series)")
    verdict = getattr(analysis, "verdict", None)
    if units and verdict is not None:  # the verdict's amounts in the analyst's units
        verdict = verdict.in_units(units)
        if is_dataclass(analysis):
            analysis = replace(analysis, verdict=verdict)
    breakset, evaluation, growth = analysis.breaks, analysis.evaluation, analysis.growth
    cusum = analysis.cusum if analysis.cusum and "path" in analysis.cusum else None
    found = _breaks(breakset, series)
    used, unused = _model_breaks(verdict, found)
    start = growth.regimes[0].start if growth is not None and growth.regimes else 0
    return ReportData(
        series=series, spec=analysis.spec, source_name=source_name or "",
        units=units or series.name,
        result=analysis.to_dict(), growth=growth.to_dict() if growth is not None else None,
        breaks=found,
        breaks_dict=breakset.to_dict() if breakset is not None else None,
        sup_f_p=breakinfo.supf_pvalue(breakset) if breakset is not None else None,
        cusum=cusum, evaluation=evaluation.to_dict() if evaluation is not None else None,
        errors=evaluation.errors if evaluation is not None else None,
        reference=evaluation.reference if evaluation is not None else None,
        recommended=evaluation.recommended.name if evaluation is not None else None,
        forecast=analysis.forecast, global_forecast=analysis.global_forecast,
        regime_fitted=_fitted(growth.fitted if growth is not None else None, series.n, start),
        global_fitted=_fitted(analysis.global_fitted, series.n),
        cautions=tuple(str(c) for c in analysis.cautions),
        regime_trend=_fitted(growth.trend if growth is not None else None, series.n, start),
        global_trend=_fitted(analysis.global_trend, series.n),
        break_test=breakinfo.test_name(breakset),
        breaks_given=bool(breakset is not None and breakset.given),
        verdict=verdict, model_breaks=used, unused_breaks=unused,
        cited_break=_cited_break(verdict, found))
