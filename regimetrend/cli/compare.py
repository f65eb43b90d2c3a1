"""``regimetrend compare FILE``: regime-aware candidates against one global trend on a rolling
origin."""

from __future__ import annotations

from pathlib import Path

from ..errors import InputError
from . import budget, options
from .progress import StageBar


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
    settings = options.settings_from_args(args)  # checked before the file is read
    series = options.load_from_args(args)
    budget.check_evaluation(series, settings.evaluation)  # refuse hours, announce minutes
    from ..evaluate import compare

    ev = compare(series, settings,
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


def render(series, ev, outputs) -> str:
    """The readable comparison: ``Evaluation.summary`` and the files written."""
    return "\n".join([ev.summary(series)] + [f"wrote {path}" for path in outputs.values()])
