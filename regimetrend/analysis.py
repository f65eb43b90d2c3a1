"""``analyze``: the whole flow for one series, as one pure function.

intake (done by the caller) -> breaks -> regimes and evaluation -> growth -> the forecast from
the recommended strategy. No printing, no global state, no files: the same series and settings
give the same ``Analysis`` bit for bit, and it pickles, so a portfolio runner can map it over
many series in other processes.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import cautions
from .breaks.result import BreakSet
from .design import TrendSpec
from .evaluate.result import Evaluation
from .forecast import Forecast, fit_history, trend_forecast
from .growth import GrowthTable
from .series import Series
from .settings import Settings


@dataclass(frozen=True, eq=False)
class Analysis:
    """Everything the analyst reads, from breaks to the forecast that goes into the plan."""

    series: Series
    settings: Settings
    spec: TrendSpec
    breaks: BreakSet  # on the full sample
    evaluation: Evaluation  # rolling origin, recommendation, history, diagnosis
    growth: GrowthTable  # by regime
    forecast: Forecast  # from the recommended strategy, refitted on all history
    global_forecast: Forecast  # the single global trend, for comparison
    global_fitted: np.ndarray  # in-sample fit of the global trend (original units)
    cusum: dict  # CUSUM path of the global trend with its 5% band (breaks.cusum)
    cautions: tuple[str, ...]  # standing ones first (see regimetrend.cautions)
    global_trend: np.ndarray | None = None  # global_fitted with seasonal terms at their average

    def summary(self) -> str:
        """Plain text of the whole analysis: breaks and growth by regime, the recommendation,
        history and diagnosis, the forecast with intervals, the cautions."""
        from .plaintext import analysis_text

        return analysis_text(self)

    def to_dict(self) -> dict:
        from .output import json_safe

        breaks = self.breaks.to_dict()
        growth = self.growth.to_dict()
        return json_safe({
            "series": self.series.to_dict(),
            "settings": self.settings.to_dict(),
            "model": self.spec.to_dict(),
            "breaks": breaks,
            "evaluation": self.evaluation.to_dict(),
            "growth": growth,
            "forecast": self.forecast.to_dict(),
            "global_forecast": self.global_forecast.to_dict(),
            "cusum": self.cusum,
            "cautions": list(self.cautions),
        })


def _blas_held(fn):
    """Run ``fn`` with BLAS held to one thread. The analysis is thousands of tiny least-squares
    problems, which BLAS threads only slow down (the demo: 3.5 s of CPU with threads free,
    2.0 s held; ``benchmarks/bench_portfolio.py``)."""
    import functools

    @functools.wraps(fn)
    def run(*args, **kwargs):
        from .breaks.detect import _one_blas_thread

        with _one_blas_thread():
            return fn(*args, **kwargs)
    return run


@_blas_held
def analyze(series, settings: Settings | None = None, *, progress=None,
            **choices) -> Analysis:
    """Run the whole analysis of ``series`` (a ``Series``, or a pandas Series or date/value
    DataFrame, read by intake).

    ``settings`` holds every choice (see ``Settings``); keyword ``choices`` override single
    fields, e.g. ``analyze(series, shape="exponential", horizon=12)``. ``progress(done,
    total)``, when given, is called after each rolling origin (it does not change the result).
    """
    from .breaks import cusum as cusum_paths
    from .breaks.detect import find_breaks
    from .evaluate import evaluate
    from .growth import growth_table
    from .intake import as_series
    from .regimes import strategy_forecast

    settings = Settings.coerce(settings, choices, caller="analyze")
    series = as_series(series)
    spec = settings.spec_for(series)  # resolved once; every stage below reads this one
    horizon = settings.horizon_for(series)
    breaks = find_breaks(series, spec, settings.breaks)
    evaluation = evaluate(series, spec, settings, breaks, progress=progress)
    chosen = next(c for c in evaluation.candidates if c.name == evaluation.recommended.name)
    forecast = strategy_forecast(series, chosen.strategy, breaks.positions, horizon, spec)
    global_forecast = trend_forecast(series, spec, horizon)
    global_fit = fit_history(series, spec)
    y_model = global_fit.fit.X @ global_fit.fit.beta + global_fit.fit.residuals
    cusum = cusum_paths.recursive_cusum(y_model, global_fit.fit.X).to_dict()
    growth = growth_table(series, spec, breaks)
    return Analysis(series=series, settings=settings, spec=spec, breaks=breaks,
                    evaluation=evaluation, growth=growth, forecast=forecast,
                    global_forecast=global_forecast, global_fitted=global_fit.fitted(),
                    cusum=cusum, cautions=cautions.for_analysis(series, breaks, evaluation.cautions),
                    global_trend=global_fit.trend())
