"""regimetrend: find where a trend's growth regime changed and forecast from the regime that holds.

The flow runs one way: intake -> trend design -> breaks -> regimes -> evaluation -> growth ->
report. ``analyze`` runs all of it; the stage functions are public too (``api.py``). Each takes
a ``Series`` or a pandas Series/DataFrame, and its choices as a ``Settings`` or flat keywords.
"""

__version__ = "0.1.0"

from .api import analyze, compare, detect_breaks, growth_table, trend_forecast  # noqa: E402
from .design import TrendSpec  # noqa: E402
from .errors import InputError  # noqa: E402
from .forecast import Forecast  # noqa: E402
from .holdout import Holdout, holdout_check  # noqa: E402
from .series import Frequency, Series  # noqa: E402
from .settings import (BreakSettings, EvaluationSettings, ModelSettings,  # noqa: E402
                       Settings, resolve_spec)


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
           "load_series", "resolve_spec", "trend_forecast"]
