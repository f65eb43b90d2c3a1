"""The raw table every reader produces: cells by column, each data row with its row number.

Row numbers follow the convention of the package docstring (header = row 1). Pandas objects
become tables here too, so the column choice and parsing see one shape of input.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..errors import InputError
from .dates import date_from_text
from .values import number

SUPPORTED_EXTENSIONS = (".csv", ".txt", ".xlsx", ".parquet")


@dataclass
class Table:
    """Raw cells by column (lists of Python objects or numpy arrays) and their row numbers."""

    label: str  # how messages refer to the source
    columns: list[str]
    cells: dict
    rows: np.ndarray  # int row number of each data row (package docstring convention)
    stem: str | None = None  # file stem, for the default name
    path: str | None = None  # the file as the caller named it (for advice on other commands)
    separator: str | None = None  # field separator of a text file
    sheet: str | None = None  # the Excel sheet read
    sheets: tuple[str, ...] = ()  # every sheet of the workbook


def is_data_cell(text: str) -> bool:
    """True for text that reads as a number (either decimal mark) or a date: not a header."""
    for decimal in (".", ","):
        try:
            number(text, decimal)
            return True
        except ValueError:
            pass
    return date_from_text(text) is not None


def table_from_records(records, label, sep_hint=None) -> Table:
    """Build a table from (row number, cells) records; the first record is the header if it
    holds text that is neither a number nor a date."""
    if not records:
        raise InputError(f"{label} is empty")
    first = records[0][1]
    has_header = any(isinstance(c, str) and c != "" and not is_data_cell(c) for c in first)
    if has_header:
        names = unique_names(first)
        body = records[1:]
    else:
        names = [f"column {k + 1}" for k in range(len(first))]
        body = records
    width = len(names)
    grid = []
    for line, cells in body:
        if len(cells) != width:
            if any(c != "" for c in cells[width:]):
                where = f" (separator {sep_hint!r})" if sep_hint else ""
                head = "the header" if has_header else "the first row"
                raise InputError(f"row {line} has {len(cells)} fields but {head} has "
                                 f"{width}{where}; quote values that contain the separator")
            cells = (list(cells) + [""] * width)[:width]
        grid.append(cells)
    columns = list(zip(*grid)) if grid else [() for _ in names]
    cols: dict = {n: list(column) for n, column in zip(names, columns)}
    rows = np.array([line for line, _ in body], dtype=int)
    return Table(label, names, cols, rows, separator=sep_hint)


def unique_names(raw) -> list[str]:
    """Column names as text, blanks named by position, repeats numbered ``name (2)``."""
    names: list[str] = []
    seen: dict = {}
    for k, name in enumerate(raw):
        name = str(name).strip() if name not in (None, "") else f"column {k + 1}"
        if name in seen:
            seen[name] += 1
            name = f"{name} ({seen[name]})"
        else:
            seen[name] = 1
        names.append(name)
    return names


def table_from_frame(frame: pd.DataFrame, label: str) -> Table:
    """A DataFrame as a table; a date index becomes a column, rows numbered from 2."""
    if isinstance(frame.index, pd.MultiIndex) or isinstance(frame.columns, pd.MultiIndex):
        raise InputError(f"{label} has multi-level labels; pass one series with a single date "
                         f"index or a date column")
    if not isinstance(frame.index, pd.RangeIndex):  # dates kept in the index become a column
        index_name = str(frame.index.name) if frame.index.name is not None else "date"
        if index_name in frame.columns:
            index_name = f"{index_name} (index)"
        frame = frame.reset_index(names=index_name)
    names = unique_names(list(frame.columns))
    cells = {n: column_cells(frame.iloc[:, k]) for k, n in enumerate(names)}
    rows = np.arange(2, len(frame) + 2, dtype=int)
    return Table(label, names, cells, rows)


def table_from_pandas_series(series: pd.Series) -> Table:
    """A Series as a two-column table: its index (the dates) and its values."""
    index_name = series.index.name if series.index.name is not None else "date"
    value_name = series.name if series.name is not None else "value"
    if str(value_name) == str(index_name):
        value_name = f"{value_name} (values)"
    frame = pd.DataFrame({str(index_name): series.index, str(value_name): series.to_numpy()})
    table = table_from_frame(frame, "the Series")
    table.stem = None
    return table


def column_cells(column: pd.Series):
    """Numeric and datetime columns stay numpy arrays (fast paths); others become lists."""
    if pd.api.types.is_datetime64_any_dtype(column.dtype):
        if getattr(column.dt, "tz", None) is not None:
            column = column.dt.tz_localize(None)
        return column.to_numpy()  # keeps the unit: years outside 1677-2262 need [us] or [s]
    if pd.api.types.is_bool_dtype(column.dtype) or pd.api.types.is_complex_dtype(column.dtype):
        return column.tolist()  # cell by cell, so the parser names the row (no silent casts)
    if pd.api.types.is_numeric_dtype(column.dtype):
        return column.to_numpy(dtype=float, na_value=np.nan)
    return column.tolist()
