"""The one table from the Python API's names to the command line's flags.

Messages name a setting through ``errors.about``/``option``/``setting``; while a command runs,
``cli.main`` installs this table (``errors.named_by``), so the same message names
``--max-breaks`` on the command line and ``max_breaks`` from Python. The shared options are
declared from it too (``cli/options.py``), so a flag and its setting cannot drift apart.
"""

from __future__ import annotations

FLAGS: dict[str, str] = {
    # reading the series (intake.load_series)
    "date_column": "--date-column",
    "value_column": "--value-column",
    "frequency": "--frequency",
    "decimal": "--decimal",
    "fill_missing": "--fill-missing",
    "sheet": "--sheet",
    "name": "--name",
    # the trend (settings.ModelSettings)
    "shape": "--shape",
    "seasonality": "--seasonality",
    "season_length": "--season-length",
    # the break search (settings.BreakSettings)
    "kind": "--kind",
    "max_breaks": "--max-breaks",
    "trim": "--trim",
    "criterion": "--criterion",
    "events": "--event",
    "seasonal_by_regime": "--seasonal-by-regime",
    "serial_correlation": "--serial-correlation",
    "method": "--method",
    # the rolling origin (settings.EvaluationSettings)
    "horizon": "--horizon",
    "first_origin": "--first-origin",
    "step": "--step",
    "reuse_breaks": "--reuse-breaks",
    # single commands
    "holdout": "--holdout",
    "output": "--output",
    "errors": "--errors",
}


def dest(name: str) -> str:
    """The attribute argparse stores the flag of setting ``name`` under."""
    return FLAGS[name].lstrip("-").replace("-", "_")
