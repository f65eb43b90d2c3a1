"""The verdict's fields: what was chosen and what is said about it, as plain records.

Every sentence of the verdict is generated from these fields (``sentences.py``), and
``Verdict.to_dict()`` is report.json's ``verdict``. The thresholds the stages share live here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from ..breaks.result import BreakSet
    from ..evaluate.result import Evaluation

SWEEP_NOTE = 0.30  # a sweep gain this large that the verdict declines is explained
COVERAGE_FLOOR = 0.80  # rolling 95% intervals covering less than this are flagged
CURVE_LAG1 = 0.50  # a trend of the right shape leaves residuals less correlated than this
CAUSES = ("regime change", "wrong shape", "wandering", "outlier", "noise")
BREAK_FREE = ("global", "window-average")


@dataclass(frozen=True)
class Run:
    """One rolling-origin evaluation and the full-sample break search of its shape."""

    shape: str
    breaks: BreakSet
    evaluation: Evaluation


@dataclass(frozen=True)
class Model:
    """The chosen candidate: shape, seasonality, strategy, and where its breaks come from."""

    shape: str
    seasonality: str
    strategy: str
    name: str  # the candidate's key in the evaluation
    search_shape: str  # the shape of the break search whose breaks the model uses
    start: int | None = None  # truncated: fixed start position
    from_break: int = 1

    def to_dict(self) -> dict:
        return {"shape": self.shape, "seasonality": self.seasonality, "strategy": self.strategy}


@dataclass(frozen=True)
class Evidence:
    """Why the model was chosen: its rolling-origin record against one trend over all history
    of the reference shape (the first evaluation's reference)."""

    reference: str
    rmse: float
    reference_rmse: float
    gain: float | None
    p_better: float | None  # one-sided Diebold-Mariano: chosen more accurate than reference
    break_p: float | None  # sup-F of the chosen shape's break search (given dates: their F test)
    basis: str  # "accuracy test", "large gain with a significant break", "wandering series
    #            with a large gain", "global kept", and "; fewer breaks kept" / "; evidence"
    coverage95: float | None
    coverage80: float | None
    origins: int
    runner_up: tuple = ()  # ((name, rmse, gain), ...) the best candidates not chosen
    break_test: str = "sup-F test"  # the name of the test behind ``break_p``
    breaks_given: bool = False  # the break dates were given by the analyst, not searched for


@dataclass(frozen=True)
class BreakDate:
    """A break the model uses, as a date and its 95% interval; a date the analyst gave has no
    interval (``ci95`` and ``ci95_labels`` are None; ``ci95_positions`` is the date itself, for
    the comparisons that read it) and carries its partial F test's p-value instead."""

    position: int
    date: str
    label: str
    ci95: tuple[str, str] | None
    ci95_labels: tuple[str, str] | None
    ci95_positions: tuple[int, int]
    given: bool = False  # given by the analyst (``--breaks``), not found by a search
    p_value: float | None = None  # given dates: the partial F test at the date, F law

    def to_dict(self) -> dict:
        return {"date": self.date, "ci95": list(self.ci95) if self.ci95 else None}


@dataclass(frozen=True)
class History:
    """How much history to keep, why, and what the history sweep found."""

    keep_from: str | None  # ISO date, None = all history
    keep_from_label: str | None
    why: str  # what in the model fixes the start, in words
    sweep_best_label: str | None
    sweep_best_gain: float | None
    declined: str | None  # why a sweep gain of SWEEP_NOTE or more is not followed
    sweep_shape: str = "linear"  # the shape of the trends the sweep fitted


@dataclass(frozen=True)
class GrowthNow:
    """The last regime's growth under the chosen model, in % a year and in units a year."""

    annualised_pct: float | None
    ci95: tuple
    per_year_units: float | None
    per_year_units_ci95: tuple
    shape: str
    strategy: str
    since_label: str | None  # first period of the regime the figures describe; None = all
    base: str  # what "% a year" means, in words
    shared: bool  # level-only breaks: one growth rate for all regimes
    regimes: int

    def to_dict(self) -> dict:
        return {"annualised_pct": finite(self.annualised_pct),
                "ci95": [finite(v) for v in self.ci95],
                "per_year_units": finite(self.per_year_units),
                "model": {"shape": self.shape, "strategy": self.strategy}}


@dataclass(frozen=True)
class ForecastNow:
    """The chosen model's forecast as the verdict states it: the first and last periods' means
    and the last period's 95% range, in the series' units."""

    first_label: str
    first_mean: float
    last_label: str
    last_mean: float
    last_lower95: float
    last_upper95: float
    periods: int

    @classmethod
    def of(cls, forecast) -> ForecastNow:
        rows = forecast.rows()
        first, last = rows[0], rows[-1]
        return cls(first["label"], first["mean"], last["label"], last["mean"],
                   last["lower95"], last["upper95"], len(rows))


@dataclass(frozen=True)
class Diagnosis:
    """The cause (one of ``CAUSES``) of the reference trend's late failure, in one sentence.

    ``evidence`` holds the figures the sentence cites; ``cited_break`` is the break a regime
    change names, whether the chosen model forecasts from it or not (the portfolio's triage and
    the report's chart show that same date)."""

    cause: str
    sentence: str
    evidence: dict = field(default_factory=dict)
    cited_break: BreakDate | None = None

    def to_dict(self) -> dict:
        return {"cause": self.cause, "sentence": self.sentence}


@dataclass(frozen=True)
class Stability:
    """Whether the verdict holds without the last few periods."""

    status: str  # "stable", "changed" or "not checked"
    periods_checked: int  # the verdict was rerun without the last 1..this many periods
    changed_when_added: int | None  # smallest k whose rerun differs
    sentence: str
    reruns: tuple = ()  # ({"without_last", "model", "breaks"}, ...)

    def to_dict(self) -> dict:
        return {"status": self.status, "periods_checked": self.periods_checked,
                "changed_when_added": self.changed_when_added, "sentence": self.sentence,
                "reruns": [dict(r) for r in self.reruns]}


@dataclass(frozen=True)
class Verdict:
    """The one model and everything said about it; ``to_dict()`` is report.json's ``verdict``."""

    series_name: str
    frequency: str
    model: Model
    evidence: Evidence
    breaks: tuple[BreakDate, ...]
    search_breaks: int  # breaks found by the chosen shape's search (used or not)
    history: History
    growth_now: GrowthNow | None
    forecast_shape: str
    forecast_strategy: str
    forecast_now: ForecastNow
    diagnosis: Diagnosis
    stability: Stability
    origin_note: str | None
    sentences: tuple[str, ...]
    rule: str  # the written rule that chose the model (``choose.RULE``)
    found_breaks: tuple[BreakDate, ...] = ()  # every break of the chosen shape's search
    #                                          (or every date the analyst gave), used or not
    units: str = ""  # the analyst's units of the values (``--units``); "" = not given

    def in_units(self, units: str | None) -> Verdict:
        """The verdict with every amount in its sentences followed by ``units`` (the
        analyst's ``--units``); the fields' numbers are unchanged."""
        from .sentences import with_sentences

        return with_sentences(replace(self, units=(units or "").strip()))

    def to_dict(self) -> dict:
        return {"model": self.model.to_dict(),
                "breaks": [b.to_dict() for b in self.breaks],
                "keep_history_from": self.history.keep_from,
                "growth_now": self.growth_now.to_dict() if self.growth_now else None,
                "forecast_model": {"shape": self.forecast_shape,
                                   "strategy": self.forecast_strategy},
                "diagnosis": self.diagnosis.to_dict(),
                "stability": self.stability.to_dict(),
                "sentences": list(self.sentences)}


def finite(x) -> float | None:
    """``x`` as a float for JSON, or None when it is missing or not finite."""
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None
