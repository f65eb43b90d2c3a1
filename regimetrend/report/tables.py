"""The report's tables, built from the result's JSON form so every figure shown is a JSON figure.

A ``Table`` holds raw values (full precision) and says how each column reads; the HTML page rounds
them for reading, the CSV files and the workbook keep them as they are. Tables are built from
``to_dict()`` output (plain dicts), never from fitted objects, so the page, the CSV files and the
JSON cannot disagree.
"""

from __future__ import annotations

from dataclasses import dataclass

from .. import growth_figures as gf
from .. import numformat

# how a column reads (rounded by ``regimetrend.numformat``): text, int, pct (percent), num (plain
# number), pvalue, points (percentage points), stat (a test statistic), date (ISO text; a date
# in the workbook)
KINDS = ("text", "int", "pct", "num", "pvalue", "points", "stat", "date")


@dataclass(frozen=True)
class Column:
    key: str
    heading: str
    kind: str = "num"
    page: bool = True  # shown on the HTML page (CSV and workbook keep every column)


@dataclass(frozen=True)
class Table:
    """A titled table: ``name`` is the file stem and the workbook sheet name."""

    name: str
    title: str
    columns: tuple[Column, ...]
    rows: tuple[dict, ...]
    note: str = ""
    fold_after: int | None = None  # the page shows this many rows, the rest folded away

    def matrix(self) -> list[list]:
        """Header row then raw values, in column order."""
        return [[c.heading for c in self.columns]] + [[row.get(c.key) for c in self.columns]
                                                      for row in self.rows]


def dig(obj, *keys, default=None):
    """``obj[k1][k2]...`` through dicts and lists, or ``default`` when a step is missing."""
    for k in keys:
        if isinstance(obj, dict) and k in obj:
            obj = obj[k]
        elif isinstance(obj, list) and isinstance(k, int) and -len(obj) <= k < len(obj):
            obj = obj[k]
        else:
            return default
    return obj


def _ci(growth: dict, name: str, i: int):
    ci = growth.get(gf.ci95(name)) or [None, None]
    return ci[i]


def _interval_columns(key: str, heading: str, kind: str) -> list[Column]:
    """A figure and its 95% interval ends, each with a heading of its own (unique in a CSV
    header; the HTML page shows the pair as one "95% interval" cell)."""
    return [Column(key, heading, kind), Column(f"{key}_low", f"{heading}, 95% low", kind),
            Column(f"{key}_high", f"{heading}, 95% high", kind)]


def growth_rows(growth: dict) -> Table:
    """Growth by regime (``GrowthTable.to_dict()``), with the change from the regime before.

    Every "%" in the table has one base, the one the growth table's headline states; an annual
    series shows no per-period columns (a period is a year)."""
    shape = growth.get("shape", "linear")
    segments = growth.get("segments", [])
    changes = {c["break"] + 1: c for c in growth.get("changes", [])}
    annual = float(growth.get("periods_per_year") or 0) == 1.0
    cols = [Column("regime", "Regime", "int"), Column("from", "From", "text"),
            Column("to", "To", "text"), Column("periods", "Periods", "int")]
    figures = [] if annual else [(gf.PER_PERIOD_PCT, "Growth per period, %", "pct")]
    figures += [(gf.ANNUALISED_PCT, "Growth a year, %", "pct"),
                (gf.ANNUALISED_UNITS, "Increase a year, units", "num")]
    if shape == "exponential":
        figures.append((gf.DOUBLING_TIME_YEARS, "Doubling time, years", "num"))
    for key, heading, kind in figures:
        cols += _interval_columns(key, heading, kind)
    cols += [Column("change_points", "Change of growth a year from the regime before, points",
                    "points"),
             Column("change_p_value", "p-value, same growth before and after (Wald)",
                    "pvalue")]
    rows = []
    for seg in segments:
        g = seg.get("growth", {})
        row = {"regime": seg.get("index"), "from": seg.get("start_label"),
               "to": seg.get("end_label"), "periods": seg.get("periods")}
        for key, _, _ in figures:
            row[key] = g.get(key)
            row[f"{key}_low"] = _ci(g, key, 0)
            row[f"{key}_high"] = _ci(g, key, 1)
        change = changes.get(seg.get("index"))
        row["change_points"] = change.get(gf.CHANGE_PCT) if change else None
        row["change_p_value"] = change.get("p_value") if change else None
        rows.append(row)
    note = (f"Every % here: {growth.get('headline', 'annualised growth')}. "
            f"Intervals: {growth.get('intervals', '')}; covariance: "
            f"{growth.get('covariance', '')}.")
    return Table("growth_by_regime", "Growth by regime", tuple(cols), tuple(rows), note)


LEADING = 5  # candidates shown before the rest of the ranking is folded away


CHOSEN = "chosen"  # the ranking row of the verdict's model


def ranking_rows(evaluation: dict, names: dict | None = None) -> Table:
    """The candidate ranking (``Evaluation.to_dict()['candidates']``); ``names`` maps each
    candidate's key to the words a manager reads. The rank orders by rolling-origin RMSE only;
    the row of the verdict's model (the evaluation's ``recommended``, set from the verdict) is
    marked "chosen", and when it does not rank first the note says why. The page shows the
    leading candidates and folds the rest; the CSV and the workbook keep every row."""
    chosen = dig(evaluation, "recommended", "name")
    names = names or {}
    cols = (Column("rank", "Rank by RMSE", "int"), Column("candidate", "Candidate", "text"),
            Column("chosen", "Verdict", "text"), Column("rmse", "RMSE", "num"),
            Column("mae", "MAE", "num"), Column("mape", "MAPE, %", "pct"),
            Column("mase", "MASE", "num"), Column("coverage95", "95% interval coverage, %", "pct"),
            Column("gain_pct", "RMSE gain over global, %", "pct"),
            Column("dm_p_value", "p-value, beats global (DM)", "pvalue"),
            Column("key", "Name in report.json", "text", page=False))
    rows = []
    for c in evaluation.get("candidates", []):
        m = c.get("metrics", {})
        gain = c.get("gain_over_global")
        cov = m.get("coverage95")
        vs = c.get("vs_global") or {}
        p = vs.get("p_value_better", vs.get("p_value"))
        rows.append({"rank": c.get("rank"), "candidate": names.get(c.get("name"), c.get("name")),
                     "chosen": CHOSEN if c.get("name") == chosen else "",
                     "rmse": m.get("rmse"), "mae": m.get("mae"), "mape": m.get("mape"),
                     "mase": m.get("mase"), "coverage95": None if cov is None else 100.0 * cov,
                     "gain_pct": None if gain is None else 100.0 * gain, "dm_p_value": p,
                     "key": c.get("name")})
    note = "Rolling-origin forecasts, errors in original units; lower is better for RMSE, MAE, " \
           "MAPE and MASE. RMSE gain: how much lower the RMSE is than the global trend's, as % " \
           "of the global trend's RMSE. p-value: one-sided Diebold-Mariano test (with the " \
           "Harvey-Leybourne-Newbold correction) that the candidate forecasts better than the " \
           "global trend."
    rank = next((r["rank"] for r in rows if r["chosen"]), None)
    if rank is not None and rank != 1:
        note += (f" The rank orders by RMSE alone; the chosen model (rank {rank}) is the "
                 "verdict's: its rule keeps one trend over all history, or the model using "
                 "fewer breaks or trend terms, unless a test or a large gain backs a more accurate one, "
                 "and weighs a break-aware candidate only under the shape its breaks were "
                 "searched with.")
    if evaluation.get("optimistic_note"):
        note += " " + str(evaluation["optimistic_note"]).capitalize() + "."
    return Table("candidate_ranking", "Candidate ranking", cols, tuple(rows), note,
                 fold_after=LEADING)


def forecast_rows(forecast: dict, title: str = "Forecast with intervals") -> Table:
    """The forecast (``Forecast.to_dict()``) with 80% and 95% intervals."""
    cols = (Column("label", "Period", "text"), Column("date", "Period start", "date", page=False),
            Column("mean", "Forecast (mean)", "num"), Column("median", "Median", "num"),
            Column("lower80", "80% low", "num"), Column("upper80", "80% high", "num"),
            Column("lower95", "95% low", "num"), Column("upper95", "95% high", "num"))
    rows = tuple(dict(r) for r in forecast.get("rows", []))
    note = f"Model: {forecast.get('model', '')}."
    return Table("forecast", title, cols, rows, note)


def break_rows(breaks: dict, series_labels: dict | None = None) -> Table:
    """The breaks found (``BreakSet.to_dict()``): date, its 95% interval, and one F statistic
    per break: the partial F of that break given the others (the sup-F tests that decide how
    many breaks there are are reported with the summary)."""
    cols = (Column("break", "Break", "int"), Column("label", "First period of new regime", "text"),
            Column("date", "Start date of new regime", "date", page=False),
            Column("low", "95% interval, from", "text"),
            Column("high", "95% interval, to", "text"),
            Column("f_statistic", "F, this break given the others", "stat"))
    rows = []
    given = isinstance(breaks, dict) and bool(breaks.get("dates_given"))
    for i, b in enumerate(breaks.get("breaks", []) if isinstance(breaks, dict) else []):
        ci = (["not applicable (date given)"] * 2 if given
              else b.get("ci95_labels") or b.get("ci95") or [None, None])
        rows.append({"break": i + 1, "label": b.get("label") or b.get("date"),
                     "date": b.get("date"), "low": ci[0], "high": ci[1],
                     "f_statistic": b.get("f_statistic")})
    note = ("F: the partial F statistic of the break given the other breaks, scaled to "
            "allow for autocorrelated errors when the analysis does.")
    if given:
        return Table("breaks", "Breaks at the dates the analyst gave", cols, tuple(rows),
                     note + " The dates were given by the analyst, not found by a search, so "
                            "no date interval applies and F is read on the F law.")
    return Table("breaks", "Breaks found", cols, tuple(rows), note)


# Excel number formats by column kind (the workbook keeps full precision; these set how a cell
# shows it)
EXCEL_FORMATS = {"int": "#,##0", "num": "#,##0.00", "pct": "0.00", "points": "+0.00;-0.00;0",
                 "pvalue": "0.000", "stat": "0.00", "date": "yyyy-mm-dd"}


def excel_value(value, kind: str):
    """A cell value for the workbook: dates (ISO text) as dates, others as they are."""
    if kind == "date" and isinstance(value, str):
        from datetime import date

        try:
            return date.fromisoformat(value[:10])
        except ValueError:
            return value
    return value


def fmt(value, kind: str) -> str:
    """A value rounded for reading (the HTML page) by the rule of ``regimetrend.numformat``;
    an en dash for missing values."""
    if value is None:
        return numformat.MISSING
    if kind in ("text", "date") or isinstance(value, str):
        return str(value)
    if kind == "int":
        return numformat.count(value)
    if kind == "pct":
        return numformat.percent(value, symbol=False)
    if kind == "points":
        return numformat.points(value)
    if kind == "pvalue":
        return numformat.pvalue(value)
    if kind == "stat":
        return numformat.statistic(value)
    return numformat.number(value)


def num(v: float) -> str:
    """A plain number by the report's one rounding rule (``regimetrend.numformat.number``)."""
    return numformat.number(v)
