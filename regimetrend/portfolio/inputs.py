"""Reading a portfolio: a long table, a wide table or a folder of one-series files.

Each series becomes a ``SeriesTask``: its id, the raw cells intake will validate (a small
two-column pandas frame, or a file path), the file row of each cell (so intake's messages can
name the row of the portfolio file), and a digest of those cells for the resume key.

Layouts:

- long: one row per series and period; ``id_columns`` (one or more, e.g. region and product)
  name the series, the other columns hold the date and the value (found by intake when obvious,
  or named by ``date_column`` / ``value_column``);
- wide: one column per series; the dates are in ``date_column`` (default the first column);
  empty cells before a series' first value and after its last are the series' own start and end;
- folder: every .csv/.txt/.xlsx/.parquet file in the folder is one series named by its file name
  (without extension).

Row numbers follow intake's convention: the header is row 1, the first data row is row 2.
Files are only read; nothing here models or writes.
"""

from __future__ import annotations

import hashlib
import io
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import InputError

TABLE_EXTENSIONS = (".csv", ".txt", ".xlsx", ".parquet")
ID_SEPARATOR = " / "  # joins the values of several id columns into one id


@dataclass(frozen=True, eq=False)
class SeriesTask:
    """One series of the portfolio, not yet validated."""

    id: str
    parts: tuple[str, ...]  # the value of each id column (the id itself for wide and folder)
    source: object  # pandas DataFrame (date and value columns) or a Path
    digest: str  # sha256 of the raw cells (or file bytes)
    rows: np.ndarray | None = None  # file row of each frame row (None: numbering is intake's)
    problem: str | None = None  # set when the series cannot even be handed to intake
    load: dict = field(default_factory=dict)  # extra load_series arguments for this series


@dataclass(frozen=True)
class Portfolio:
    layout: str  # long, wide or folder
    id_columns: tuple[str, ...]
    tasks: tuple[SeriesTask, ...]
    decimal: str | None = None  # the decimal mark of a text file's numbers (None: intake's own)


def read_portfolio(path, *, id_columns=(), date_column=None, value_column=None,
                   sheet=None, decimal=None) -> Portfolio:
    """All series of the portfolio at ``path`` (a file or a folder), in input order.

    ``decimal``: the decimal mark the analyst gave, or None to find it as single-series intake
    does; for a text file it is decided once for the whole file (``file_decimal``), as every
    series' cells are handed to intake apart from the file."""
    path = Path(path)
    if path.is_dir():
        if id_columns:
            raise InputError(f"option --id-column: {path} is a folder of one-series files; the "
                             f"file names are the ids")
        return Portfolio("folder", ("id",), tuple(_folder_tasks(path, date_column,
                                                                value_column, sheet)))
    frame = read_table(path, sheet)
    if id_columns:
        tasks = tuple(_long_tasks(frame, path, list(id_columns), date_column, value_column))
        mark = file_decimal(path, decimal, skip=[_column(frame, c, "--id-column", path)
                                                 for c in id_columns])
        return Portfolio("long", tuple(id_columns), tasks, mark)
    tasks = tuple(_wide_tasks(frame, path, date_column))
    return Portfolio("wide", ("id",), tasks, file_decimal(path, decimal, skip=[]))


def file_decimal(path: Path, decimal, skip) -> str | None:
    """The decimal mark of every series of a text file when the analyst gave none, decided as
    single-series intake decides it for one file: the point in comma-separated files, else what
    the numbers show (``intake.marks``); when nothing tells, the point, after refusing any cell
    that reads either way (``200,002``), naming its file row. Tables that are not text files
    keep intake's own rule (None). ``skip``: id columns, whose text is no number."""
    if decimal is not None or path.suffix.lower() not in (".csv", ".txt"):
        return decimal
    from ..intake.marks import decimal_mark, refuse_either_reading
    from ..intake.text_file import decode, guess_delimiter, read_text

    if guess_delimiter(decode(path.read_bytes(), path.name), None) == ",":
        return "."  # the common case, without parsing the file a second time
    table = read_text(path, None)
    for column in skip:  # id columns (e.g. product codes 1.234) say nothing about the numbers
        if column in table.cells:
            table.cells[column] = []
    mark = decimal_mark(table)
    if mark is None:
        for column in table.columns:
            if column not in skip:
                refuse_either_reading(table, column)
        mark = "."
    return mark


def read_table(path: Path, sheet=None) -> pd.DataFrame:
    """The whole table with every cell as read (text stays text; intake parses each series)."""
    if not path.is_file():
        raise InputError(f"file not found: {path}")
    ext = path.suffix.lower()
    if ext not in TABLE_EXTENSIONS:
        raise InputError(f"cannot read {path.name!r}: supported file types are "
                         f"{', '.join(TABLE_EXTENSIONS)}, or a folder of such files")
    if sheet is not None and ext != ".xlsx":
        raise InputError(f"option --sheet: {path.name!r} is not an Excel workbook")
    try:
        if ext in (".csv", ".txt"):
            frame = _read_text_table(path)
        elif ext == ".xlsx":
            frame = pd.read_excel(path, sheet_name=sheet if sheet is not None else 0,
                                  dtype=object, engine="openpyxl")
        else:
            frame = pd.read_parquet(path)
    except InputError:
        raise
    except Exception as exc:  # noqa: BLE001 - any reader failure is a bad file for the analyst
        raise InputError(f"cannot read {path.name!r} ({type(exc).__name__}: "
                         f"{str(exc).splitlines()[0] if str(exc) else 'unreadable'})") from None
    if frame.empty:
        raise InputError(f"file {path.name!r} has no data rows")
    frame.columns = [str(c).strip() for c in frame.columns]
    dupes = sorted({c for c in frame.columns if list(frame.columns).count(c) > 1})
    if dupes:
        raise InputError(f"file {path.name!r}: column {dupes[0]!r} appears more than once")
    return frame.reset_index(drop=True)


def _read_text_table(path: Path) -> pd.DataFrame:
    """A delimited text file as text cells: decoded and its separator found as single-series
    intake does (``intake.text_file``), then parsed by pandas' C reader (the Python reader's
    separator sniffing took a second for 120,000 rows)."""
    from ..intake.text_file import decode, guess_delimiter

    text = decode(path.read_bytes(), path.name)
    if not text.strip():
        raise InputError(f"file {path.name!r} is empty")
    return pd.read_csv(io.StringIO(text), dtype=str, keep_default_na=False,
                       sep=guess_delimiter(text, None), engine="c")


def _digest(frame: pd.DataFrame, extra: str = "", row_hashes=None) -> str:
    """sha256 of the cells of ``frame`` (``row_hashes``: its rows' pandas hashes, when already
    computed for the whole table)."""
    h = hashlib.sha256()
    h.update(repr((list(frame.columns), [str(t) for t in frame.dtypes], extra)).encode())
    if row_hashes is None:
        row_hashes = pd.util.hash_pandas_object(frame, index=False).to_numpy()
    h.update(np.ascontiguousarray(row_hashes).tobytes())
    return h.hexdigest()


def _column(frame: pd.DataFrame, name: str, option: str, path: Path) -> str:
    if name in frame.columns:
        return name
    folded = {c.lower(): c for c in frame.columns}
    if str(name).strip().lower() in folded:
        return folded[str(name).strip().lower()]
    raise InputError(f"option {option}: no column {name!r} in {path.name!r}; its columns are "
                     f"{', '.join(map(repr, frame.columns[:12]))}")


def _id_text(value) -> str:
    if value is None or (isinstance(value, float) and np.isnan(value)):
        return ""
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value).strip()


def _id_texts(column: pd.Series) -> pd.Series:
    """``_id_text`` of every cell; text cells (every cell of a text file) in one pass."""
    if pd.api.types.is_string_dtype(column) and not column.isna().any():
        return column.astype(str).str.strip()
    return column.map(_id_text)


def _long_tasks(frame, path, id_columns, date_column, value_column):
    ids = [_column(frame, c, "--id-column", path) for c in id_columns]
    if len(set(ids)) < len(ids):
        raise InputError("option --id-column: the same column is named twice")
    rest = [c for c in frame.columns if c not in ids]
    if date_column is not None:
        date_column = _column(frame, date_column, "--date-column", path)
    if value_column is not None:
        value_column = _column(frame, value_column, "--value-column", path)
    if len(rest) < 2:
        raise InputError(f"{path.name!r}: besides the id column(s) there must be a date column "
                         f"and a value column; found {', '.join(map(repr, rest)) or 'none'}")
    keys = [_id_texts(frame[c]) for c in ids]
    joined = keys[0] if len(keys) == 1 else pd.Series(
        [ID_SEPARATOR.join(t) for t in zip(*keys)], index=frame.index)
    rows_all = np.arange(2, len(frame) + 2)
    codes, order = pd.factorize(joined, sort=False)  # ids in order of first appearance
    # rows grouped by series once (stable: each series keeps its file order), so that every
    # series is a contiguous slice: slicing is cheap where picking rows per series is not
    by_series = np.argsort(codes, kind="stable")
    bounds = np.searchsorted(codes[by_series], np.arange(len(order) + 1))
    body = frame[rest].take(by_series)
    hashes = pd.util.hash_pandas_object(body, index=False).to_numpy()  # one pass, all rows
    load = {"date_column": date_column, "value_column": value_column}
    for g, key in enumerate(order):
        a, b = int(bounds[g]), int(bounds[g + 1])
        index = by_series[a:b]
        parts = tuple(k.iat[index[0]] for k in keys)
        sub = body.iloc[a:b].reset_index(drop=True)
        rows = rows_all[index]
        problem = None
        if any(p == "" for p in parts):
            empty = ids[[p == "" for p in parts].index(True)]
            problem = (f"rows {_rows_text(rows)}: column {empty!r} (an id column) is empty; "
                       f"give every row its id")
        yield SeriesTask(id=str(key), parts=parts, source=sub, rows=rows,
                         digest=_digest(sub, repr(rows[[0, -1]].tolist()) + str(len(rows)),
                                        hashes[a:b]),
                         problem=problem, load=load)


def _rows_text(rows) -> str:
    rows = [int(r) for r in rows]
    return ", ".join(map(str, rows[:8])) + (f" and {len(rows) - 8} more" if len(rows) > 8 else "")


def _blank(column: pd.Series) -> np.ndarray:
    return column.isna().to_numpy() | column.map(
        lambda v: isinstance(v, str) and v.strip() == "").to_numpy(dtype=bool)


def _wide_tasks(frame, path, date_column):
    date = (_column(frame, date_column, "--date-column", path) if date_column is not None
            else frame.columns[0])
    names = [c for c in frame.columns if c != date]
    if not names:
        raise InputError(f"{path.name!r} has only the date column {date!r}; a wide table has "
                         f"one column per series (or give --id-column for a long table)")
    rows_all = np.arange(2, len(frame) + 2)
    for name in names:
        present = np.flatnonzero(~_blank(frame[name]))
        if present.size == 0:
            sub = frame[[date, name]].iloc[:0]
            yield SeriesTask(id=str(name), parts=(str(name),), source=sub, rows=rows_all[:0],
                             digest=_digest(sub), problem=f"column {name!r} has no values")
            continue
        first, last = int(present[0]), int(present[-1]) + 1
        sub = frame[[date, name]].iloc[first:last].reset_index(drop=True)
        rows = rows_all[first:last]
        yield SeriesTask(id=str(name), parts=(str(name),), source=sub, rows=rows,
                         digest=_digest(sub, f"{first}:{last}"),
                         load={"date_column": date, "value_column": name})


def _folder_tasks(folder: Path, date_column, value_column, sheet):
    files = sorted(p for p in folder.iterdir()
                   if p.is_file() and not p.name.startswith(".")
                   and p.suffix.lower() in TABLE_EXTENSIONS)
    if not files:
        raise InputError(f"folder {folder} holds no {', '.join(TABLE_EXTENSIONS)} files")
    stems = [p.stem for p in files]
    for p in files:
        ident = p.stem if stems.count(p.stem) == 1 else p.name
        digest = hashlib.sha256(p.read_bytes()).hexdigest()
        yield SeriesTask(id=ident, parts=(ident,), source=p, digest=digest,
                         load={"date_column": date_column, "value_column": value_column,
                               "sheet": sheet})


_ROW_NUMBERS = re.compile(r"\b(rows?) (\d+(?:(?:, | and |, and )\d+(?!\d| more))*)")


def file_rows_message(message: str, rows) -> str:
    """Intake numbers a frame's rows 2, 3, ...; rewrite those numbers as the portfolio file's
    rows (``rows[k]`` is the file row of frame row k + 2)."""
    if rows is None:
        return message

    def number(match):
        k = int(match.group(0)) - 2
        return str(int(rows[k])) if 0 <= k < len(rows) else match.group(0)

    def fix(m):
        return m.group(1) + " " + re.sub(r"\d+", number, m.group(2))

    return _ROW_NUMBERS.sub(fix, message)
