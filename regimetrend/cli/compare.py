"""``regimetrend compare FILE``: regime-aware candidates against one global trend on a rolling
origin."""

from __future__ import annotations

from pathlib import Path

from .. import numformat
from ..errors import InputError
from ..strategy_table import strategy_kinds
from . import options
from .progress import StageBar
from .text import fmt, table


def register(sub) -> None:
    p = sub.add_parser("compare", help="score every strategy and shape against the global trend "
                                       "on a leak-free rolling origin and recommend one")
    options.add_input_options(p)
    options.add_model_options(p)
    options.add_break_options(p)
    options.add_evaluation_options(p)
    options.add_progress_option(p)
    p.add_argument("--errors", metavar="FILE.csv",
                   help="write every rolling-origin forecast with its actual value to this CSV")
    p.add_argument("--json", action="store_true", help="print the full result as JSON")
    p.set_defaults(run=run)


def run(args) -> int:
    if args.errors:  # refuse a bad target before the work, not after it
        options.check_targets([args.errors], "option --errors")
        if not Path(args.errors).parent.is_dir():
            raise InputError(f"option --errors: folder {Path(args.errors).parent} does not exist")
    series = options.load_from_args(args)
    spec = options.model_from_args(args, series)
    from ..evaluate import compare

    ev = compare(series, shape=spec.shape, seasonality=spec.seasonality,
                 season_length=spec.season_length, kind=args.kind, max_breaks=args.max_breaks,
                 trim=args.trim, criterion=args.criterion, events=tuple(args.event),
                 seasonal_by_regime=args.seasonal_by_regime,
                 serial_correlation=args.serial_correlation, horizon=args.horizon,
                 first_origin=args.first_origin, step=args.step,
                 reuse_breaks=args.reuse_breaks,
                 progress=StageBar("rolling origin", "origins", quiet=args.quiet))
    result = ev.to_dict()
    if args.errors:
        path = options.write_atomic(args.errors, ev.errors.to_csv(series, ev.optimistic),
                                    "option --errors", make_folders=False)
        result["outputs"] = {"errors_csv": str(path)}
    if args.json:
        print(options.dumps(result))
    else:
        print(render(series, ev, result.get("outputs", {})))
    return 0


def _pct(x):
    return numformat.percent(None if x is None else 100 * x, "-")


def _p(x):
    return numformat.pvalue(x, "-")


def _seasonal_words(model) -> str:
    kind = model["seasonality"]
    if kind == "none":
        return "no seasonal terms"
    word = "seasonal dummies" if kind == "dummies" else "seasonal adjustment"
    return f"{word}, season length {model['season_length']}"


def render(series, ev, outputs) -> str:
    plan = ev.plan
    lines = [f"{series.name}: {series.n} {series.frequency.name} periods, "
             f"{series.label(0)} to {series.label(series.n - 1)}"]
    if ev.optimistic:
        lines += ["", "*** OPTIMISTIC RESULTS: breaks found on the full sample were reused at "
                      "every origin ***"]
    lines += [f"rolling origin: {plan['count']} origins, last period known "
              f"{series.label(plan['first_origin'] - 1)} to "
              f"{series.label(plan['origins'][-1] - 1)}, every {plan['step']} period(s); "
              f"horizons 1..{plan['horizon']}; breaks {plan['breaks']}",
              f"reference: {ev.reference} trend ({_seasonal_words(ev.model)}); errors in "
              f"original units, point forecast = mean", ""]
    rows = []
    for c in ev.candidates:
        m, vs = c.metrics, c.vs_global
        rows.append([c.name, str(c.rank), fmt(m["rmse"]), fmt(m["mae"]),
                     fmt(m["mape"]) if m["mape"] is not None else "-", fmt(m["mase"]),
                     fmt(m["me"]), _pct(m["coverage80"]), _pct(m["coverage95"]),
                     _pct(c.gain) if c.name != ev.reference else "reference",
                     _p(vs.get("p_value_better"))])
    lines.append(table(["candidate", "rank", "RMSE", "MAE", "MAPE %", "MASE", "ME",
                        "80% cover", "95% cover", "gain vs global", "DM p (better)"], rows))
    if ev.same_as:
        lines.append("not ranked (same forecasts as another candidate): " + "; ".join(
            f"{a} = {b}" for a, b in ev.same_as.items()))
    used = dict.fromkeys(c.strategy.name for c in ev.candidates)
    lines += ["", "gain vs global: 1 - RMSE / RMSE of the reference; DM p: one-sided "
                  "Diebold-Mariano (HLN) p-value that the candidate is more accurate",
              "strategies: " + " ".join(f"{k.name}: {k.summary}" for k in strategy_kinds()
                                        if k.name in used), "",
              f"recommendation: {ev.recommended.reason}",
              f"rule: {ev.recommended.rule}", ""]
    rec = ev.candidate(ev.recommended.name)
    ref = ev.candidate(ev.reference)
    if rec.name != ref.name:
        rows = [[str(a["horizon"]), fmt(b["rmse"]), fmt(a["rmse"]),
                 _p(dm.get("p_value_better"))]
                for a, b, dm in zip(rec.per_horizon, ref.per_horizon,
                                    rec.vs_global.get("per_horizon", []))]
        lines.append(table(["horizon", f"RMSE {ref.name}", f"RMSE {rec.name}",
                            "DM p (better)"], rows))
        lines.append("")
    lines.append(f"history: {ev.history.sentence}")
    sweep = ev.history.evidence.get("sweep", [])
    if len(sweep) > 1:
        lines.append(table(["fit from", "RMSE", "MAE", "gain vs all history"],
                           [[r["label"], fmt(r["rmse"]), fmt(r["mae"]),
                             _pct(r["gain_over_global"])] for r in sweep]))
    lines += ["", f"diagnosis: {ev.diagnosis.sentence}", ""]
    lines += [f"caution: {c}" for c in ev.cautions]
    for path in outputs.values():
        lines.append(f"wrote {path}")
    return "\n".join(lines)
