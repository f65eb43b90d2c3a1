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

import numpy as np
import pandas as pd

from ..errors import InputError
from .values import is_missing, numbers

DATE_FORMS_HELP = ("2019, 2019-07, 2019-07-01, 2019Q3, 2019-Q3, Q3 2019, 07/2019, 2019/07, "
                   "2019-W27, Jul 2019, 2019-07-01 12:00")

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
        return np.datetime64(cell.start_time.date(), "D"), hint if hint != "day" else None
    if isinstance(cell, (_dt.datetime, pd.Timestamp)):
        return np.datetime64(cell.date(), "D"), None
    if isinstance(cell, _dt.date):
        return np.datetime64(cell, "D"), None
    if isinstance(cell, np.datetime64):
        return cell.astype("datetime64[D]"), None
    if isinstance(cell, str):
        return date_from_text(cell)
    return None


def parse_dates(cells, rows, column, decimal="."):
    """Period starts (datetime64[D]) for a date column and the unit its notation implies.

    ``rows`` are the row numbers used in messages; ``decimal`` is the mark of decimal years.
    """
    if isinstance(cells, np.ndarray) and np.issubdtype(cells.dtype, np.datetime64):
        bad = np.flatnonzero(np.isnat(cells))
        if bad.size:
            raise InputError(f"row {rows[bad[0]]}, column {column!r}: the date is missing")
        return cells.astype("datetime64[D]"), None
    fast = _iso_days(cells)
    if fast is not None:
        return fast, None
    nums = numbers(cells, decimal)
    if nums is not None and len(nums) == len(cells) and len(cells):
        return dates_from_year_numbers(nums, rows, column)
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


def dates_from_year_numbers(nums, rows, column):
    """Integer years or R-style decimal years (1949.0833 = February 1949) to period starts."""
    bad = np.flatnonzero((nums < 1000) | (nums >= 3000))
    if bad.size:
        raise InputError(f"row {rows[bad[0]]}, column {column!r}: {nums[bad[0]]:g} is not a date "
                         f"or a year (accepted forms: {DATE_FORMS_HELP})")
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
    return starts.astype("datetime64[M]").astype("datetime64[D]"), unit
