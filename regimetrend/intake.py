"""Intake: turn an analyst's file or pandas object into a validated, regular ``Series``.

What intake does, in order:

1. read the raw cells (CSV/TXT, Excel .xlsx, Parquet, or a pandas Series/DataFrame) without
   letting any reader guess at types, so every cell keeps the row number it had in the file;
2. find the date column and the value column (or take the ones the caller names);
3. read each date into the start of its period and each value into a float;
4. put the rows in date order, find the calendar (annual ... daily, or a regular multiple),
   and check that the calendar has no duplicates and no holes;
5. fill missing values by linear interpolation only when asked to.

Anything wrong with the input raises ``InputError`` with one line that names the row, the column
or the option to use. Intake never prints, never models and never writes to the input.

Row numbers
-----------
A row number in a message is the row as the analyst sees it in a spreadsheet or text editor: the
header line is row 1 and the first data row is row 2. For CSV and Excel files it is the actual line
or sheet row (blank lines count, exactly as the editor shows them). Parquet files and pandas objects
have no lines, so they are numbered as if written out with a header line: the first data row is
row 2, the n-th data row is row n + 1.

Percent signs
-------------
A value such as ``12%`` is rejected rather than read: it could mean 12 or 0.12, and a growth model
fitted on the wrong scale gives wrong growth figures without any warning. The message asks the
analyst to write the number without the sign, in the scale they mean.

Day and month order
-------------------
Dates such as ``03/04/2019`` are rejected: whether that is March or April depends on the country
of the file's author. ISO dates (``2019-04-03``), ``07/2019`` and ``2019/07`` are read.
"""

from __future__ import annotations

import csv
import datetime as _dt
import io
import math
import os
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from .errors import InputError
from .series import Frequency, Series

__all__ = ["load_series", "parse_frequency", "require_points", "require_positive",
           "SUPPORTED_EXTENSIONS", "FREQUENCY_WORDS"]

SUPPORTED_EXTENSIONS = (".csv", ".txt", ".xlsx", ".parquet")

MIN_POINTS = 3  # fewer points cannot show a trend at all

# words accepted by --frequency, each mapped to (unit, step)
FREQUENCY_WORDS = {
    "annual": ("year", 1), "annually": ("year", 1), "yearly": ("year", 1), "year": ("year", 1),
    "quarterly": ("quarter", 1), "quarter": ("quarter", 1),
    "monthly": ("month", 1), "month": ("month", 1),
    "weekly": ("week", 1), "week": ("week", 1),
    "daily": ("day", 1), "day": ("day", 1),
    "biweekly": ("week", 2), "fortnightly": ("week", 2),
    "semiannual": ("month", 6), "half-yearly": ("month", 6),
}
_UNIT_WORDS = {"year": "year", "years": "year", "quarter": "quarter", "quarters": "quarter",
               "month": "month", "months": "month", "week": "week", "weeks": "week",
               "day": "day", "days": "day"}
_MONTHS_PER_UNIT = {"year": 12, "quarter": 3, "month": 1}
_DAYS_PER_UNIT = {"week": 7, "day": 1}

_MISSING_WORDS = {"", "na", "n/a", "nan", "null", "none", "-", "--", "\u2014", ".", "#n/a"}
_INDEX_NAMES = re.compile(r"^(unnamed: ?\d+|column \d+|rownames|index|row|#)$", re.IGNORECASE)
_DATE_WORDS = re.compile(r"date|time|period|year|month|quarter|week|day|\bdt\b", re.IGNORECASE)
_GENERIC_VALUE_NAMES = {"value", "values", "y", "v", "amount"}
_DETECT_SAMPLE = 500  # cells looked at to recognise a column; parsing then reads every cell
_ISO_DAY = re.compile(r"\d{4}-\d{2}-\d{2}")
_DATE_FORMS_HELP = ("2019, 2019-07, 2019-07-01, 2019Q3, 2019-Q3, Q3 2019, 07/2019, 2019/07, "
                    "2019-W27, Jul 2019, 2019-07-01 12:00")


# --------------------------------------------------------------------------------------------
# public API
# --------------------------------------------------------------------------------------------

def load_series(source, *, date_column=None, value_column=None, frequency=None, decimal=".",
                fill_missing=False, name=None, sheet=None) -> Series:
    """Read one series from a file or pandas object and return it validated and regular.

    ``source`` is a path to a .csv/.txt, .xlsx or .parquet file, a pandas Series (dates in the
    index) or a pandas DataFrame (dates in a column or in a DatetimeIndex/PeriodIndex).
    ``date_column``/``value_column`` name the columns when there is no single obvious pair.
    ``frequency`` overrides the inferred calendar (plain words: see ``parse_frequency``).
    ``decimal`` is the decimal mark in text values ("." or ","). ``fill_missing`` fills missing
    values and missing periods by linear interpolation on the calendar and says so in the notes.
    ``name`` defaults to the value column's name (or the Series' name, or the file's stem when the
    column name says nothing, like ``value``). ``sheet`` picks an Excel sheet by name or by
    0-based position (digits that name no sheet count as a position); default the first sheet.
    See the module docstring for the row-number convention used in messages.
    """
    if decimal not in (".", ","):
        raise InputError(f"--decimal {decimal!r} is not supported; use '.' or ','")
    wanted = _frequency_option(frequency)
    table = _read_source(source, sheet=sheet, decimal=decimal)
    if not table.rows.size:
        raise InputError(f"{table.label} has no data rows")
    dcol = _choose_date_column(table, date_column, decimal)
    vcol = _choose_value_column(table, dcol, value_column, decimal)
    rows = table.rows
    starts, hint = _parse_dates(table.cells[dcol], rows, dcol, decimal)
    values = _parse_values(table.cells[vcol], rows, vcol, decimal)
    if len(rows) < MIN_POINTS:
        raise InputError(f"{table.label} has {len(rows)} data rows; at least {MIN_POINTS} "
                         f"dated values are needed to see a trend")

    notes: list[str] = []
    order = np.argsort(starts, kind="stable")
    if np.any(np.diff(starts) < np.timedelta64(0, "D")):
        i = int(np.flatnonzero(np.diff(starts) < np.timedelta64(0, "D"))[0]) + 1
        notes.append(f"dates were out of order (first at row {rows[i]}: {starts[i]} comes after "
                     f"{starts[i - 1]}); rows were sorted by date")
    starts, values, rows = starts[order], values[order], rows[order]
    _reject_duplicates(starts, rows, dcol, "have the same date")

    freq = wanted if wanted is not None else _infer_frequency(starts, rows, hint, dcol)
    if freq.unit == "week":
        freq = Frequency("week", freq.step, int(pd.Timestamp(starts[0]).day_of_week))
    aligned = _period_starts(starts, freq.unit)
    moved = int(np.sum(aligned != starts))
    if moved:
        notes.append(f"{moved} dates inside a period were moved to the start of their "
                     f"{freq.unit} (first at row {rows[np.flatnonzero(aligned != starts)[0]]})")
    _reject_duplicates(aligned, rows, dcol, f"fall in the same {freq.unit}")
    positions = _calendar_positions(aligned, rows, freq, dcol)

    series_name = _series_name(name, table, vcol)
    observed = int(np.sum(~np.isnan(values)))
    if observed < MIN_POINTS:
        raise InputError(f"column {vcol!r} has {observed} values; at least {MIN_POINTS} are "
                         f"needed to see a trend")
    full_starts, full_values, fill_note = _complete_calendar(
        aligned, values, rows, positions, freq, vcol, fill_missing)
    if fill_note:
        notes.append(fill_note)
    return Series(series_name, full_starts, full_values, freq, tuple(notes))


def parse_frequency(text) -> Frequency:
    """Read a plain-word frequency: ``monthly``, ``quarterly``, ``2 weeks``, ``every 10 years``.

    Accepts the words in ``FREQUENCY_WORDS`` and ``[every] N unit(s)`` with unit one of year,
    quarter, month, week, day. A ``Frequency`` passes through unchanged.
    """
    if isinstance(text, Frequency):
        return text
    words = " ".join(str(text).strip().lower().replace("_", " ").split())
    if words in FREQUENCY_WORDS:
        return Frequency(*FREQUENCY_WORDS[words])
    m = re.fullmatch(r"(?:every\s+)?(\d+)\s*-?\s*([a-z]+)", words)
    if m and m.group(2) in _UNIT_WORDS and int(m.group(1)) >= 1:
        return Frequency(_UNIT_WORDS[m.group(2)], int(m.group(1)))
    m = re.fullmatch(r"every\s+([a-z]+)", words)
    if m and m.group(1) in _UNIT_WORDS:
        return Frequency(_UNIT_WORDS[m.group(1)], 1)
    raise InputError(f"--frequency {str(text)!r} is not understood; use annual, quarterly, "
                     f"monthly, weekly or daily, or a multiple such as '2 weeks' or '10 years'")


def require_points(series: Series, minimum: int, what: str) -> None:
    """Raise InputError unless ``series`` has at least ``minimum`` points for ``what``.

    Example message: "series 'sales' has 7 points; the quadratic trend with monthly dummies
    needs at least 15".
    """
    if series.n < minimum:
        raise InputError(f"series {series.name!r} has {series.n} points; {what} needs at least "
                         f"{minimum}")


def require_positive(series: Series, what: str) -> None:
    """Raise InputError at the first period whose value is zero or negative (logs need > 0).

    The ``Series`` keeps no file rows, so the message names the period (as the file writes it)
    and its position in the series.
    """
    bad = np.flatnonzero(~(series.values > 0))
    if bad.size:
        i = int(bad[0])
        raise InputError(f"{what} needs values above zero, but series {series.name!r} has "
                         f"{series.values[i]:g} at {series.label(i)} (point {i + 1} of "
                         f"{series.n}; {bad.size} such value{'s' if bad.size != 1 else ''} in all)")


# --------------------------------------------------------------------------------------------
# reading raw cells
# --------------------------------------------------------------------------------------------

@dataclass
class _Table:
    """Raw cells by column (lists of Python objects or numpy arrays) and their row numbers."""

    label: str  # how messages refer to the source
    columns: list[str]
    cells: dict
    rows: np.ndarray  # int row number of each data row (module docstring convention)
    stem: str | None = None  # file stem, for the default name


def _read_source(source, *, sheet, decimal) -> _Table:
    if isinstance(source, pd.Series):
        return _table_from_pandas_series(source)
    if isinstance(source, pd.DataFrame):
        return _table_from_frame(source, "the DataFrame")
    if isinstance(source, (str, os.PathLike)):
        return _read_file(Path(source), sheet=sheet, decimal=decimal)
    raise InputError(f"cannot read a {type(source).__name__}; give a file path, a pandas Series "
                     f"or a pandas DataFrame")


def _read_file(path: Path, *, sheet, decimal) -> _Table:
    if not path.is_file():
        raise InputError(f"file not found: {path}")
    ext = path.suffix.lower()
    if ext not in SUPPORTED_EXTENSIONS:
        raise InputError(f"cannot read {path.name!r}: supported file types are "
                         f"{', '.join(SUPPORTED_EXTENSIONS)}")
    if path.stat().st_size == 0:
        raise InputError(f"file {path.name!r} is empty")
    if sheet is not None and ext != ".xlsx":
        raise InputError(f"option --sheet: {path.name!r} is not an Excel workbook, so it has "
                         f"no sheets")
    if ext in (".csv", ".txt"):
        table = _read_text(path, decimal)
    elif ext == ".xlsx":
        table = _read_excel(path, sheet)
    else:
        table = _read_parquet(path)
    table.stem = path.stem
    return table


def _read_text(path: Path, decimal: str) -> _Table:
    """Read a delimited text file as strings, keeping each record's line number."""
    raw = path.read_bytes()
    for encoding in ("utf-8-sig", "cp1252", "latin-1"):
        try:
            text = raw.decode(encoding)
            break
        except UnicodeDecodeError:
            continue
    if not text.strip():
        raise InputError(f"file {path.name!r} is empty")
    delimiter = _guess_delimiter(text, decimal)
    records: list[tuple[int, list[str]]] = []
    reader = csv.reader(io.StringIO(text), delimiter=delimiter)
    end_of_previous = 0
    try:
        for fields in reader:
            line = end_of_previous + 1
            end_of_previous = reader.line_num
            stripped = [f.strip() for f in fields]
            if any(stripped):
                records.append((line, stripped))
    except csv.Error as exc:
        raise InputError(f"{path.name!r} line {end_of_previous + 1}: cannot read the text "
                         f"({exc})") from None
    return _table_from_records(records, f"file {path.name!r}", sep_hint=delimiter)


def _guess_delimiter(text: str, decimal: str) -> str:
    """The first separator that splits every sampled line into the same number (>1) of fields."""
    candidates = [";", "\t", "|", ","] if decimal == "," else [",", ";", "\t", "|"]
    sample = "\n".join(text.splitlines()[:200])
    best, best_width = candidates[0], 1
    for sep in candidates:
        try:
            widths = [len(r) for r in csv.reader(io.StringIO(sample), delimiter=sep) if r]
        except csv.Error:
            continue
        if widths and min(widths) == max(widths) > 1:
            return sep
        common = max(set(widths), key=widths.count) if widths else 1
        if common > best_width:
            best, best_width = sep, common
    return best


def _read_excel(path: Path, sheet) -> _Table:
    import openpyxl

    try:
        book = openpyxl.load_workbook(path, read_only=True, data_only=True)
    except Exception as exc:  # any reader failure is a bad file for the analyst
        raise InputError(f"cannot read {path.name!r} as an Excel workbook ({type(exc).__name__}); "
                         f"supported file types are {', '.join(SUPPORTED_EXTENSIONS)}") from None
    try:
        names = book.sheetnames
        if isinstance(sheet, str) and sheet not in names and sheet.strip().isdigit():
            sheet = int(sheet)
        if sheet is None:
            ws = book[names[0]]
        elif isinstance(sheet, int) and 0 <= sheet < len(names):
            ws = book[names[sheet]]
        elif isinstance(sheet, str) and sheet in names:
            ws = book[sheet]
        else:
            raise InputError(f"sheet {sheet!r} not found in {path.name!r}; its sheets are "
                             f"{', '.join(names)}")
        records = []
        for number, cells in enumerate(ws.iter_rows(min_row=1, values_only=True), start=1):
            cells = ["" if c is None else (c.strip() if isinstance(c, str) else c) for c in cells]
            if any(c != "" for c in cells):
                records.append((number, cells))
    finally:
        book.close()
    return _table_from_records(records, f"file {path.name!r}")


def _read_parquet(path: Path) -> _Table:
    try:
        frame = pd.read_parquet(path)
    except Exception as exc:
        raise InputError(f"cannot read {path.name!r} as a Parquet file ({type(exc).__name__}); "
                         f"supported file types are {', '.join(SUPPORTED_EXTENSIONS)}") from None
    return _table_from_frame(frame, f"file {path.name!r}")


def _table_from_records(records, label, sep_hint=None) -> _Table:
    """Build a table from (row number, cells) records; the first record is the header if it
    holds text that is neither a number nor a date."""
    if not records:
        raise InputError(f"{label} is empty")
    header_line, first = records[0]
    has_header = any(isinstance(c, str) and c != "" and not _is_data_cell(c) for c in first)
    if has_header:
        names = _unique_names(first)
        body = records[1:]
    else:
        names = [f"column {k + 1}" for k in range(len(first))]
        body = records
    cols = {n: [] for n in names}
    for line, cells in body:
        if len(cells) > len(names):
            extra = cells[len(names):]
            if any(c != "" for c in extra):
                where = f" (separator {sep_hint!r})" if sep_hint else ""
                head = "the header" if has_header else "the first row"
                raise InputError(f"row {line} has {len(cells)} fields but {head} has "
                                 f"{len(names)}{where}; quote values that contain the separator")
        for k, n in enumerate(names):
            cols[n].append(cells[k] if k < len(cells) else "")
    rows = np.array([line for line, _ in body], dtype=int)
    return _Table(label, names, cols, rows)


def _unique_names(raw) -> list[str]:
    names, seen = [], {}
    for k, name in enumerate(raw):
        name = str(name).strip() if name not in (None, "") else f"column {k + 1}"
        if name in seen:
            seen[name] += 1
            name = f"{name} ({seen[name]})"
        else:
            seen[name] = 1
        names.append(name)
    return names


def _table_from_frame(frame: pd.DataFrame, label: str) -> _Table:
    if isinstance(frame.index, pd.MultiIndex) or isinstance(frame.columns, pd.MultiIndex):
        raise InputError(f"{label} has multi-level labels; pass one series with a single date "
                         f"index or a date column")
    if not isinstance(frame.index, pd.RangeIndex):  # dates kept in the index become a column
        index_name = str(frame.index.name) if frame.index.name is not None else "date"
        if index_name in frame.columns:
            index_name = f"{index_name} (index)"
        frame = frame.reset_index(names=index_name)
    names = _unique_names(list(frame.columns))
    cells = {n: _column_cells(frame.iloc[:, k]) for k, n in enumerate(names)}
    rows = np.arange(2, len(frame) + 2, dtype=int)
    return _Table(label, names, cells, rows)


def _table_from_pandas_series(series: pd.Series) -> _Table:
    index_name = series.index.name if series.index.name is not None else "date"
    value_name = series.name if series.name is not None else "value"
    if str(value_name) == str(index_name):
        value_name = f"{value_name} (values)"
    frame = pd.DataFrame({str(index_name): series.index, str(value_name): series.to_numpy()})
    table = _table_from_frame(frame, "the Series")
    table.stem = None
    return table


def _column_cells(column: pd.Series):
    """Numeric and datetime columns stay numpy arrays (fast paths); others become lists."""
    if pd.api.types.is_datetime64_any_dtype(column.dtype):
        if getattr(column.dt, "tz", None) is not None:
            column = column.dt.tz_localize(None)
        return column.to_numpy(dtype="datetime64[ns]")
    if pd.api.types.is_bool_dtype(column.dtype):
        return column.tolist()
    if pd.api.types.is_numeric_dtype(column.dtype):
        return column.to_numpy(dtype=float, na_value=np.nan)
    return column.tolist()


# --------------------------------------------------------------------------------------------
# choosing the columns
# --------------------------------------------------------------------------------------------

def _find_column(table: _Table, wanted, option: str) -> str:
    if wanted in table.columns:
        return wanted
    folded = {c.strip().lower(): c for c in table.columns}
    key = str(wanted).strip().lower()
    if key in folded:
        return folded[key]
    raise InputError(f"{option} {wanted!r} not found in {table.label}; its columns are "
                     f"{_list(table.columns)}")


def _choose_date_column(table: _Table, date_column, decimal) -> str:
    if date_column is not None:
        return _find_column(table, date_column, "--date-column")
    usable = [c for c in table.columns if not _is_row_index(c, table.cells[c])]
    forms = [c for c in usable if _is_date_form_column(table.cells[c])]
    if len(forms) == 1:
        return forms[0]
    if len(forms) > 1:
        return _prefer_named(forms, table, "several columns hold dates")
    years = [c for c in usable if _is_year_number_column(table.cells[c], decimal)]
    if len(years) == 1:
        return years[0]
    if len(years) > 1:
        named = [c for c in years if _DATE_WORDS.search(c)]
        if len(named) == 1:
            return named[0]
        even = [c for c in years if _evenly_spaced(_numbers(table.cells[c], decimal))]
        if len(even) == 1:
            return even[0]
        raise InputError(f"several columns could hold years ({_list(years)}); name the date "
                         f"column with --date-column")
    named = [c for c in usable if _DATE_WORDS.search(c)]
    if len(named) == 1:  # the parser will say which cell is not a date
        return named[0]
    raise InputError(f"no date column found in {table.label} (columns {_list(table.columns)}); "
                     f"name it with --date-column (accepted forms: {_DATE_FORMS_HELP})")


def _prefer_named(candidates, table, what) -> str:
    named = [c for c in candidates if _DATE_WORDS.search(c)]
    if len(named) == 1:
        return named[0]
    raise InputError(f"{what} in {table.label} ({_list(candidates)}); name the date column with "
                     f"--date-column")


def _choose_value_column(table: _Table, dcol: str, value_column, decimal) -> str:
    if value_column is not None:
        vcol = _find_column(table, value_column, "--value-column")
        if vcol == dcol:
            raise InputError(f"--value-column {value_column!r} is also the date column; name "
                             f"another column")
        return vcol
    others = [c for c in table.columns if c != dcol]
    if len(others) == 1:
        return others[0]
    numeric = [c for c in others if not _is_row_index(c, table.cells[c])
               and _mostly_numeric(table.cells[c], decimal)]
    if len(numeric) == 1:
        return numeric[0]
    if not numeric:
        raise InputError(f"no numeric value column found in {table.label} (columns "
                         f"{_list(others)}); name it with --value-column")
    raise InputError(f"{table.label} has several value columns ({_list(numeric)}); choose one "
                     f"with --value-column")


def _is_row_index(name: str, cells) -> bool:
    """A pandas/R row-number column (unnamed, ``rownames``, ``index``) holding 0..n-1 or 1..n."""
    if not _INDEX_NAMES.match(str(name).strip()):
        return False
    try:
        nums = np.array([float(c) for c in cells])
    except (TypeError, ValueError):
        return False
    return nums.size > 0 and np.array_equal(nums, np.arange(nums.size) + nums[0]) \
        and nums[0] in (0.0, 1.0)


def _is_date_form_column(cells) -> bool:
    """Most sampled non-empty cells are date objects or text date forms other than numbers.

    A majority (not all) is enough so that one mistyped date is reported with its row by the
    parser instead of hiding the column.
    """
    if isinstance(cells, np.ndarray):
        return np.issubdtype(cells.dtype, np.datetime64)
    present = [c for c in cells[:_DETECT_SAMPLE] if not _is_missing(c)]
    dated = 0
    for c in present:
        if isinstance(c, str):
            dated += not _plain_number(c) and _date_from_text(c) is not None
        else:
            dated += isinstance(c, (_dt.date, pd.Period, np.datetime64))
    return bool(present) and dated >= 0.5 * len(present)


def _is_year_number_column(cells, decimal) -> bool:
    nums = _numbers(cells[:_DETECT_SAMPLE], decimal)
    if nums is None or nums.size == 0 or np.any(np.isnan(nums)):
        return False
    if np.any((nums < 1000) | (nums >= 3000)):
        return False
    return _decimal_year_unit(nums) is not None


def _numbers(cells, decimal):
    """All non-missing cells as floats, or None if any is not a plain number."""
    if isinstance(cells, np.ndarray):
        if np.issubdtype(cells.dtype, np.number):
            return cells[~np.isnan(cells)].astype(float)
        return None
    out = []
    for c in cells:
        if _is_missing(c):
            continue
        if isinstance(c, bool):
            return None
        if isinstance(c, (int, float)):
            out.append(float(c))
        elif isinstance(c, (np.integer, np.floating)):
            out.append(float(c))
        elif isinstance(c, str) and _plain_float(c, decimal) is not None:
            out.append(_plain_float(c, decimal))
        else:
            return None
    return np.array(out, dtype=float)


def _mostly_numeric(cells, decimal) -> bool:
    if isinstance(cells, np.ndarray):
        return np.issubdtype(cells.dtype, np.number) and not np.all(np.isnan(cells))
    present = [c for c in cells[:_DETECT_SAMPLE] if not _is_missing(c)]
    if not present:
        return False
    good = 0
    for c in present:
        try:
            _number(c, decimal)
            good += 1
        except ValueError:
            pass
    return good >= 0.5 * len(present)


def _evenly_spaced(nums) -> bool:
    d = np.diff(np.sort(nums))
    return d.size > 0 and np.allclose(d, d[0])


# --------------------------------------------------------------------------------------------
# dates
# --------------------------------------------------------------------------------------------

_MONTH_NAMES = {m.lower(): k for k, m in enumerate(
    ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"], 1)}
_MONTH_NAMES.update({m.lower(): k for k, m in enumerate(
    ["January", "February", "March", "April", "May", "June", "July", "August", "September",
     "October", "November", "December"], 1)})
_MONTH_NAMES["sept"] = 9

_TEXT_FORMS = [
    # (regex, unit hint, builder(match) -> (year, month, day))
    (re.compile(r"(\d{4})"), "year", lambda m: (int(m[1]), 1, 1)),
    (re.compile(r"(\d{4})\s*[-/ ]?\s*q([1-4])"), "quarter",
     lambda m: (int(m[1]), 3 * int(m[2]) - 2, 1)),
    (re.compile(r"q([1-4])\s*[-/ ]?\s*(\d{4})"), "quarter",
     lambda m: (int(m[2]), 3 * int(m[1]) - 2, 1)),
    (re.compile(r"(\d{4})[-/.](\d{1,2})"), "month", lambda m: (int(m[1]), int(m[2]), 1)),
    (re.compile(r"(\d{1,2})[-/.](\d{4})"), "month", lambda m: (int(m[2]), int(m[1]), 1)),
    (re.compile(r"(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})"), None,
     lambda m: (int(m[1]), int(m[2]), int(m[3]))),
    (re.compile(r"(\d{4})-(\d{2})-(\d{2})[t ]\d{1,2}:\d{2}(:\d{2}(\.\d+)?)?(z|[+-]\d{2}:?\d{2})?"),
     None, lambda m: (int(m[1]), int(m[2]), int(m[3]))),
    (re.compile(r"([a-z]{3,9})\.?[-/ ]?\s*(\d{4})"), "month",
     lambda m: (int(m[2]), _MONTH_NAMES.get(m[1], 0), 1)),
    (re.compile(r"(\d{4})[-/ ]?\s*([a-z]{3,9})\.?"), "month",
     lambda m: (int(m[1]), _MONTH_NAMES.get(m[2], 0), 1)),
]
_ISO_WEEK = re.compile(r"(\d{4})-?w(\d{1,2})")
_DAY_MONTH_AMBIGUOUS = re.compile(r"\d{1,2}[-/.]\d{1,2}[-/.]\d{2,4}")


def _date_from_text(text: str):
    """(datetime64[D] of the period start, unit hint) for a text date, or None."""
    s = " ".join(text.strip().lower().split())
    m = _ISO_WEEK.fullmatch(s)
    if m:
        try:
            return np.datetime64(_dt.date.fromisocalendar(int(m[1]), int(m[2]), 1)), "week"
        except ValueError:
            return None
    for pattern, hint, build in _TEXT_FORMS:
        m = pattern.fullmatch(s)
        if m:
            try:
                return np.datetime64(_dt.date(*build(m)), "D"), hint
            except ValueError:
                return None
    return None


_PERIOD_HINTS = {"Y": "year", "A": "year", "Q": "quarter", "M": "month", "W": "week", "D": "day"}


def _date_from_cell(cell):
    """(datetime64[D], hint) for any date-like cell, or None."""
    if isinstance(cell, pd.Period):
        hint = _PERIOD_HINTS.get(cell.freqstr[:1].upper())
        return np.datetime64(cell.start_time.date(), "D"), hint if hint != "day" else None
    if isinstance(cell, (_dt.datetime, pd.Timestamp)):
        return np.datetime64(cell.date(), "D"), None
    if isinstance(cell, _dt.date):
        return np.datetime64(cell, "D"), None
    if isinstance(cell, np.datetime64):
        return cell.astype("datetime64[D]"), None
    if isinstance(cell, str):
        return _date_from_text(cell)
    return None


def _parse_dates(cells, rows, column, decimal):
    """Period starts (datetime64[D]) for a date column and the unit its notation implies."""
    if isinstance(cells, np.ndarray) and np.issubdtype(cells.dtype, np.datetime64):
        bad = np.flatnonzero(np.isnat(cells))
        if bad.size:
            raise InputError(f"row {rows[bad[0]]}, column {column!r}: the date is missing")
        return cells.astype("datetime64[D]"), None
    fast = _iso_days(cells)
    if fast is not None:
        return fast, None
    nums = _numbers(cells, decimal)
    if nums is not None and len(nums) == len(cells) and len(cells):
        return _dates_from_year_numbers(nums, rows, column)
    starts = np.empty(len(cells), dtype="datetime64[D]")
    hints = set()
    for k, cell in enumerate(cells):
        if _is_missing(cell):
            raise InputError(f"row {rows[k]}, column {column!r}: the date is missing")
        parsed = _date_from_cell(cell)
        if parsed is None and isinstance(cell, (int, float)) and not isinstance(cell, bool) \
                and float(cell).is_integer() and 1000 <= cell < 3000:
            parsed = np.datetime64(_dt.date(int(cell), 1, 1), "D"), "year"
        if parsed is None:
            raise InputError(_bad_date_message(cell, rows[k], column))
        starts[k], hint = parsed
        hints.add(hint)
    return starts, (hints.pop() if len(hints) == 1 else None)


def _iso_days(cells):
    """Fast path for a column of plain ISO dates (2019-07-01); None when any cell is otherwise."""
    if not isinstance(cells, list) or not cells \
            or not all(isinstance(c, str) and len(c) == 10 for c in cells):
        return None
    if not all(_ISO_DAY.fullmatch(c) for c in cells):
        return None
    try:
        return np.array(cells, dtype="datetime64[D]")
    except ValueError:  # an impossible date such as 2019-02-30: the slow path names its row
        return None


def _bad_date_message(cell, row, column) -> str:
    text = str(cell).strip()
    if _DAY_MONTH_AMBIGUOUS.fullmatch(text):
        return (f"row {row}, column {column!r}: {text!r} could be day/month or month/day; write "
                f"dates as year-month-day (2019-07-01)")
    return (f"row {row}, column {column!r}: cannot read {text!r} as a date (accepted forms: "
            f"{_DATE_FORMS_HELP}); name the date column with --date-column if this is not it")


def _decimal_year_unit(nums):
    """The calendar unit a column of (decimal) years implies, or None if the fractions fit none.

    R's ``ts`` export writes monthly times as year + k/12 and quarterly as year + k/4, rounded.
    """
    frac = nums - np.floor(nums + 1e-6)
    frac = np.where(frac > 1 - 1e-6, 0.0, frac)
    for unit, per_year in (("year", 1), ("quarter", 4), ("month", 12)):
        scaled = frac * per_year
        if np.all(np.abs(scaled - np.round(scaled)) < 0.01):
            return unit
    return None


def _dates_from_year_numbers(nums, rows, column):
    """Integer years or R-style decimal years (1949.0833 = February 1949) to period starts."""
    bad = np.flatnonzero((nums < 1000) | (nums >= 3000))
    if bad.size:
        raise InputError(f"row {rows[bad[0]]}, column {column!r}: {nums[bad[0]]:g} is not a date "
                         f"or a year (accepted forms: {_DATE_FORMS_HELP})")
    unit = _decimal_year_unit(nums)
    if unit is None:
        raise InputError(f"column {column!r} holds decimal years whose fractions are neither "
                         f"quarters (k/4) nor months (k/12); convert them to dates")
    years = np.floor(nums + 1e-6).astype(int)
    per_year = {"year": 1, "quarter": 4, "month": 12}[unit]
    k = np.round((nums - years) * per_year).astype(int)
    years, k = years + k // per_year, k % per_year
    months = 1 + k * (12 // per_year)
    starts = (years - 1970) * 12 + (months - 1)
    return starts.astype("datetime64[M]").astype("datetime64[D]"), unit


# --------------------------------------------------------------------------------------------
# values
# --------------------------------------------------------------------------------------------

_CURRENCY = re.compile(r"^(?:[$€£¥₹]|usd|eur|gbp|chf|jpy|cad|aud)\s*|\s*(?:[$€£¥₹]|usd|eur|"
                       r"gbp|chf|jpy|cad|aud)$", re.IGNORECASE)
_PLAIN = re.compile(r"[-+]?(\d+([.,]\d*)?|[.,]\d+)([eE][-+]?\d+)?")
_SPACES = re.compile(r"[\s\u00a0\u202f\u2009']")


def _plain_number(text: str) -> bool:
    """True for text that is just digits with at most one mark (no signs of money or grouping)."""
    return bool(_PLAIN.fullmatch(text.strip()))


def _plain_float(text: str, decimal: str):
    """The float of a plain number written with ``decimal`` as its mark, or None."""
    t = text.strip()
    if not _PLAIN.fullmatch(t):
        return None
    other = "," if decimal == "." else "."
    if other in t:
        return None
    return float(t.replace(",", "."))


def _is_data_cell(text: str) -> bool:
    try:
        _number(text, ".")
        return True
    except ValueError:
        pass
    try:
        _number(text, ",")
        return True
    except ValueError:
        return _date_from_text(text) is not None


def _is_missing(cell) -> bool:
    if cell is None:
        return True
    if isinstance(cell, float) and math.isnan(cell):
        return True
    if isinstance(cell, str):
        return cell.strip().lower() in _MISSING_WORDS
    return cell is pd.NaT or (isinstance(cell, np.datetime64) and np.isnat(cell))


def _number(cell, decimal: str) -> float:
    """A float from a number cell or text with grouping, currency, parentheses; ValueError if not.

    Missing cells are not numbers; callers check ``_is_missing`` first.
    """
    if isinstance(cell, bool):
        raise ValueError("a true/false cell is not a number")
    if isinstance(cell, (int, float, np.integer, np.floating)):
        return float(cell)
    if not isinstance(cell, str):
        raise ValueError(f"a {type(cell).__name__} cell is not a number")
    s = cell.strip().replace("\u2212", "-")
    if "%" in s:
        raise ValueError("percent")
    negative = False
    for _ in range(3):  # peel currency, sign and accounting parentheses in any order
        s = _CURRENCY.sub("", s).strip()
        if s.startswith("(") and s.endswith(")"):
            negative, s = not negative, s[1:-1].strip()
        elif s and s[0] in "-+":
            negative, s = negative != (s[0] == "-"), s[1:].strip()
    if s.lower() in ("inf", "infinity", "\u221e"):
        return -math.inf if negative else math.inf
    group = "," if decimal == "." else "."
    s = _SPACES.sub(" ", s)
    mantissa, exponent = re.fullmatch(r"(.*?)((?:[eE][-+]?\d+)?)", s).groups()
    whole, _, fraction = mantissa.partition(decimal)
    if decimal in fraction or group in fraction or " " in fraction:
        raise ValueError("mark")
    if not re.fullmatch(r"\d*", fraction):
        raise ValueError("fraction")
    if group in whole or " " in whole:
        if not re.fullmatch(rf"\d{{1,3}}(?:[{re.escape(group)} ]\d{{3}})+", whole):
            raise ValueError("grouping")
        whole = re.sub(r"\D", "", whole)
    elif not re.fullmatch(r"\d*", whole):
        raise ValueError("digits")
    if not whole and not fraction:
        raise ValueError("empty")
    value = float(f"{whole or '0'}.{fraction or '0'}{exponent}")
    return -value if negative else value


def _parse_values(cells, rows, column, decimal) -> np.ndarray:
    """Floats for the value column, NaN where missing; InputError for unreadable or infinite."""
    if isinstance(cells, np.ndarray) and np.issubdtype(cells.dtype, np.number):
        values = cells.astype(float)
    elif isinstance(cells, np.ndarray):
        raise InputError(f"column {column!r} holds dates, not values; choose the value column "
                         f"with --value-column")
    else:
        values = _plain_floats(cells) if decimal == "." else None
    if values is None:
        values = np.empty(len(cells), dtype=float)
        for k, cell in enumerate(cells):
            if _is_missing(cell):
                values[k] = np.nan
                continue
            try:
                values[k] = _number(cell, decimal)
            except ValueError as exc:
                raise InputError(_bad_value_message(cell, rows[k], column, decimal, str(exc))) \
                    from None
    bad = np.flatnonzero(np.isinf(values))
    if bad.size:
        raise InputError(f"row {rows[bad[0]]}, column {column!r}: the value is infinite")
    return values


def _plain_floats(cells):
    """Fast path for text cells that are all plain numbers written with a decimal point."""
    if not all(isinstance(c, str) and _PLAIN.fullmatch(c) and "," not in c for c in cells):
        return None
    return np.array(cells, dtype=float)


def _bad_value_message(cell, row, column, decimal, reason) -> str:
    text = str(cell).strip()
    where = f"row {row}, column {column!r}"
    if reason == "percent":
        return (f"{where}: {text!r} has a percent sign, which could mean {text.rstrip('% ')} or a "
                f"hundredth of it; write the number without the sign in the scale you mean")
    other = "," if decimal == "." else "."
    try:
        _number(cell, other)
        return (f"{where}: cannot read {text!r} as a number with {decimal!r} as the decimal "
                f"mark; if {other!r} is the decimal mark, use --decimal {other}")
    except ValueError:
        return f"{where}: cannot read {text!r} as a number"


# --------------------------------------------------------------------------------------------
# calendar
# --------------------------------------------------------------------------------------------

def _frequency_option(frequency):
    if frequency is None or (isinstance(frequency, str) and not frequency.strip()):
        return None
    return parse_frequency(frequency)


def _reject_duplicates(starts, rows, column, what) -> None:
    same = np.flatnonzero(starts[1:] == starts[:-1])
    if same.size:
        i = int(same[0])
        first, second = sorted((int(rows[i]), int(rows[i + 1])))
        raise InputError(f"rows {first} and {second} {what} ({starts[i]}, column {column!r}); "
                         f"keep one row per period")


def _mode(d: np.ndarray) -> int:
    values, counts = np.unique(d, return_counts=True)
    return int(values[np.argmax(counts)])


def _month_numbers(starts) -> np.ndarray:
    return starts.astype("datetime64[M]").astype(np.int64)


def _infer_frequency(starts, rows, hint, column) -> Frequency:
    """Unit and step from the notation (hint) and the spacing of the sorted period starts."""
    idx = pd.DatetimeIndex(starts)
    same_day_of_month = bool(np.all(idx.day == idx.day[0])) and idx.day[0] <= 28
    month_family = hint in _MONTHS_PER_UNIT or same_day_of_month \
        or bool(np.all(idx.is_month_end))
    if month_family:
        d = np.diff(_month_numbers(starts))
        if hint in _MONTHS_PER_UNIT:
            unit = hint
        elif np.all(idx.month == idx.month[0]) and _mode(d) % 12 == 0:
            unit = "year"
        elif np.all(idx.month % 3 == idx.month[0] % 3) and _mode(d) % 3 == 0:
            unit = "quarter"
        else:
            unit = "month"
        if unit != "month":
            d = np.diff(_month_numbers(_period_starts(starts, unit))) // _MONTHS_PER_UNIT[unit]
        if np.any(d == 0):
            raise InputError(_same_period_message(d, rows, unit, column))
        return Frequency(unit, _regular_step(d, rows, unit, column))
    d = np.diff(starts.astype(np.int64))
    if np.all(d % 7 == 0):
        return Frequency("week", _regular_step(d // 7, rows, "week", column),
                         int(idx[0].day_of_week))
    return Frequency("day", _regular_step(d, rows, "day", column))


def _same_period_message(d, rows, unit, column) -> str:
    i = int(np.flatnonzero(d == 0)[0])
    first, second = sorted((int(rows[i]), int(rows[i + 1])))
    return (f"rows {first} and {second} fall in the same {unit} (column {column!r}); keep one "
            f"row per period")


def _regular_step(d, rows, unit, column) -> int:
    step = _mode(d)
    odd = np.flatnonzero(d % step != 0)
    if odd.size:
        i = int(odd[0])
        raise InputError(f"rows {rows[i]} and {rows[i + 1]} (column {column!r}) are {d[i]} "
                         f"{unit}s apart while most neighbours are {step} apart, so the calendar "
                         f"is not regular; set --frequency if it should be")
    return step


def _period_starts(starts, unit) -> np.ndarray:
    """Move each date to the start of its year/quarter/month; weeks and days stay as they are."""
    if unit == "year":
        return starts.astype("datetime64[Y]").astype("datetime64[D]")
    if unit == "quarter":
        m = _month_numbers(starts)
        return (m - m % 3).astype("datetime64[M]").astype("datetime64[D]")
    if unit == "month":
        return starts.astype("datetime64[M]").astype("datetime64[D]")
    return starts


def _calendar_positions(aligned, rows, freq: Frequency, column) -> np.ndarray:
    """Position of each period on the regular calendar that starts at the first period."""
    if freq.unit in _MONTHS_PER_UNIT:
        span = _MONTHS_PER_UNIT[freq.unit] * freq.step
        offsets = _month_numbers(aligned) - _month_numbers(aligned[:1])[0]
    else:
        span = _DAYS_PER_UNIT[freq.unit] * freq.step
        offsets = aligned.astype(np.int64) - aligned[:1].astype(np.int64)[0]
    off = np.flatnonzero(offsets % span != 0)
    if off.size:
        i = int(off[0])
        raise InputError(f"row {rows[i]}, column {column!r}: {freq.label(aligned[i])} is not on "
                         f"the {freq.name} calendar that starts {freq.label(aligned[0])}; check "
                         f"the date or set --frequency")
    return offsets // span


def _complete_calendar(aligned, values, rows, positions, freq, column, fill_missing):
    """Insert missing periods and fill missing values (only when asked); else explain the hole."""
    total = int(positions[-1]) + 1
    present = np.zeros(total, dtype=bool)
    present[positions] = True
    holes = np.flatnonzero(~present)
    all_starts = _calendar_from(aligned[0], total, freq)
    missing_rows = rows[np.isnan(values)]
    if not fill_missing:
        if holes.size:
            k = int(holes[0])
            after = int(np.searchsorted(positions, k))
            run = [int(h) for h in holes]
            labels = _list([freq.label(all_starts[h]) for h in run], limit=5, quote=False)
            raise InputError(f"gap in the {freq.name} calendar: {labels} missing ({holes.size} "
                             f"period{'s' if holes.size > 1 else ''}; first gap before row "
                             f"{rows[after]}); add the rows or use --fill-missing to interpolate")
        if missing_rows.size:
            raise InputError(f"row {missing_rows[0]}, column {column!r}: the value is missing "
                             f"({missing_rows.size} missing in all: rows "
                             f"{_list(missing_rows, limit=8, quote=False)}); fix the file or use "
                             f"--fill-missing to interpolate")
        return aligned, values, None
    full = np.full(total, np.nan)
    full[positions] = values
    gaps = np.flatnonzero(np.isnan(full))
    if not gaps.size:
        return aligned, values, None
    known = np.flatnonzero(~np.isnan(full))
    if known.size < 2 or gaps[0] < known[0] or gaps[-1] > known[-1]:
        end = "start" if gaps[0] < known[0] else "end"
        raise InputError(f"column {column!r}: values are missing at the {end} of the series, "
                         f"where interpolation has no value on one side; remove those rows")
    full[gaps] = np.interp(gaps, known, full[known])
    parts = []
    if missing_rows.size:
        parts.append(f"rows {_list(missing_rows, limit=10, quote=False)}")
    if holes.size:
        parts.append("missing periods " + _list([freq.label(all_starts[h]) for h in holes],
                                                limit=10, quote=False))
    note = (f"filled {gaps.size} missing value{'s' if gaps.size > 1 else ''} by linear "
            f"interpolation: {'; '.join(parts)}")
    return all_starts, full, note


def _calendar_from(first, total, freq: Frequency) -> np.ndarray:
    if freq.unit in _MONTHS_PER_UNIT:
        span = _MONTHS_PER_UNIT[freq.unit] * freq.step
        m0 = _month_numbers(np.array([first]))[0]
        return (m0 + span * np.arange(total)).astype("datetime64[M]").astype("datetime64[D]")
    span = _DAYS_PER_UNIT[freq.unit] * freq.step
    return first + np.arange(total) * np.timedelta64(span, "D")


# --------------------------------------------------------------------------------------------
# small helpers
# --------------------------------------------------------------------------------------------

def _series_name(name, table: _Table, vcol: str) -> str:
    if name is not None:
        return str(name)
    generic = vcol.strip().lower() in _GENERIC_VALUE_NAMES or vcol.startswith("column ")
    if generic and table.stem:
        return table.stem
    return vcol


def _list(items, limit=12, quote=True) -> str:
    items = [repr(str(x)) if quote else str(x) for x in items]
    if len(items) > limit:
        return ", ".join(items[:limit]) + f" and {len(items) - limit} more"
    return ", ".join(items)
