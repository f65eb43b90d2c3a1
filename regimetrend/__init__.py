"""regimetrend: find where a trend's growth regime changed and forecast from the regime that holds.

The flow runs one way: intake -> trend design -> breaks -> regimes -> evaluation -> growth ->
report. ``analyze`` runs all of it; the stage functions are public too.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from .errors import InputError

__version__ = "0.1.0"

# The public names below load their modules (numpy, pandas, scipy) on first use, so that
# ``regimetrend --help`` and ``--version`` start quickly (benchmarks/bench_startup.py).
_LAZY = {"TrendSpec": "design", "Forecast": "forecast", "trend_forecast": "forecast",
         "Holdout": "holdout", "holdout_check": "holdout", "Frequency": "series",
         "Series": "series", "resolve_spec": "settings", "Settings": "settings"}

if TYPE_CHECKING:
    from .design import TrendSpec
    from .forecast import Forecast, trend_forecast
    from .holdout import Holdout, holdout_check
    from .series import Frequency, Series
    from .settings import Settings, resolve_spec


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


__all__ = ["Forecast", "Frequency", "Holdout", "InputError", "Series", "TrendSpec",
           "demo_path", "holdout_check", "load_series", "resolve_spec", "trend_forecast"]


def analyze(series, settings=None, **choices):
    """The whole analysis of one series (see ``regimetrend.analysis.analyze``)."""
    from .analysis import analyze as _analyze

    return _analyze(series, settings, **choices)


def detect_breaks(series, **options):
    """Find, test and date breaks in the trend (see ``regimetrend.breaks.detect_breaks``)."""
    from .breaks import detect_breaks as _detect

    return _detect(series, **options)


def compare(series, **options):
    """Rolling-origin comparison against the global trend (see ``regimetrend.evaluate``)."""
    from .evaluate import compare as _compare

    return _compare(series, **options)


def growth_table(source, *args, **options):
    """Growth by regime with intervals (see ``regimetrend.growth.growth_table``)."""
    from .growth import growth_table as _growth

    return _growth(source, *args, **options)


__all__ += ["Settings", "analyze", "compare", "detect_breaks", "growth_table"]
