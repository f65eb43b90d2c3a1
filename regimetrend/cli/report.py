"""``regimetrend report FILE --output DIR``: the whole analysis written as a report.

Takes the model, break and evaluation options of ``compare``; writes the self-contained HTML
report, the charts as PNG, the tables as CSV and one workbook, and the full result as JSON (see
``regimetrend.report.writer`` for the file names), then lists what it wrote.
"""

from __future__ import annotations

import json
from pathlib import Path

from . import budget, options


def register(sub) -> None:
    p = sub.add_parser("report", help="write the full analysis as an HTML report with charts, "
                                      "CSV and workbook tables and JSON")
    options.add_input_options(p)
    options.add_model_options(p)
    options.add_break_options(p)
    options.add_evaluation_options(p)
    options.add_chart_options(p)
    options.add_progress_option(p)
    p.add_argument("--output", metavar="DIR", required=True,
                   help="folder for the report files (created when missing)")
    p.add_argument("--json", action="store_true",
                   help="print the full result as JSON, with the files written under 'outputs'")
    p.set_defaults(run=run)


def produce_report(series, folder, settings=None, *, source_name: str | None = None,
                   units: str | None = None, log_scale: bool = False, quiet: bool = True,
                   extra: dict[str, bytes] | None = None, **choices) -> dict:
    """Run ``analyze`` on ``series`` with ``settings`` (and flat ``choices``) and write the
    report into ``folder`` (with the ``extra`` files, kept when already there); returns
    {output name: path}. A progress bar shows on a terminal unless ``quiet``."""
    from ..analysis import analyze
    from ..report import write_report
    from .progress import StageBar

    folder = options.check_output_folder(folder)
    analysis = analyze(series, settings,
                       progress=StageBar("rolling origin", "origins", quiet=quiet), **choices)
    return write_report(analysis, folder, source_name=source_name, units=units,
                        log_scale=log_scale, progress=StageBar("report", "parts", quiet=quiet),
                        extra=extra)


def run(args) -> int:
    folder = options.check_output_folder(args.output)
    settings = options.settings_from_args(args)  # checked before the file is read
    series = options.load_from_args(args)
    options.check_log_scale(args, series)
    budget.check_evaluation(series, settings.evaluation,  # refuse hours, announce minutes
                            shape=settings.model.shape)
    written = produce_report(series, folder, settings, source_name=Path(args.file).name,
                             units=args.units, log_scale=args.log_scale, quiet=args.quiet)
    if args.json:
        result = json.loads(Path(written["json"]).read_text(encoding="utf-8"))
        result["outputs"] = written
        print(options.dumps(result))
    else:
        print(f"report for {series.name} written to {folder}")
        for key, path in written.items():
            print(f"{key}: {path}")
    return 0
