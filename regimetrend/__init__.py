"""regimetrend: find where a trend's growth regime changed and forecast from the regime that holds.

The flow runs one way: intake -> trend design -> breaks -> regimes -> evaluation -> growth ->
report. ``analyze`` runs all of it; the stage functions are public too (``api.py``). Each takes
a ``Series`` or a pandas Series/DataFrame, and its choices as a ``Settings`` or flat keywords.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from .errors import InputError

__version__ = "0.1.0"

# The public names below load their modules (numpy, pandas, scipy) on first use, so that
# ``regimetrend --help`` and ``--version`` start quickly (benchmarks/bench_startup.py).
_LAZY = {"TrendSpec": "design", "Forecast": "forecast", "Holdout": "holdout",
         "holdout_check": "holdout", "Frequency": "series", "Series": "series",
         "resolve_spec": "settings", "Settings": "settings", "ModelSettings": "settings",
         "BreakSettings": "settings", "EvaluationSettings": "settings", "analyze": "api",
         "compare": "api", "detect_breaks": "api", "growth_table": "api",
         "trend_forecast": "api", "Verdict": "verdict"}

if TYPE_CHECKING:
    from .api import analyze, compare, detect_breaks, growth_table, trend_forecast
    from .design import TrendSpec
    from .forecast import Forecast
    from .holdout import Holdout, holdout_check
    from .series import Frequency, Series
    from .settings import (BreakSettings, EvaluationSettings, ModelSettings, Settings,
                           resolve_spec)
    from .verdict import Verdict


def __getattr__(name: str):
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'regimetrend' has no attribute {name!r}")
    from importlib import import_module

    value = getattr(import_module(f".{module}", __name__), name)
    globals()[name] = value
    return value


def load_series(*args, **kwargs):
    """Read a series from a file or pandas object (see ``regimetrend.intake.load_series``)."""
    from .intake import load_series as _load

    return _load(*args, **kwargs)


def demo_path():
    """Path of the invented demo series shipped with the package."""
    from importlib.resources import files

    return files("regimetrend") / "data" / "lumen_grid_energy.csv"


__all__ = ["BreakSettings", "EvaluationSettings", "Forecast", "Frequency", "Holdout",
           "InputError", "ModelSettings", "Series", "Settings", "TrendSpec", "analyze",
           "compare", "demo_path", "detect_breaks", "growth_table", "holdout_check",
           "load_series", "resolve_spec", "trend_forecast", "Verdict"]
