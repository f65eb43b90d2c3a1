"""Intake of odd inputs: each gets the right series or one line naming what is wrong.

Outside checks, named beside each test: pyarrow's own reading of the Parquet dates, pandas'
``read_csv`` on the same bytes (encodings, CR line ends), Python's ``decimal`` and ``csv``
modules.
"""

from __future__ import annotations

import datetime as dt
import os
import pathlib
import subprocess
import sys
from decimal import Decimal

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from regimetrend.errors import InputError
from regimetrend.intake import load_series


def years(first, n):
    return [dt.date(first + k, 1, 1) for k in range(n)]


# ------------------------------------------------------------------------------------------
# dates outside pandas' nanosecond range (1677-2262)
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("first", [2300, 1500])
@pytest.mark.parametrize("arrow_type", [pa.timestamp("us"), pa.timestamp("ms"), pa.date32()])
def test_parquet_dates_outside_the_nanosecond_range(tmp_path, first, arrow_type):
    # outside check: pyarrow's own reading of the same column
    stamps = [dt.datetime(d.year, 1, 1) for d in years(first, 6)]
    column = pa.array(stamps if arrow_type != pa.date32() else [s.date() for s in stamps],
                      arrow_type)
    path = tmp_path / "far.parquet"
    pq.write_table(pa.table({"date": column, "sales": [1.0, 2, 3, 4, 5, 6]}), path)
    series = load_series(path)
    by_arrow = [np.datetime64(v, "D")
                for v in pq.read_table(path).column("date").to_pylist()]
    np.testing.assert_array_equal(series.starts, by_arrow)
    assert str(series.starts[0]) == f"{first}-01-01"
    assert series.frequency.unit == "year"


def test_pandas_series_with_second_resolution_dates_past_2262():
    index = pd.DatetimeIndex(np.array([f"{y}-01-01" for y in range(2300, 2306)],
                                      dtype="datetime64[s]"))
    series = load_series(pd.Series(np.arange(6.0) + 1, index=index, name="sales"))
    np.testing.assert_array_equal(series.starts, index.values.astype("datetime64[D]"))
    assert series.frequency.unit == "year"


def test_period_index_far_in_the_future():
    index = pd.period_range("9990Q1", periods=8, freq="Q")
    series = load_series(pd.Series(np.arange(8.0) + 1, index=index))
    assert str(series.starts[0]) == "9990-01-01" and series.frequency.unit == "quarter"


# ------------------------------------------------------------------------------------------
# pd.NA and Decimal
# ------------------------------------------------------------------------------------------

def test_decimal_values_are_numbers():
    # outside check: Python's decimal module's own float conversion
    cells = [Decimal("1.10"), Decimal("2.205"), Decimal(3), Decimal("-4.5e1")]
    frame = pd.DataFrame({"date": pd.date_range("2020-01-01", periods=4, freq="MS"),
                          "sales": cells})
    np.testing.assert_array_equal(load_series(frame).values, [float(c) for c in cells])


def test_pd_na_is_missing_and_fill_missing_fills_it():
    frame = pd.DataFrame({"date": pd.date_range("2020-01-01", periods=5, freq="MS"),
                          "sales": pd.array([1.0, 2.0, pd.NA, 4.0, 5.0], dtype=object)})
    with pytest.raises(InputError, match=r"row 4, column 'sales': the value is missing"):
        load_series(frame)
    series = load_series(frame, fill_missing=True)
    np.testing.assert_array_equal(series.values, [1, 2, 3, 4, 5])
    assert "filled 1 missing value" in series.notes[0]


def test_nullable_integer_column_with_pd_na():
    frame = pd.DataFrame({"date": pd.date_range("2020-01-01", periods=4, freq="MS"),
                          "sales": pd.array([1, None, 3, 4], dtype="Int64")})
    np.testing.assert_array_equal(load_series(frame, fill_missing=True).values, [1, 2, 3, 4])


def test_parquet_decimal_column(tmp_path):
    # outside check: pyarrow's decimal128 type, read back through pandas as Decimal objects
    path = tmp_path / "money.parquet"
    amounts = [Decimal("10.25"), Decimal("11.50"), None, Decimal("13.75")]
    pq.write_table(pa.table({"date": pa.array(years(2000, 4), pa.date32()),
                             "amount": pa.array(amounts, pa.decimal128(9, 2))}), path)
    series = load_series(path, fill_missing=True)
    np.testing.assert_allclose(series.values, [10.25, 11.5, 12.625, 13.75])


def test_missing_date_as_pd_na_names_the_row():
    frame = pd.DataFrame({"date": ["2020-01", pd.NA, "2020-03"], "sales": [1.0, 2.0, 3.0]})
    with pytest.raises(InputError, match=r"row 3, column 'date': the date is missing"):
        load_series(frame)


# ------------------------------------------------------------------------------------------
# encodings and line ends
# ------------------------------------------------------------------------------------------

TEXT = "Datum,Umsatz €\n2019-01,1\n2019-02,2\n2019-03,3\n"


@pytest.mark.parametrize("encoding", ["utf-16", "utf-16-le", "utf-16-be", "utf-32", "utf-8-sig"])
def test_unicode_encodings_are_read(tmp_path, encoding):
    # outside check: pandas.read_csv with the encoding named gives the same column names
    path = tmp_path / "sales.csv"
    path.write_bytes(TEXT.encode(encoding))
    series = load_series(path)
    reference = "utf-16-le" if encoding == "utf-16-le" else \
        "utf-16-be" if encoding == "utf-16-be" else encoding
    assert series.name == pd.read_csv(path, encoding=reference).columns[1] == "Umsatz €"
    np.testing.assert_array_equal(series.values, [1, 2, 3])


def test_binary_bytes_in_a_csv_are_named(tmp_path):
    path = tmp_path / "sales.csv"
    path.write_bytes(b"PK\x03\x04\x14\x00\x06\x00\x08\x00" + bytes(range(256)) * 4)
    with pytest.raises(InputError, match=r"'sales.csv' holds zero bytes, so it is not plain text"):
        load_series(path)


def test_utf16_bom_with_broken_text_names_the_encoding(tmp_path):
    path = tmp_path / "sales.csv"
    path.write_bytes(b"\xff\xfe" + "date,sales\n".encode("utf-16-le") + b"\x00\xd8")
    with pytest.raises(InputError, match=r"starts like UTF-16 text"):
        load_series(path)


@pytest.mark.parametrize("ending", ["\r", "\r\n", "\n"])
def test_line_endings(tmp_path, ending):
    # outside check: pandas.read_csv reads the same bytes to the same values
    path = tmp_path / "sales.csv"
    path.write_bytes(ending.join(["date,sales", "2019,1", "", "2020,2", "2021,3", ""]).encode())
    series = load_series(path)
    np.testing.assert_array_equal(series.values, pd.read_csv(path)["sales"].to_numpy())


def test_cr_only_file_names_the_editor_row(tmp_path):
    path = tmp_path / "sales.csv"
    path.write_bytes(b"date,sales\r2019,1\r2020,x\r2021,3\r")
    with pytest.raises(InputError, match=r"row 3, column 'sales': cannot read 'x'"):
        load_series(path)


# ------------------------------------------------------------------------------------------
# quotes
# ------------------------------------------------------------------------------------------

def test_unterminated_quote_names_its_line(tmp_path):
    # Python's csv module reads the rest of the file into one value (csv.reader, strict off)
    path = tmp_path / "sales.csv"
    path.write_text('date,sales\n2019,1\n2020,"2\n2021,3\n2022,4\n2023,5\n')
    with pytest.raises(InputError, match=r"'sales.csv' line 3: a quote \(\"\) opened on this "
                                         r"line is never closed"):
        load_series(path)


def test_quoted_value_over_several_lines_names_them(tmp_path):
    path = tmp_path / "sales.csv"
    path.write_text('date,sales\n2019,1\n2020,"2\n2021,3"\n2022,4\n2023,5\n')
    with pytest.raises(InputError, match=r"line 3: a quoted value runs from line 3 to line 4"):
        load_series(path)


def test_quoted_fields_on_one_line_are_fine(tmp_path):
    path = tmp_path / "sales.csv"
    path.write_text('"date","sales"\n"2019","1"\n"2020","2"\n"2021","3"\n')
    np.testing.assert_array_equal(load_series(path).values, [1, 2, 3])


# ------------------------------------------------------------------------------------------
# paths that are not regular files
# ------------------------------------------------------------------------------------------

def test_folder_is_named_a_folder(tmp_path):
    folder = tmp_path / "data.csv"
    folder.mkdir()
    with pytest.raises(InputError, match=r"data.csv is a folder, not a file"):
        load_series(folder)


def test_dev_null_is_a_device():
    if not os.path.exists("/dev/null"):
        pytest.skip("no /dev/null here")
    with pytest.raises(InputError, match=r"/dev/null is a character device, not a regular file"):
        load_series("/dev/null")


def test_fifo_is_refused_without_waiting_for_a_writer(tmp_path):
    if not hasattr(os, "mkfifo"):
        pytest.skip("no named pipes here")
    fifo = tmp_path / "feed.csv"
    os.mkfifo(fifo)
    code = ("from regimetrend.intake import load_series\n"
            "from regimetrend.errors import InputError\n"
            f"try:\n    load_series({str(fifo)!r})\n"
            "except InputError as e:\n    print(e)\n")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          timeout=60, check=False)
    assert "feed.csv is a named pipe (FIFO), not a regular file" in done.stdout


def test_missing_file_and_missing_folder(tmp_path):
    with pytest.raises(InputError, match=r"file not found: .*nothing.csv"):
        load_series(tmp_path / "nothing.csv")
    afile = tmp_path / "plain.txt"
    afile.write_text("x")
    with pytest.raises(InputError, match=r"file not found"):
        load_series(afile / "inside.csv")


def test_unreadable_file_is_one_line(tmp_path, monkeypatch):
    path = tmp_path / "locked.csv"
    path.write_text("date,sales\n2019,1\n2020,2\n2021,3\n")
    real_open = pathlib.Path.open

    def refuse(self, *args, **kwargs):
        if self.name == "locked.csv":
            raise PermissionError(13, "Permission denied", str(self))
        return real_open(self, *args, **kwargs)

    monkeypatch.setattr(pathlib.Path, "open", refuse)
    with pytest.raises(InputError, match=r"cannot read .*locked.csv: permission denied"):
        load_series(path)


@pytest.mark.skipif(not hasattr(os, "geteuid") or os.geteuid() == 0,
                    reason="file modes do not stop root")
def test_unreadable_file_by_its_mode(tmp_path):
    path = tmp_path / "locked.csv"
    path.write_text("date,sales\n2019,1\n2020,2\n2021,3\n")
    path.chmod(0)
    try:
        with pytest.raises(InputError, match=r"permission denied"):
            load_series(path)
    finally:
        path.chmod(0o644)


# ------------------------------------------------------------------------------------------
# messages
# ------------------------------------------------------------------------------------------

def test_only_a_date_column(tmp_path):
    path = tmp_path / "dates.csv"
    path.write_text("date\n2019\n2020\n2021\n")
    with pytest.raises(InputError) as caught:
        load_series(path)
    message = str(caught.value)
    assert "only the date column 'date'" in message
    assert "(columns )" not in message


def test_no_message_lists_an_empty_set_of_columns(tmp_path):
    path = tmp_path / "words.csv"
    path.write_text("note,comment\nalpha,beta\ngamma,delta\nepsilon,zeta\n")
    with pytest.raises(InputError, match=r"no date column found .*\(columns 'note', 'comment'\)"):
        load_series(path)


# ------------------------------------------------------------------------------------------
# start-up cost
# ------------------------------------------------------------------------------------------

def test_importing_intake_loads_no_plotting_modelling_or_excel_library():
    code = ("import sys, regimetrend.intake\n"
            "heavy = sorted(m for m in sys.modules if m.split('.')[0] in "
            "{'matplotlib', 'statsmodels', 'openpyxl', 'sklearn', 'ruptures'})\n"
            "print(heavy)\n")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          timeout=120, check=True)
    assert done.stdout.strip() == "[]"


def test_complex_values_are_refused_not_cut_to_their_real_part():
    frame = pd.DataFrame({"date": pd.date_range("2020-01-01", periods=3, freq="MS"),
                          "sales": np.array([1 + 0j, 2 + 1j, 3 + 0j])})
    with pytest.raises(InputError, match=r"row 2, column 'sales': cannot read '\(1\+0j\)'"):
        load_series(frame)


def test_dates_past_year_9999_are_refused_naming_the_row():
    index = pd.DatetimeIndex(np.array(["9998-01-01", "9999-01-01", "10000-01-01"],
                                      dtype="datetime64[s]"))
    with pytest.raises(InputError, match=r"row 4, column 'date': 10000-01-01 is outside"):
        load_series(pd.Series([1.0, 2.0, 3.0], index=index))
