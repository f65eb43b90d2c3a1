"""Dates: every form intake reads, turned into the first day of its period.

``parse_date`` reads one value (for options such as ``--event``); ``parse_dates`` reads a whole
date column and reports the calendar unit its notation implies (``2019Q3`` says quarterly even
when only one row is present).

Dates such as ``03/04/2019`` are rejected: whether that is March or April depends on the country
of the file's author. ISO dates (``2019-04-03``), ``07/2019`` and ``2019/07`` are read.
"""

from __future__ import annotations

import datetime as _dt
import re
from typing import NamedTuple

import numpy as np
import pandas as pd

from ..errors import InputError
from .values import is_missing, numbers

DATE_FORMS_HELP = ("2019, 2019-07, 2019-07-01, 2019Q3, 2019-Q3, Q3 2019, 2019M07, 07/2019, "
                   "2019/07, 2019-W27, Jul 2019, 2019-07-01 12:00, Excel day numbers; "
                   "--date-format for others")

_ISO_DAY = re.compile(r"\d{4}-\d{2}-\d{2}")

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
    (re.compile(r"(\d{4})m(\d{1,2})"), "month", lambda m: (int(m[1]), int(m[2]), 1)),
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
_PERIOD_HINTS = {"Y": "year", "A": "year", "Q": "quarter", "M": "month", "W": "week", "D": "day"}


def parse_date(value):
    """The first day (``datetime64[D]``) of the period ``value`` names, or None if it is no date.

    ``value`` is text in any form of ``DATE_FORMS_HELP`` or a date object (``datetime.date``,
    ``pandas.Timestamp``/``Period``, ``numpy.datetime64``).
    """
    got = date_from_cell(value.strip() if isinstance(value, str) else value)
    return None if got is None else got[0]


def date_from_text(text: str):
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


def date_from_cell(cell):
    """(datetime64[D], hint) for any date-like cell, or None."""
    if isinstance(cell, pd.Period):
        hint = _PERIOD_HINTS.get(cell.freqstr[:1].upper())
        first = cell.asfreq("D", how="start")  # a Period, so years past 2262 stay right
        start = np.datetime64(_dt.date(first.year, first.month, first.day), "D")
        return start, hint if hint != "day" else None
    if isinstance(cell, (_dt.datetime, pd.Timestamp)):
        return np.datetime64(cell.date(), "D"), None
    if isinstance(cell, _dt.date):
        return np.datetime64(cell, "D"), None
    if isinstance(cell, np.datetime64):
        return cell.astype("datetime64[D]"), None
    if isinstance(cell, str):
        return date_from_text(cell)
    return None


class DateColumn(NamedTuple):
    """A date column read: period starts, the unit its notation implies, and a note (or None)."""

    starts: np.ndarray  # datetime64[D]
    unit: str | None
    note: str | None


def parse_dates(cells, rows, column, decimal=".", date_format=None) -> DateColumn:
    """Period starts (datetime64[D]) for a date column and the unit its notation implies.

    ``rows`` are the row numbers used in messages; ``decimal`` is the mark of decimal years;
    ``date_format`` (``strftime`` codes such as ``%d.%m.%Y``) reads text in any other form.
    """
    if isinstance(cells, np.ndarray) and np.issubdtype(cells.dtype, np.datetime64):
        bad = np.flatnonzero(np.isnat(cells))
        if bad.size:
            raise InputError(f"row {rows[bad[0]]}, column {column!r}: the date is missing")
        return DateColumn(cells.astype("datetime64[D]"), None, None)
    if date_format is not None:
        return _dates_in_format(cells, rows, column, date_format)
    fast = _iso_days(cells)
    if fast is not None:
        return DateColumn(fast, None, None)
    nums = numbers(cells, decimal)
    if nums is not None and len(nums) == len(cells) and len(cells):
        return dates_from_numbers(nums, rows, column)
    starts = np.empty(len(cells), dtype="datetime64[D]")
    hints = set()
    for k, cell in enumerate(cells):
        if is_missing(cell):
            raise InputError(f"row {rows[k]}, column {column!r}: the date is missing")
        parsed = date_from_cell(cell)
        if parsed is None and isinstance(cell, (int, float)) and not isinstance(cell, bool) \
                and float(cell).is_integer() and 1000 <= cell < 3000:
            parsed = np.datetime64(_dt.date(int(cell), 1, 1), "D"), "year"
        if parsed is None:
            raise InputError(_bad_date_message(cell, rows[k], column))
        starts[k], hint = parsed
        hints.add(hint)
    return DateColumn(starts, hints.pop() if len(hints) == 1 else None, None)


def check_date_format(date_format: str) -> str:
    """The format if ``strptime`` can read what it writes; InputError naming the option if not."""
    text = str(date_format)
    if "%" not in text:
        raise InputError(f"--date-format {text!r} has no codes; write the form with strftime "
                         f"codes, e.g. %d.%m.%Y for 31.12.2019 or %Y%m%d for 20191231")
    try:
        _dt.datetime.strptime(_dt.datetime(2001, 11, 23).strftime(text), text)
    except ValueError as exc:
        raise InputError(f"--date-format {text!r} is not usable ({exc}); write the form with "
                         f"strftime codes, e.g. %d.%m.%Y") from None
    return text


def date_in_format(cell, date_format: str):
    """datetime64[D] of a cell read with ``date_format`` (date objects as they are), or None."""
    if not isinstance(cell, str):
        got = date_from_cell(cell)
        if got is not None:
            return got[0]
        if isinstance(cell, (int, np.integer)) or (isinstance(cell, float) and cell.is_integer()):
            cell = str(int(cell))  # 20191231 typed as a number
        else:
            return None
    try:
        return np.datetime64(_dt.datetime.strptime(cell.strip(), date_format).date(), "D")
    except ValueError:
        return None


def _format_unit(date_format: str):
    """The unit a format names when it has no day: %Y-%m is monthly, %Y annual."""
    codes = set(re.findall(r"%([a-zA-Z])", date_format))
    if codes & set("dejaAuwUWVjcxG"):
        return None
    if codes & set("mbBh"):
        return "month"
    return "year" if codes & set("Yy") else None


def _dates_in_format(cells, rows, column, date_format) -> DateColumn:
    date_format = check_date_format(date_format)
    starts = np.empty(len(cells), dtype="datetime64[D]")
    for k, cell in enumerate(cells):
        if is_missing(cell):
            raise InputError(f"row {rows[k]}, column {column!r}: the date is missing")
        got = date_in_format(cell, date_format)
        if got is None:
            raise InputError(f"row {rows[k]}, column {column!r}: {str(cell).strip()!r} does not "
                             f"match --date-format {date_format!r}")
        starts[k] = got
    return DateColumn(starts, _format_unit(date_format), None)


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
        return (f"row {row}, column {column!r}: {text!r} could be day/month or month/day; say "
                f"which with --date-format (%d/%m/%Y or %m/%d/%Y) or write dates as "
                f"year-month-day (2019-07-01)")
    return (f"row {row}, column {column!r}: cannot read {text!r} as a date (accepted forms: "
            f"{DATE_FORMS_HELP}); name the date column with --date-column if this is not it")


def decimal_year_unit(nums):
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


# Excel counts days from 1899-12-30 (it treats 1900 as a leap year, so serial 60 is the missing
# 1900-02-29). Five-digit day numbers, 10000 (1927-05-18) to 99999 (2173-10-14), are read as
# dates; six and eight digits are read as 201907 (year, month) and 20190701 (year, month, day).
EXCEL_EPOCH = np.datetime64("1899-12-30", "D")
_EXCEL_DAYS = (10000, 100000)


def dates_from_numbers(nums, rows, column) -> DateColumn:
    """Integer or R-style decimal years (1949.0833 = February 1949), Excel day numbers, or
    digits run together (201907, 20190701)."""
    if np.all((nums >= _EXCEL_DAYS[0]) & (nums < _EXCEL_DAYS[1])):
        starts = EXCEL_EPOCH + np.floor(nums).astype(np.int64).astype("timedelta64[D]")
        first = int(np.floor(nums[0]))
        note = (f"column {column!r} holds numbers, read as Excel day numbers ({first} is "
                f"{starts[0]}); give --date-format if they mean something else")
        return DateColumn(starts, None, note)
    joined = _joined_digits(nums, column)
    if joined is not None:
        return joined
    bad = np.flatnonzero((nums < 1000) | (nums >= 3000))
    if bad.size:
        raise InputError(f"row {rows[bad[0]]}, column {column!r}: {nums[bad[0]]:g} is not a date, "
                         f"a year or an Excel day number; write the dates in an accepted form or "
                         f"give --date-format (accepted forms: {DATE_FORMS_HELP})")
    unit = decimal_year_unit(nums)
    if unit is None:
        raise InputError(f"column {column!r} holds decimal years whose fractions are neither "
                         f"quarters (k/4) nor months (k/12); convert them to dates")
    years = np.floor(nums + 1e-6).astype(int)
    per_year = {"year": 1, "quarter": 4, "month": 12}[unit]
    k = np.round((nums - years) * per_year).astype(int)
    years, k = years + k // per_year, k % per_year
    months = 1 + k * (12 // per_year)
    starts = (years - 1970) * 12 + (months - 1)
    return DateColumn(starts.astype("datetime64[M]").astype("datetime64[D]"), unit, None)


def _joined_digits(nums, column) -> DateColumn | None:
    """Whole numbers of six digits read as year+month, of eight as year+month+day; else None."""
    if not np.all(nums == np.floor(nums)):
        return None
    for low, high, form, unit in ((100001, 299913, "%Y%m", "month"),
                                  (10000101, 29991232, "%Y%m%d", None)):
        if np.all((nums >= low) & (nums < high)):
            try:
                days = [_dt.datetime.strptime(str(int(x)), form).date() for x in nums]
            except ValueError:
                return None
            starts = np.array(days, dtype="datetime64[D]")
            note = (f"column {column!r} holds numbers, read as {form.replace('%', '')} dates "
                    f"({int(nums[0])} is {starts[0]}); give --date-format if they mean "
                    f"something else")
            return DateColumn(starts, unit, note)
    return None
