"""Which reader a source needs: a file by its extension, or a pandas Series/DataFrame."""

from __future__ import annotations

import os
import stat
from pathlib import Path

import pandas as pd

from ..errors import InputError
from .excel import read_excel
from .parquet import read_parquet
from .table import (
    SUPPORTED_EXTENSIONS,
    Table,
    table_from_frame,
    table_from_pandas_series,
)
from .text_file import read_text


def read_source(source, *, sheet, decimal) -> Table:
    """The raw table of a file path or pandas object; InputError for anything else."""
    if isinstance(source, pd.Series):
        return table_from_pandas_series(source)
    if isinstance(source, pd.DataFrame):
        return table_from_frame(source, "the DataFrame")
    if isinstance(source, (str, os.PathLike)):
        return read_file(Path(source), sheet=sheet, decimal=decimal)
    raise InputError(f"cannot read a {type(source).__name__}; give a file path, a pandas Series "
                     f"or a pandas DataFrame")


def read_file(path: Path, *, sheet, decimal) -> Table:
    """Check the path is a readable file of a supported type, then read it."""
    _check_regular_file(path)
    ext = path.suffix.lower()
    if ext not in SUPPORTED_EXTENSIONS:
        raise InputError(f"cannot read {path.name!r}: supported file types are "
                         f"{', '.join(SUPPORTED_EXTENSIONS)}")
    if path.stat().st_size == 0:
        raise InputError(f"file {path.name!r} is empty")
    if sheet is not None and ext != ".xlsx":
        raise InputError(f"option --sheet: {path.name!r} is not an Excel workbook, so it has "
                         f"no sheets")
    try:
        with path.open("rb"):  # a regular file: opening cannot block
            pass
        if ext in (".csv", ".txt"):
            table = read_text(path, decimal)
        elif ext == ".xlsx":
            table = read_excel(path, sheet)
        else:
            table = read_parquet(path)
    except OSError as exc:
        raise InputError(_os_error_message(path, exc)) from None
    table.stem = path.stem
    table.path = str(path)
    return table


_KINDS = ((stat.S_ISFIFO, "a named pipe (FIFO)"), (stat.S_ISCHR, "a character device"),
          (stat.S_ISBLK, "a block device"), (stat.S_ISSOCK, "a socket"))


def _check_regular_file(path: Path) -> None:
    """InputError for a path that is missing, a folder, a pipe or a device (never opened)."""
    try:
        mode = path.stat().st_mode
    except (FileNotFoundError, NotADirectoryError):
        raise InputError(f"file not found: {path}") from None
    except OSError as exc:
        raise InputError(_os_error_message(path, exc)) from None
    if stat.S_ISDIR(mode):
        raise InputError(f"{path} is a folder, not a file; give the path of the data file")
    if not stat.S_ISREG(mode):
        kind = next((words for test, words in _KINDS if test(mode)), "not a regular file")
        raise InputError(f"{path} is {kind}, not a regular file; save the data to a file and "
                         f"give its path")


def _os_error_message(path: Path, exc: OSError) -> str:
    if isinstance(exc, PermissionError):
        return f"cannot read {path}: permission denied (check the file's access rights)"
    return f"cannot read {path}: {exc.strerror or type(exc).__name__}"
