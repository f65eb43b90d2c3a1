"""``regimetrend forecast FILE``: one global trend, scored on a holdout, then forecast ahead."""

from __future__ import annotations

import csv
import io
from pathlib import Path

from .. import numformat
from . import options
from .text import caution_lines, fmt, table


def register(sub) -> None:
    p = sub.add_parser("forecast", help="fit one global trend, score it on a holdout and "
                                        "forecast ahead with prediction intervals")
    options.add_input_options(p)
    options.add_model_options(p)
    p.add_argument("--holdout", type=options._positive_int, default=None, metavar="K",
                   help="periods held out for scoring (default: one seasonal cycle, at least 4)")
    p.add_argument("--horizon", default=None, metavar="H",
                   help="periods to forecast (default: one seasonal cycle, at least 4; at most "
                        "the length of the series)")
    options.add_chart_options(p)
    options.add_output_options(p, "folder for forecast.csv and forecast.png")
    p.set_defaults(run=run)


def default_steps(series) -> int:
    """The calendar's default horizon (``evaluate.rolling.default_horizon``: 4 years, 4
    quarters, 12 months, 13 weeks, 14 days, shorter on short series)."""
    from ..evaluate.rolling import default_horizon

    return default_horizon(series.n, series.frequency.unit, series.frequency.step)


def run(args) -> int:
    from ..settings import RULES, EvaluationSettings

    horizon = EvaluationSettings(horizon=RULES["horizon"].from_text("horizon", args.horizon))
    series = options.load_from_args(args)
    spec = options.model_from_args(args, series)
    options.check_log_scale(args, series)
    from ..forecast import fit_history, trend_forecast
    from ..holdout import holdout_check

    k = args.holdout or default_steps(series)
    h = horizon.horizon_for(series)
    if args.output:
        options.check_output_folder(args.output)
    held = holdout_check(series, spec, k)
    fc = trend_forecast(series, spec, h)
    note = options.shape_note(args, "forecast", spec.shape)
    result = {"series": series.to_dict(), "model": spec.to_dict(), "shape_note": note,
              "forecast": fc.rows(), "point_forecast": "mean",
              "holdout": held.to_dict(), "cautions": caution_lines()}
    outputs = {}
    if args.output:
        folder = Path(args.output)
        fit = fit_history(series, spec)
        from ..report.forecast_chart import forecast_png

        png = forecast_png(series, fit.fitted(), 0, fc, units=args.units or "", holdout=held,
                           log_scale=args.log_scale)
        csv_text = forecast_csv(fc)
        targets = [folder / "forecast.csv", folder / "forecast.png"]
        options.check_targets(targets, "option --output")  # nothing is written if one fails
        outputs["forecast_csv"] = str(options.write_atomic(targets[0], csv_text, "option --output"))
        outputs["forecast_png"] = str(options.write_atomic(targets[1], png, "option --output"))
        result["outputs"] = outputs
    if args.json:
        print(options.dumps(result))
    else:
        print(render(series, spec, held, fc, outputs, note))
    return 0


def forecast_csv(fc) -> str:
    buf = io.StringIO()
    fields = ["date", "label", "mean", "median", "lower80", "upper80", "lower95", "upper95"]
    writer = csv.DictWriter(buf, fieldnames=fields, lineterminator="\n")
    writer.writeheader()
    for row in fc.rows():
        writer.writerow({k: (repr(v) if isinstance(v, float) else v) for k, v in row.items()})
    return buf.getvalue()


def render(series, spec, held, fc, outputs, shape_note: str | None = None) -> str:
    m = held.metrics
    lines = [f"{series.name}: {series.n} {series.frequency.name} periods, "
             f"{series.label(0)} to {series.label(series.n - 1)}",
             f"model: global {spec.describe()}"] + ([shape_note] if shape_note else []) + [""]
    for note in series.notes:
        lines.append(f"note: {note}")
    lines.append(f"holdout: fitted on the first {series.n - held.k} periods, scored on the last "
                 f"{held.k} (original units)")
    lines.append(table(["ME", "MAE", "RMSE", "MAPE %", "MASE", "80% cover", "95% cover"],
                       [[fmt(m["me"]), fmt(m["mae"]), fmt(m["rmse"]),
                         fmt(m["mape"]) if m["mape"] is not None else "undefined (zero actual)",
                         fmt(m["mase"]), numformat.percent(100 * m["coverage80"]),
                         numformat.percent(100 * m["coverage95"])]]))
    lines += ["", f"forecast, refitted on all {series.n} periods (point = mean):"]
    rows = [[r["label"], fmt(r["mean"]), fmt(r["median"]),
             f"{fmt(r['lower80'])} to {fmt(r['upper80'])}",
             f"{fmt(r['lower95'])} to {fmt(r['upper95'])}"] for r in fc.rows()]
    lines.append(table(["period", "mean", "median", "80% interval", "95% interval"], rows))
    lines.append("")
    lines += [f"caution: {c}" for c in caution_lines()]
    for path in outputs.values():
        lines.append(f"wrote {path}")
    return "\n".join(lines)
