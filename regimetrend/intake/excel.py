"""Reading one sheet of an Excel workbook (.xlsx) with openpyxl, cells as Excel holds them."""

from __future__ import annotations

from pathlib import Path

from ..errors import InputError
from .table import SUPPORTED_EXTENSIONS, Table, table_from_records


def read_excel(path: Path, sheet) -> Table:
    """The chosen sheet (name, 0-based position, or the first) as a table with sheet rows."""
    import openpyxl

    try:
        book = openpyxl.load_workbook(path, read_only=True, data_only=True)
    except Exception as exc:  # noqa: BLE001 - any failure means a bad file
        raise InputError(f"cannot read {path.name!r} as an Excel workbook ({type(exc).__name__}); "
                         f"supported file types are {', '.join(SUPPORTED_EXTENSIONS)}") from None
    try:
        names = book.sheetnames
        if isinstance(sheet, str) and sheet not in names and sheet.strip().isdigit():
            sheet = int(sheet)
        if sheet is None:
            chosen = names[0]
        elif isinstance(sheet, int) and 0 <= sheet < len(names):
            chosen = names[sheet]
        elif isinstance(sheet, str) and sheet in names:
            chosen = sheet
        else:
            raise InputError(f"sheet {sheet!r} not found in {path.name!r}; its sheets are "
                             f"{', '.join(names)}")
        ws = book[chosen]
        if not hasattr(ws, "iter_rows"):
            raise InputError(f"sheet {chosen!r} of {path.name!r} is a chart, not a table; its "
                             f"sheets are {', '.join(names)}")
        records = []
        for number, raw in enumerate(ws.iter_rows(min_row=1, values_only=True), start=1):
            cells = ["" if c is None else (c.strip() if isinstance(c, str) else c) for c in raw]
            if any(c != "" for c in cells):
                records.append((number, cells))
    finally:
        book.close()
    if not records:
        raise InputError(f"sheet {chosen!r} of {path.name!r} is empty")
    table = table_from_records(records, f"file {path.name!r}")
    table.sheet, table.sheets = chosen, tuple(names)
    return table


def sheet_names(path: Path) -> list[str]:
    """The workbook's sheet names in order ([] when it cannot be opened)."""
    import openpyxl

    try:
        book = openpyxl.load_workbook(path, read_only=True)
    except Exception:  # noqa: BLE001 - the caller already has the file's own error to show
        return []
    try:
        return list(book.sheetnames)
    finally:
        book.close()
