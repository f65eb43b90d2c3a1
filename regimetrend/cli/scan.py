"""``regimetrend scan FILE``: find, test and date the breaks in a series' trend."""

from __future__ import annotations

from .. import numformat
from . import options
from .text import fmt, table


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

    spec = options.model_from_args(args, series)
    return detect_breaks(series, shape=spec.shape, seasonality=spec.seasonality,
                         kind=args.kind, max_breaks=args.max_breaks, trim=args.trim,
                         criterion=args.criterion, events=tuple(args.event),
                         season_length=spec.season_length,
                         seasonal_by_regime=args.seasonal_by_regime,
                         serial_correlation=args.serial_correlation)


def run(args) -> int:
    from ..growth import growth_table

    series = options.load_from_args(args)
    result = scan(series, args)
    growth = growth_table(series, result.spec, result).to_dict()
    if args.json:
        out = result.to_dict()
        for seg, g in zip(out["segments"], growth["segments"]):
            seg["growth"] = g["growth"]
        out["growth_changes"] = growth["changes"]
        print(options.dumps(dict(out, series=series.to_dict())))
    else:
        print(render(series, result, growth))
    return 0


def _interval(g: dict, key: str) -> str:
    lo, hi = g.get(key + "_ci95") or (None, None)
    return numformat.interval(lo, hi, numformat.percent, missing="-")


def pvalue(p) -> str:
    """'p = 0.079', 'p < 0.001' or 'p not available'."""
    if p is None:
        return "p not available"
    text = numformat.pvalue(p)
    return f"p {text}" if text.startswith("<") else f"p = {text}"


def render(series, b, growth: dict | None = None) -> str:
    """The readable scan: breaks, tests, segments, drift, notes."""
    spec = b.spec
    log = spec.shape == "exponential"
    lines = [f"{series.name}: {series.n} {series.frequency.name} periods, {series.label(0)} to "
             f"{series.label(series.n - 1)}",
             f"model: {spec.describe()}; breaks of kind '{b.kind}' (asked: {b.kind_requested}); "
             f"number chosen by {b.criterion}; shortest regime {b.trim_periods} periods", ""]
    if b.breaks:
        rows = []
        for x in b.breaks:
            lo90, hi90 = (series.label(int(p)) for p in x.ci90)
            lo95, hi95 = (series.label(int(p)) for p in x.ci95)
            slope = (f"{numformat.points(x.slope_change_pct, '-')} pp/period"
                     if log and x.slope_change_pct is not None
                     else f"{numformat.signed(x.slope_change, '-')}/period")
            rows.append([x.label, f"{lo90} to {hi90}", f"{lo95} to {hi95}",
                         numformat.signed(x.jump, "-"), slope,
                         numformat.statistic(x.f_statistic, "-")])
        lines.append(f"breaks found: {len(b.breaks)} (each is the first period of a new regime)")
        lines.append(table(["break", "90% interval", "95% interval", "jump (units)",
                            "growth change", "F"], rows))
    else:
        lines.append("breaks found: none")
    t = b.tests
    lines += ["", "tests:"]
    lines.append(f"  sup-F, no break against one: F = {numformat.statistic(t.supf.statistic)}, "
                 f"{pvalue(t.supf.p_value)} (shortest regime {t.supf.trim_share:.0%} of "
                 f"the series)")
    for step in t.sequential:
        where = f" (best at {series.label(step.position)})" if step.position is not None else ""
        lines.append(f"  sup-F({step.breaks_before + 1}|{step.breaks_before}): "
                     f"F = {numformat.statistic(step.statistic)}, {pvalue(step.p_value)}{where}")
    for ev in t.chow:
        lines.append(f"  Chow test at event {ev.event} ({ev.label}): F = {numformat.statistic(ev.statistic)}, "
                     f"{pvalue(ev.p_value)}")
    for c in t.cusum:
        where = (f"leaves its 5% band at {series.label(c.first_crossing)}"
                 if c.first_crossing is not None else "stays inside its 5% band")
        lines.append(f"  CUSUM ({c.method}) of the global trend: {where}, {pvalue(c.p_value)}")
    if b.drift is not None:
        lines.append(f"  the global trend started to drift at {b.drift.label} ({b.drift.method})")
    if b.is_wandering:
        w = b.wandering
        lines.append(f"  wandering: the series moves around its trend like a random walk "
                     f"(KPSS {fmt(w.kpss)}, 5% value {w.kpss_critical:g}; AR(1) {fmt(w.ar1)}); "
                     f"the breaks above are descriptive only")
    lines += ["", "regimes (growth with 95% intervals from Newey-West errors):"]
    rows = []
    per_regime = (growth or {}).get("segments") or [{} for _ in b.segments]
    for s, g in zip(b.segments, per_regime):
        g = g.get("growth", {})
        step = (numformat.percent(s.growth_pct, sign=True) if s.growth_pct is not None
                else numformat.signed(s.slope, "-"))
        year = g.get("annualised_pct")
        rows.append([f"{s.start_label} to {s.end_label}", str(s.n), fmt(s.level), step,
                     numformat.percent(year, "-", sign=True),
                     _interval(g, "annualised_pct")])
    lines.append(table(["regime", "periods", "trend level at start",
                        "growth per period" if log else "slope per period",
                        "growth a year", "95% interval (%)"], rows))
    for c in (growth or {}).get("changes", []):
        ch = c.get("annualised_pct_change")
        if ch is not None:
            lines.append(f"  growth change at {c['label']}: {numformat.points(ch)} points a year "
                         f"(95% interval {_interval(c, 'annualised_pct_change')}), Wald "
                         f"{pvalue(c.get('p_value'))}")
    notes = list(b.notes)
    if b.breaks and series.n - b.breaks[-1].position < 2 * max(series.frequency.season_length, 6):
        notes.append("the latest break is close to the end of the series: its date and the new "
                     "regime's growth rest on few points")
    notes.append("pair these findings with what you know happened in the business")
    lines.append("")
    lines += [f"note: {n}" for n in notes]
    return "\n".join(lines)
