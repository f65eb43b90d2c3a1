"""``regimetrend compare FILE``: regime-aware candidates against one global trend on a rolling
origin."""

from __future__ import annotations

from pathlib import Path

from ..errors import InputError
from . import budget, options
from .progress import StageBar


def register(sub) -> None:
    p = sub.add_parser("compare", help="score every strategy and shape against the global trend "
                                       "on a leak-free rolling origin and give the verdict: "
                                       "one chosen model")
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
    settings = options.settings_from_args(args)  # checked before the file is read
    series = options.load_from_args(args)
    budget.check_evaluation(series, settings.evaluation,  # refuse hours, announce minutes
                            shape=settings.model.shape)
    from ..analysis import analyze

    analysis = analyze(series, settings,
                       progress=StageBar("rolling origin", "origins", quiet=args.quiet))
    ev, verdict = analysis.evaluation, analysis.verdict
    result = {"verdict": verdict.to_dict() if verdict is not None else None, **ev.to_dict()}
    if args.errors:
        path = options.write_atomic(args.errors, ev.errors.to_csv(series, ev.optimistic),
                                    "option --errors", make_folders=False)
        result["outputs"] = {"errors_csv": str(path)}
    if args.json:
        print(options.dumps(result))
    else:
        print(render(series, ev, result.get("outputs", {}), verdict))
    return 0


def render(series, ev, outputs, verdict=None) -> str:
    """The readable comparison: the verdict's sentences first, then ``Evaluation.summary`` of
    the chosen shape's evaluation (its candidates are the alternatives) and the files
    written."""
    head = []
    if verdict is not None:
        head = (["verdict:"] + [f"  {s}" for s in verdict.sentences]
                + ["", f"verdict rule: {verdict.rule}", "",
                   f"evaluation of the chosen shape ({ev.reference} is its reference); the "
                   f"other candidates are alternatives:", ""])
    return "\n".join(head + [ev.summary(series)] + [f"wrote {path}" for path in outputs.values()])
