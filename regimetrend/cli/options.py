"""Options shared by several commands."""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import InputError
from .names import FLAGS, dest

if TYPE_CHECKING:
    from ..settings import Settings


# The output helpers, loaded when first called (numpy is not needed for --help or --version).
def check_targets(*args, **kwargs):
    from ..output import check_targets as f

    return f(*args, **kwargs)


def dumps(*args, **kwargs):
    from ..output import dumps as f

    return f(*args, **kwargs)


def json_safe(*args, **kwargs):
    from ..output import json_safe as f

    return f(*args, **kwargs)


def write_atomic(*args, **kwargs):
    from ..output import write_atomic as f

    return f(*args, **kwargs)


def add_input_options(p) -> None:
    p.add_argument("file", metavar="FILE", help="CSV, Excel (.xlsx) or Parquet file with a date "
                                                "column and a value column")
    p.add_argument("--date-column", help="name of the date column (found by itself when obvious)")
    p.add_argument("--value-column", help="name of the value column (found by itself when obvious)")
    p.add_argument("--frequency", help="calendar of the series, e.g. monthly, quarterly, weekly, "
                                       "'2 weeks' (inferred by default)")
    p.add_argument("--decimal", help="decimal mark of the values: '.' or ',' (by default '.', or "
                                     "what the numbers show in a file not separated by commas)")
    p.add_argument("--date-format", help="how the dates are written, in strftime codes, e.g. "
                                         "%%d.%%m.%%Y (common forms are read without it)")
    p.add_argument("--fill-missing", action="store_true",
                   help="fill missing values and calendar gaps by linear interpolation")
    p.add_argument("--sheet", help="sheet name of an Excel workbook (first sheet by default)")
    p.add_argument("--name", help="name of the series in outputs (the value column by default)")


def _setting(p, name: str, help: str, metavar: str | None = None) -> None:
    """Declare the flag of setting ``name`` (``names.FLAGS``); its values are checked by the
    settings' table (``settings.RULES``), the choices listed from it."""
    from ..settings import RULES

    rule = RULES[name]
    flag = FLAGS[name]
    if rule.form == "flag":
        p.add_argument(flag, action="store_true", help=help)
    elif rule.form == "dates":
        p.add_argument(flag, action="append", default=[], metavar=metavar or "DATE", help=help)
    elif rule.form == "choice":
        p.add_argument(flag, default=None, choices=rule.choices, help=help)
    else:  # numbers: read as text here, parsed and checked by the settings
        p.add_argument(flag, default=None, metavar=metavar, help=help)


def add_model_options(p) -> None:
    from ..settings import MAX_SEASON_LENGTH

    _setting(p, "shape", "trend shape (default auto: compare and report let the verdict choose "
                         "the shape per series; forecast and scan fit a linear trend)")
    _setting(p, "seasonality", "seasonal terms; auto = dummies for seasonal calendars, none "
                               "otherwise")
    _setting(p, "season_length", f"periods in a seasonal cycle (12 monthly, 4 quarterly, 52 "
                                 f"weekly, 7 daily; at most {MAX_SEASON_LENGTH})")


def add_break_options(p) -> None:
    from ..settings import DEFAULT_MAX_BREAKS

    _setting(p, "kind", "what may change at a break: level (jump), slope (kink), both; auto lets "
                        "the criterion choose")
    _setting(p, "max_breaks", f"largest number of breaks considered (default {DEFAULT_MAX_BREAKS}, "
                              f"fewer when the series is too short to hold them)")
    _setting(p, "events", "a known event date to test as a break (repeatable)")
    _setting(p, "break_dates", "break dates the analyst knows, e.g. 2020-04,2022-01: the regimes are "
                          "fitted at these dates instead of searched for", "DATES")
    _setting(p, "trim", "shortest regime: a share of the series (below 0.5) or a number of "
                        "periods")
    _setting(p, "criterion", "how the number of breaks is chosen: sequential sup-F tests at 5%% "
                             "(default), or the BIC or LWZ information criterion")
    _setting(p, "seasonal_by_regime", "let the seasonal pattern change at each break too")
    _setting(p, "serial_correlation", "allow (default): break tests robust to autocorrelated "
                                      "errors; ignore: classical tests, exact only for "
                                      "uncorrelated errors")
    _setting(p, "method", "search: auto (default; exact dynamic programming, PELT for very long "
                          "series), exact or pelt")


def add_evaluation_options(p) -> None:
    """The rolling-origin options of ``compare`` and ``report``."""
    _setting(p, "horizon", "forecast horizons 1..H scored at every origin (default: one seasonal "
                           "cycle, at least 4; at most the length of the series)", "H")
    _setting(p, "first_origin", "periods known at the first origin (default: the later of half "
                                "the series and the start of the last 24 origins)", "N")
    _setting(p, "step", "periods between origins (default 1)", "K")
    _setting(p, "reuse_breaks", "reuse the full-sample breaks at every origin instead of finding "
                                "them again (faster; results are labelled optimistic)")


def settings_from_args(args) -> Settings:
    """The ``Settings`` the command line asks for: every setting flag the command has, parsed
    and checked by the settings' table; flags left out keep the settings' defaults."""
    from ..settings import RULES, Settings

    given = {}
    for name in Settings.FIELDS:
        if not hasattr(args, dest(name)):
            continue
        raw = getattr(args, dest(name))
        if raw is None or (name in ("events", "break_dates") and not raw):
            continue
        given[name] = RULES[name].from_text(name, raw)
    return Settings(**given)


def add_chart_options(p) -> None:
    """How values are labelled and drawn (the report and the forecast chart)."""
    p.add_argument("--units", metavar="TEXT",
                   help="units of the values, e.g. 'orders a month' or 'EUR million', written "
                        "on every value axis and in the sentences (default: the series name)")
    p.add_argument("--log-scale", action="store_true",
                   help="draw value axes on a log scale (steady exponential growth becomes a "
                        "straight line); needs positive values")


def check_log_scale(args, series) -> None:
    """Refuse --log-scale for a series with a value at or below zero, naming the period."""
    if not getattr(args, "log_scale", False):
        return
    bad = [i for i, v in enumerate(series.values) if not v > 0]
    if bad:
        raise InputError(f"option --log-scale: needs positive values; {series.label(bad[0])} "
                         f"is {series.values[bad[0]]:g}")


def add_progress_option(p) -> None:
    p.add_argument("--quiet", action="store_true",
                   help="no progress bar on standard error (it is drawn only on a terminal)")


def add_output_options(p, output_help: str = "folder for the output files") -> None:
    p.add_argument("--json", action="store_true", help="print the full result as JSON")
    p.add_argument("--output", metavar="DIR", help=output_help)


def _whole(text, least):
    try:
        v = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None
    if v < least:
        raise argparse.ArgumentTypeError(f"expected a whole number of at least {least}, "
                                         f"got {text!r}")
    return v


def _positive_int(text):
    return _whole(text, 1)


def load_from_args(args):
    """Read the series named on the command line with the input options."""
    from ..intake import load_series

    return load_series(args.file, date_column=args.date_column, value_column=args.value_column,
                       frequency=args.frequency, decimal=args.decimal,
                       fill_missing=args.fill_missing, name=args.name, sheet=args.sheet,
                       date_format=args.date_format)


def shape_note(args, command: str, shape: str) -> str | None:
    """The line saying which shape a one-shape command fitted under ``--shape auto`` and why
    (``words.auto_shape_note``); None when the analyst gave the shape."""
    from ..words import auto_shape_note

    if settings_from_args(args).model.shape != "auto":
        return None
    from ..errors import option

    return auto_shape_note(command, shape, option("shape"))


def model_from_args(args, series):
    """The TrendSpec the options ask for, with season length and 'auto' resolved."""
    return settings_from_args(args).spec_for(series)


def check_output_folder(folder) -> Path:
    """The output folder, refused up front when it exists as a file."""
    folder = Path(folder)
    if folder.exists() and not folder.is_dir():
        raise InputError(f"option --output: {folder} exists and is not a folder")
    return folder
