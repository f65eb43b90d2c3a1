"""The names of the growth figures, written once.

``growth.py`` computes each figure under one of these names; the same names are the keys of a
segment's ``growth`` block in ``GrowthTable.to_dict()`` (with ``_se`` and ``_ci95`` beside
each), of report.json, and the column keys of the growth table's CSV and workbook sheet. The
report, the terminal text and the portfolio rows read them from here, so a figure is never
looked up under a name that is not computed. What each figure means is written in the
docstring of ``growth.py``.
"""

from __future__ import annotations

LOG_GROWTH_PER_PERIOD = "log_growth_per_period"  # exponential shape: the log-growth coefficient
PER_PERIOD_PCT = "per_period_pct"
ANNUALISED_PCT = "annualised_pct"  # the headline "% a year" of every shape
ANNUALISED_PCT_OF_START = "annualised_pct_of_start"  # linear: yearly increase / start level
ANNUALISED_PCT_OF_END = "annualised_pct_of_end"  # linear: yearly increase / end level
LEVEL_START = "level_start"
LEVEL_END = "level_end"
PER_PERIOD_UNITS = "per_period_units"
ANNUALISED_UNITS = "annualised_units"
DOUBLING_TIME_PERIODS = "doubling_time_periods"
DOUBLING_TIME_YEARS = "doubling_time_years"
AVERAGE_PER_PERIOD_UNITS = "average_per_period_units"  # quadratic: over the regime
AVERAGE_ANNUALISED_UNITS = "average_annualised_units"
AVERAGE_ANNUALISED_PCT = "average_annualised_pct"
CURVATURE_PER_PERIOD = "curvature_per_period"
CHANGE_PCT = "annualised_pct_change"  # across a break: points of the headline % a year


def ci95(name: str) -> str:
    """The key of a figure's 95% interval, ``[low, high]``."""
    return f"{name}_ci95"


def se(name: str) -> str:
    """The key of a figure's standard error."""
    return f"{name}_se"
