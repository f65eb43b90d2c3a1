"""``load_series``: the reading steps in order, from a source to a validated regular Series."""

from __future__ import annotations

import os
from pathlib import Path
from typing import NamedTuple

import numpy as np
import pandas as pd

from ..errors import InputError
from ..series import Frequency, Series
from .calendar import (
    calendar_positions,
    complete_calendar,
    frequency_option,
    infer_frequency,
    period_starts,
    reject_duplicates,
)
from .columns import choose_date_column, choose_value_column
from .dates import check_date_format, parse_dates
from .excel import read_excel, sheet_names
from .marks import decimal_mark, refuse_either_reading
from .source import read_source
from .table import Table
from .values import parse_values
from .wording import listing

MIN_POINTS = 3  # fewer points cannot show a trend at all
_FIRST_DAY, _LAST_DAY = np.datetime64("0001-01-01", "D"), np.datetime64("9999-12-31", "D")
_GENERIC_VALUE_NAMES = {"value", "values", "y", "v", "amount"}


def load_series(source, *, date_column=None, value_column=None, frequency=None, decimal=None,
                fill_missing=False, name=None, sheet=None, date_format=None) -> Series:
    """Read one series from a file or pandas object and return it validated and regular.

    ``source`` is a path to a .csv/.txt, .xlsx or .parquet file, a pandas Series (dates in the
    index) or a pandas DataFrame (dates in a column or in a DatetimeIndex/PeriodIndex).
    ``date_column``/``value_column`` name the columns when there is no single obvious pair.
    ``frequency`` overrides the inferred calendar (plain words: see ``parse_frequency``).
    ``decimal`` is the decimal mark in text values ("." or ","); by default the point, except in
    text files not separated by commas, where the numbers show it (see ``marks``).
    ``fill_missing`` fills missing values and missing periods by linear interpolation on the
    calendar and says so in the notes. ``name`` defaults to the value column's name (or the
    Series' name, or the file's stem when the column name says nothing, like ``value``).
    ``sheet`` picks an Excel sheet by name or by 0-based position (digits that name no sheet
    count as a position); default the first sheet. ``date_format`` reads dates written in
    another form, with ``strftime`` codes (``%d.%m.%Y``).
    See the package docstring for the row-number convention used in messages.
    """
    if decimal not in (None, ".", ","):
        raise InputError(f"--decimal {decimal!r} is not supported; use '.' or ','")
    if date_format is not None:
        date_format = check_date_format(date_format)
    wanted = frequency_option(frequency)
    choice = _Choice(date_column, value_column, decimal, date_format)
    try:
        table = read_source(source, sheet=sheet, decimal=decimal)
        table, dcol, vcol, dates, values = _columns(table, choice)
    except InputError as exc:
        hint = _other_sheets(source, sheet, choice)
        if hint is None:
            raise
        raise InputError(f"{hint} (the first sheet: {exc})") from None
    rows = table.rows
    starts = dates.starts
    outside = np.flatnonzero((starts < _FIRST_DAY) | (starts > _LAST_DAY))
    if outside.size:
        raise InputError(f"row {rows[outside[0]]}, column {dcol!r}: {starts[outside[0]]} is "
                         f"outside the calendar dates can use (years 1 to 9999)")
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
    reject_duplicates(starts, rows, dcol, "have the same date")

    if dates.note:
        notes.append(dates.note)
    freq = wanted if wanted is not None else infer_frequency(starts, rows, dates.unit, dcol)
    if freq.unit == "week":
        freq = Frequency("week", freq.step, int(pd.Timestamp(starts[0]).day_of_week))
    aligned = period_starts(starts, freq.unit)
    moved = int(np.sum(aligned != starts))
    if moved:
        notes.append(f"{moved} dates inside a period were moved to the start of their "
                     f"{freq.unit} (first at row {rows[np.flatnonzero(aligned != starts)[0]]})")
    reject_duplicates(aligned, rows, dcol, f"fall in the same {freq.unit}")
    positions = calendar_positions(aligned, rows, freq, dcol)

    series_name = _series_name(name, table, vcol)
    observed = int(np.sum(~np.isnan(values)))
    if observed < MIN_POINTS:
        raise InputError(f"column {vcol!r} has {observed} values; at least {MIN_POINTS} are "
                         f"needed to see a trend")
    full_starts, full_values, fill_note = complete_calendar(
        aligned, values, rows, positions, freq, vcol, fill_missing)
    if fill_note:
        notes.append(fill_note)
    return Series(series_name, full_starts, full_values, freq, tuple(notes))


class _Choice(NamedTuple):
    """What the caller said about the columns and the forms of dates and numbers."""

    date_column: object
    value_column: object
    decimal: str | None
    date_format: str | None


def _columns(table: Table, choice: _Choice):
    """The date and value columns of a table, read: (table, dcol, vcol, DateColumn, values)."""
    if not table.rows.size:
        raise InputError(f"{table.label} has no data rows")
    decimal = choice.decimal or decimal_mark(table)
    dcol = choose_date_column(table, choice.date_column, decimal or ".", choice.date_format)
    vcol = choose_value_column(table, dcol, choice.value_column, decimal or ".")
    if decimal is None:
        refuse_either_reading(table, vcol)
    decimal = decimal or "."
    dates = parse_dates(table.cells[dcol], table.rows, dcol, decimal, choice.date_format)
    values = parse_values(table.cells[vcol], table.rows, vcol, decimal)
    return table, dcol, vcol, dates, values


def _other_sheets(source, sheet, choice: _Choice) -> str | None:
    """When the first sheet of a workbook holds no series: the sheets that do, as advice."""
    if sheet is not None or not isinstance(source, (str, os.PathLike)) \
            or Path(source).suffix.lower() != ".xlsx":
        return None
    names = sheet_names(Path(source))
    good = []
    for other in names[1:]:
        try:
            _columns(read_excel(Path(source), other), choice)
        except InputError:
            continue
        good.append(other)
    if not good:
        return None
    return (f"the first sheet {names[0]!r} of {Path(source).name!r} holds no dated values; they "
            f"are on {'sheet' if len(good) == 1 else 'sheets'} {listing(good)}: choose one with "
            f"--sheet")


def _series_name(name, table: Table, vcol: str) -> str:
    if name is not None:
        return str(name)
    generic = vcol.strip().lower() in _GENERIC_VALUE_NAMES or vcol.startswith("column ")
    if generic and table.stem:
        return table.stem
    return vcol


def as_series(obj) -> Series:
    """``obj`` as a ``Series``, for the functions of the Python API: a ``Series`` as it is; a
    pandas Series (dates in its index) or date/value DataFrame read by ``load_series`` with its
    defaults; anything else (a dict, a list, a file path) an InputError saying what to give."""
    if isinstance(obj, Series):
        return obj
    if isinstance(obj, (pd.Series, pd.DataFrame)):
        return load_series(obj)
    raise InputError(f"expected a series: a regimetrend Series, a pandas Series with dates in its "
                     f"index, or a DataFrame with a date and a value column; got a "
                     f"{type(obj).__name__} (read files with load_series)")
