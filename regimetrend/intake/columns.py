"""Choosing the date column and the value column, or finding the ones the caller named."""

from __future__ import annotations

import datetime as _dt
import re
import shlex

import numpy as np
import pandas as pd

from ..errors import InputError
from .dates import DATE_FORMS_HELP, date_from_text, date_in_format, decimal_year_unit
from .table import Table
from .values import is_missing, number, numbers, plain_number
from .wording import listing

_INDEX_NAMES = re.compile(r"^(unnamed: ?\d+|column \d+|rownames|index|row|#)$", re.IGNORECASE)
DATE_WORDS = re.compile(r"date|time|period|year|month|quarter|week|day|\bdt\b", re.IGNORECASE)
_DETECT_SAMPLE = 500  # cells looked at to recognise a column; parsing then reads every cell


def find_column(table: Table, wanted, option: str) -> str:
    """The column the caller named (exact, then ignoring case and spaces at the ends)."""
    if wanted in table.columns:
        return wanted
    folded = {c.strip().lower(): c for c in table.columns}
    key = str(wanted).strip().lower()
    if key in folded:
        return folded[key]
    raise InputError(f"{option} {wanted!r} not found in {table.label}; its columns are "
                     f"{listing(table.columns)}")


def choose_date_column(table: Table, date_column, decimal, date_format=None) -> str:
    """The named date column, or the one column of date forms, years, or with a date name."""
    if date_column is not None:
        return find_column(table, date_column, "--date-column")
    usable = [c for c in table.columns if not _is_row_index(c, table.cells[c])]
    forms = [c for c in usable if _is_date_form_column(table.cells[c], date_format)]
    if len(forms) == 1:
        return forms[0]
    if len(forms) > 1:
        return _prefer_named(forms, table, "several columns hold dates")
    years = [c for c in usable if _is_year_number_column(table.cells[c], decimal)]
    if len(years) == 1:
        return years[0]
    if len(years) > 1:
        named = [c for c in years if DATE_WORDS.search(c)]
        if len(named) == 1:
            return named[0]
        even = [c for c in years if _evenly_spaced(numbers(table.cells[c], decimal))]
        if len(even) == 1:
            return even[0]
        raise InputError(f"several columns could hold years ({listing(years)}); name the date "
                         f"column with --date-column")
    named = [c for c in usable if DATE_WORDS.search(c)]
    if len(named) == 1:  # the parser will say which cell is not a date
        return named[0]
    if date_format is not None:
        raise InputError(f"no column of {table.label} holds dates written as --date-format "
                         f"{date_format!r} (columns {listing(table.columns)}); check the format "
                         f"or name the column with --date-column")
    raise InputError(f"no date column found in {table.label} (columns "
                     f"{listing(table.columns)}); name it with --date-column (accepted forms: "
                     f"{DATE_FORMS_HELP})")


def _prefer_named(candidates, table, what) -> str:
    named = [c for c in candidates if DATE_WORDS.search(c)]
    if len(named) == 1:
        return named[0]
    raise InputError(f"{what} in {table.label} ({listing(candidates)}); name the date column "
                     f"with --date-column")


def choose_value_column(table: Table, dcol: str, value_column, decimal) -> str:
    """The named value column, or the one other (mostly numeric) column."""
    if value_column is not None:
        vcol = find_column(table, value_column, "--value-column")
        if vcol == dcol:
            raise InputError(f"--value-column {value_column!r} is also the date column; name "
                             f"another column")
        return vcol
    others = [c for c in table.columns if c != dcol]
    if not others:
        raise InputError(f"{table.label} has only the date column {dcol!r}; a column of values "
                         f"is needed beside it")
    if len(others) == 1:
        return others[0]
    numeric = [c for c in others if not _is_row_index(c, table.cells[c])
               and _mostly_numeric(table.cells[c], decimal)]
    if len(numeric) == 1:
        return numeric[0]
    if not numeric:
        raise InputError(f"no numeric value column found in {table.label} (columns "
                         f"{listing(others)}); name it with --value-column")
    portfolio = ""
    if table.path is not None:
        portfolio = (f", or analyse every column with 'regimetrend portfolio "
                     f"{shlex.quote(table.path)} --output DIR'")
    raise InputError(f"{table.label} has several value columns ({listing(numeric)}); choose one "
                     f"with --value-column{portfolio}")


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


def _is_date_form_column(cells, date_format=None) -> bool:
    """Most sampled non-empty cells are date objects or text date forms other than numbers
    (with ``date_format``: cells that format reads).

    A majority (not all) is enough so that one mistyped date is reported with its row by the
    parser instead of hiding the column.
    """
    if isinstance(cells, np.ndarray):
        return np.issubdtype(cells.dtype, np.datetime64)
    present = [c for c in cells[:_DETECT_SAMPLE] if not is_missing(c)]
    dated = 0
    for c in present:
        if date_format is not None:
            dated += date_in_format(c, date_format) is not None
        elif isinstance(c, str):
            dated += not plain_number(c) and date_from_text(c) is not None
        else:
            dated += isinstance(c, (_dt.date, pd.Period, np.datetime64))
    return bool(present) and dated >= 0.5 * len(present)


def _is_year_number_column(cells, decimal) -> bool:
    nums = numbers(cells[:_DETECT_SAMPLE], decimal)
    if nums is None or nums.size == 0 or np.any(np.isnan(nums)):
        return False
    if np.any((nums < 1000) | (nums >= 3000)):
        return False
    return decimal_year_unit(nums) is not None


def _mostly_numeric(cells, decimal) -> bool:
    if isinstance(cells, np.ndarray):
        return np.issubdtype(cells.dtype, np.number) and not np.all(np.isnan(cells))
    present = [c for c in cells[:_DETECT_SAMPLE] if not is_missing(c)]
    if not present:
        return False
    good = 0
    for c in present:
        try:
            number(c, decimal)
            good += 1
        except ValueError:
            pass
    return good >= 0.5 * len(present)


def _evenly_spaced(nums) -> bool:
    d = np.diff(np.sort(nums))
    return d.size > 0 and np.allclose(d, d[0])
