"""regimetrend: find where a trend's growth regime changed and forecast from the regime that holds.

The flow runs one way: intake -> trend design -> breaks -> regimes -> evaluation -> growth ->
report. ``analyze`` runs all of it; the stage functions are public too.
"""

__version__ = "0.1.0"

from .design import TrendSpec  # noqa: E402
from .errors import InputError  # noqa: E402
from .forecast import Forecast, trend_forecast  # noqa: E402
from .holdout import Holdout, holdout_check  # noqa: E402
from .series import Frequency, Series  # noqa: E402
from .settings import resolve_spec  # noqa: E402


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

from .settings import Settings  # noqa: E402


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
