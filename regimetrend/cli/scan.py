"""``regimetrend scan FILE``: find, test and date the breaks in a series' trend."""

from __future__ import annotations

from . import budget, options


def register(sub) -> None:
    p = sub.add_parser("scan", help="find where the trend's growth regime changed, how many "
                                    "times, and how sure that is")
    options.add_input_options(p)
    options.add_model_options(p)
    options.add_break_options(p)
    p.add_argument("--json", action="store_true", help="print the full result as JSON")
    p.set_defaults(run=run)


def scan(series, args):
    """The BreakSet the options ask for."""
    from ..breaks import detect_breaks

    return detect_breaks(series, options.settings_from_args(args))


def run(args) -> int:
    from ..growth import growth_table

    series = options.load_from_args(args)
    budget.check_scan(series)  # refuse hours, announce minutes
    result = scan(series, args)
    table = growth_table(series, result.spec, result)
    note = options.shape_note(args, "scan", result.spec.shape)
    if args.json:
        growth = table.to_dict()
        out = result.to_dict()
        for seg, g in zip(out["segments"], growth["segments"]):
            seg["growth"] = g["growth"]
        out["growth_changes"] = growth["changes"]
        print(options.dumps(dict(out, series=series.to_dict(), shape_note=note)))
    else:
        print(render(series, result, table, note))
    return 0


def render(series, b, growth=None, shape_note: str | None = None) -> str:
    """The readable scan: ``BreakSet.summary`` (breaks, tests, regimes with growth, notes),
    after the line saying which shape ``--shape auto`` fitted and why."""
    text = b.summary(series, growth)
    return f"{shape_note}\n\n{text}" if shape_note else text
