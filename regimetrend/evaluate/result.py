"""The frozen results of a comparison: candidates, recommendation, history decision, diagnosis."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from ..output import json_safe as json_clean  # noqa: F401  (re-exported)
from ..regimes import Strategy

if TYPE_CHECKING:
    from .rolling import ErrorTable

OPTIMISTIC_NOTE = ("optimistic: the breaks were found once on the full sample and reused at "
                   "every origin, so the regime-aware candidates were told where the breaks are")


@dataclass(frozen=True)
class CandidateResult:
    """One candidate's rolling-origin record."""

    strategy: Strategy
    seasonality: str
    metrics: dict
    per_horizon: tuple
    vs_global: dict     # pooled DM test against the reference, plus per-horizon tests
    gain: float | None  # 1 - RMSE / RMSE of the reference (positive = better than global)
    rank: int
    sweep_only: bool = False

    @property
    def name(self) -> str:
        return self.strategy.key

    def to_dict(self) -> dict:
        return {"name": self.name, "strategy": self.strategy.name, "shape": self.strategy.shape,
                "last_shape": self.strategy.last_shape,
                "start": (self.strategy.start_label if self.strategy.start is not None
                          else (_break_word(self.strategy.from_break)
                                if self.strategy.kind.from_breaks else None)),
                "description": self.strategy.describe(),
                "seasonality": self.seasonality, "rank": self.rank,
                "metrics": dict(self.metrics), "per_horizon": [dict(m) for m in self.per_horizon],
                "gain_over_global": self.gain, "vs_global": dict(self.vs_global)}


def _break_word(k: int) -> str:
    return "last break" if k == 1 else f"break {k} before the end"


@dataclass(frozen=True)
class Recommendation:
    strategy: str
    shape: str
    name: str
    reason: str
    rule: str
    basis: str  # "accuracy test", "large gain with a significant break", or "global kept"

    def to_dict(self) -> dict:
        return {"strategy": self.strategy, "shape": self.shape, "name": self.name,
                "reason": self.reason, "basis": self.basis, "rule": self.rule}


@dataclass(frozen=True)
class HistoryDecision:
    keep_from: str | None        # ISO date of the first period to keep; None = all history
    keep_from_label: str | None
    sentence: str
    evidence: dict

    def to_dict(self) -> dict:
        return {"keep_from": self.keep_from, "keep_from_label": self.keep_from_label,
                "sentence": self.sentence, "evidence": self.evidence}


@dataclass(frozen=True)
class Diagnosis:
    sentence: str
    data: dict

    def to_dict(self) -> dict:
        return dict(self.data, sentence=self.sentence)


@dataclass(frozen=True, eq=False)
class Evaluation:
    """Everything ``compare`` found; ``to_dict()`` is the JSON of ``regimetrend compare``."""

    series: dict
    model: dict
    plan: dict
    optimistic: bool
    reference: str
    candidates: tuple       # CandidateResult, ranked by RMSE (best first)
    sweep: tuple            # CandidateResult of the history sweep (truncated from fixed starts)
    recommended: Recommendation
    history: HistoryDecision
    diagnosis: Diagnosis
    breaks: dict | None     # full-sample break search (BreakSet.to_dict())
    breaks_by_origin: tuple
    errors: ErrorTable      # every forecast of the rolling origin
    cautions: tuple
    same_as: dict | None = None  # candidates left out of the ranking: name -> identical candidate

    def candidate(self, name: str) -> CandidateResult:
        for c in self.candidates + self.sweep:
            if c.name == name:
                return c
        raise KeyError(name)

    def summary(self, series=None) -> str:
        """Plain text: the ranking, the recommendation and its rule, accuracy by horizon, the
        history decision, the diagnosis and the cautions (``series`` gives period labels)."""
        from ..plaintext import evaluation_text

        return evaluation_text(self, series)

    def to_dict(self) -> dict:
        return json_clean({"series": self.series, "model": self.model, "rolling_origin": self.plan,
                "optimistic": self.optimistic,
                "optimistic_note": OPTIMISTIC_NOTE if self.optimistic else None,
                "reference": self.reference,
                "candidates": [c.to_dict() for c in self.candidates],
                "history_sweep": [c.to_dict() for c in self.sweep],
                "recommended": self.recommended.to_dict(), "history": self.history.to_dict(),
                "diagnosis": self.diagnosis.to_dict(), "breaks": self.breaks,
                "breaks_by_origin": [list(b) for b in self.breaks_by_origin],
                "identical_candidates": dict(self.same_as or {}),
                "cautions": list(self.cautions)})
