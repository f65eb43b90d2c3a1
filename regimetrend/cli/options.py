"""Options shared by several commands."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..errors import InputError


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


def add_model_options(p) -> None:
    p.add_argument("--shape", default="linear", choices=("linear", "exponential", "quadratic"),
                   help="trend shape (default linear)")
    p.add_argument("--seasonality", default="auto", choices=("auto", "none", "dummies", "adjust"),
                   help="seasonal terms; auto = dummies for seasonal calendars, none otherwise")
    p.add_argument("--season-length", type=_positive_int, default=None,
                   help="periods in a seasonal cycle (12 monthly, 4 quarterly, 52 weekly, 7 daily)")


def add_break_options(p) -> None:
    p.add_argument("--kind", default="auto", choices=("auto", "level", "slope", "both"),
                   help="what may change at a break: level (jump), slope (kink), both; "
                        "auto lets the criterion choose")
    p.add_argument("--max-breaks", type=_nonnegative_int, default=None,
                   help="largest number of breaks considered (default 3, fewer when the series "
                        "is too short to hold them)")
    p.add_argument("--event", action="append", default=[], metavar="DATE",
                   help="a known event date to test as a break (repeatable)")
    p.add_argument("--trim", type=_trim, default=None,
                   help="shortest regime: a share of the series (below 1) or a number of periods")
    p.add_argument("--criterion", default="sequential", choices=("sequential", "bic", "lwz"),
                   help="how the number of breaks is chosen: sequential sup-F tests at 5%% "
                        "(default), or the BIC or LWZ information criterion")
    p.add_argument("--seasonal-by-regime", action="store_true",
                   help="let the seasonal pattern change at each break too")
    p.add_argument("--serial-correlation", default="allow", choices=("allow", "ignore"),
                   help="allow (default): break tests robust to autocorrelated errors; "
                        "ignore: classical tests, exact only for uncorrelated errors")


def add_evaluation_options(p) -> None:
    """The rolling-origin options of ``compare`` and ``report``."""
    p.add_argument("--horizon", type=_positive_int, default=None, metavar="H",
                   help="forecast horizons 1..H scored at every origin (default: one seasonal "
                        "cycle, at least 4)")
    p.add_argument("--first-origin", type=_positive_int, default=None, metavar="N",
                   help="periods known at the first origin (default: the later of half the "
                        "series and the start of the last 24 origins)")
    p.add_argument("--step", type=_positive_int, default=1, metavar="K",
                   help="periods between origins (default 1)")
    p.add_argument("--reuse-breaks", action="store_true",
                   help="reuse the full-sample breaks at every origin instead of finding them "
                        "again (faster; results are labelled optimistic)")


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


def _nonnegative_int(text):
    return _whole(text, 0)


def _trim(text):
    try:
        v = float(text)
    except ValueError:
        v = -1.0
    if not (0 < v < 1 or (v >= 1 and v == int(v))):
        raise argparse.ArgumentTypeError("expected a share between 0 and 1 or a whole number of "
                                         f"periods, got {text!r}")
    return v if v < 1 else int(v)


def load_from_args(args):
    """Read the series named on the command line with the input options."""
    from ..intake import load_series

    return load_series(args.file, date_column=args.date_column, value_column=args.value_column,
                       frequency=args.frequency, decimal=args.decimal,
                       fill_missing=args.fill_missing, name=args.name, sheet=args.sheet,
                       date_format=args.date_format)


def model_from_args(args, series):
    """The TrendSpec the options ask for, with season length and 'auto' resolved."""
    from ..settings import resolve_spec

    return resolve_spec(series, shape=args.shape, seasonality=args.seasonality,
                        season_length=args.season_length)


def check_output_folder(folder) -> Path:
    """The output folder, refused up front when it exists as a file."""
    folder = Path(folder)
    if folder.exists() and not folder.is_dir():
        raise InputError(f"option --output: {folder} exists and is not a folder")
    return folder
