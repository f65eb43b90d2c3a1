"""``load_series``: the reading steps in order, from a source to a validated regular Series."""

from __future__ import annotations

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
from .dates import parse_dates
from .source import read_source
from .table import Table
from .values import parse_values

MIN_POINTS = 3  # fewer points cannot show a trend at all
_GENERIC_VALUE_NAMES = {"value", "values", "y", "v", "amount"}


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
    See the package docstring for the row-number convention used in messages.
    """
    if decimal not in (".", ","):
        raise InputError(f"--decimal {decimal!r} is not supported; use '.' or ','")
    wanted = frequency_option(frequency)
    table = read_source(source, sheet=sheet, decimal=decimal)
    if not table.rows.size:
        raise InputError(f"{table.label} has no data rows")
    dcol = choose_date_column(table, date_column, decimal)
    vcol = choose_value_column(table, dcol, value_column, decimal)
    rows = table.rows
    starts, hint = parse_dates(table.cells[dcol], rows, dcol, decimal)
    values = parse_values(table.cells[vcol], rows, vcol, decimal)
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

    freq = wanted if wanted is not None else infer_frequency(starts, rows, hint, dcol)
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


def _series_name(name, table: Table, vcol: str) -> str:
    if name is not None:
        return str(name)
    generic = vcol.strip().lower() in _GENERIC_VALUE_NAMES or vcol.startswith("column ")
    if generic and table.stem:
        return table.stem
    return vcol
