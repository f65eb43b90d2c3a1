"""``regimetrend portfolio FILE --output DIR``: analyse many series and triage them.

FILE is a long table (with ``--id-column``, repeatable), a wide table (one column per series)
or a folder of one-series files. Writes ``DIR/summary.csv|parquet|xlsx``, ``DIR/series/*.json``,
``DIR/portfolio.html`` and, on request, ``DIR/reports/<series>/``. A rerun skips series whose
results exist for the same data and settings.
"""

from __future__ import annotations

import sys

from . import options


def register(sub) -> None:
    p = sub.add_parser("portfolio", help="analyse many series at once: summary table, "
                                         "per-series results and a triage page")
    p.add_argument("file", metavar="FILE",
                   help="long table (with --id-column), wide table (one column per series) or "
                        "a folder of one-series files (CSV, .xlsx or Parquet)")
    p.add_argument("--output", metavar="DIR", required=True, help="folder for the outputs")
    p.add_argument("--id-column", action="append", default=[], metavar="NAME",
                   help="column naming the series in a long table (repeatable: region, product)")
    p.add_argument("--date-column", help="name of the date column (long and wide tables, "
                                         "files of a folder)")
    p.add_argument("--value-column", help="name of the value column (long tables, files of a "
                                          "folder)")
    p.add_argument("--frequency", help="calendar of every series (inferred by default)")
    p.add_argument("--decimal", help="decimal mark of the values: '.' or ',' (by default '.', "
                                     "or what the numbers show in a file not separated by "
                                     "commas)")
    p.add_argument("--date-format", help="how the dates are written, in strftime codes, e.g. "
                                         "%%d.%%m.%%Y (common forms are read without it)")
    p.add_argument("--fill-missing", action="store_true",
                   help="fill missing values and calendar gaps by linear interpolation")
    p.add_argument("--sheet", help="sheet of an Excel workbook (first sheet by default)")
    options.add_model_options(p)
    options.add_break_options(p)
    options.add_evaluation_options(p)
    p.add_argument("--settings-file", metavar="FILE",
                   help="per-series settings overriding the options: CSV/.xlsx with an id "
                        "column and one column per setting, or JSON {id: {setting: value}}")
    p.add_argument("--level", default="full", choices=("full", "scan"),
                   help="full (default): the whole analysis; scan: break search and growth "
                        "only (fast triage)")
    p.add_argument("--engine", default="local", choices=("local", "dask"),
                   help="local (default): a process pool on this machine; dask: a Dask cluster")
    p.add_argument("--workers", type=options._positive_int, default=None, metavar="N",
                   help="worker processes (default: all cores); for --engine dask without "
                        "--scheduler, the workers of the local cluster started for the run")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="address of a running Dask scheduler (e.g. tcp://10.0.0.5:8786)")
    p.add_argument("--reports", default="none", metavar="WHICH",
                   help="per-series HTML reports: none (default), all, or top:N (the first N "
                        "in triage order)")
    p.add_argument("--summary-formats", default="csv,parquet,xlsx", metavar="LIST",
                   help="formats of the summary table, comma-separated (default "
                        "csv,parquet,xlsx)")
    p.add_argument("--quiet", action="store_true", help="no progress bar")
    p.set_defaults(run=run)


def settings_from_args(args):
    return options.settings_from_args(args)


def _formats(text: str) -> tuple[str, ...]:
    from ..errors import InputError
    from ..portfolio.summary import FORMATS

    wanted = tuple(dict.fromkeys(f.strip().lower() for f in text.split(",") if f.strip()))
    bad = [f for f in wanted if f not in FORMATS]
    if bad or not wanted:
        raise InputError(f"option --summary-formats: {bad[0] if bad else text!r} is not one of "
                         f"{', '.join(FORMATS)}")
    return wanted


def run(args) -> int:
    from ..errors import InputError
    from ..portfolio import run_portfolio
    from .progress import StageBar

    if args.scheduler and args.engine != "dask":
        raise InputError("option --scheduler: only with --engine dask")
    result = run_portfolio(
        args.file, args.output, id_columns=args.id_column, date_column=args.date_column,
        value_column=args.value_column, sheet=args.sheet,
        load_options={"frequency": args.frequency, "decimal": args.decimal,
                      "date_format": args.date_format, "fill_missing": args.fill_missing},
        settings=settings_from_args(args), settings_file=args.settings_file, level=args.level,
        engine=args.engine, workers=args.workers, scheduler=args.scheduler,
        reports=args.reports, formats=_formats(args.summary_formats),
        progress=StageBar("portfolio", "series", quiet=args.quiet, stream=sys.stderr))
    for name, path in result.files.items():
        print(f"{name}: {path}")
    if result.reports:
        print(f"reports written: {result.reports} (in {args.output}/reports)")
    print(result.line())
    return 0
