"""Which decimal mark a text file uses when the caller did not say.

In a comma-separated file the decimal mark is the point (a comma inside a quoted value groups
thousands). With another separator (``;``, tab, ``|``) both marks are common, so the numbers
decide: ``201,5``, ``0,125`` or ``1.234,5`` can only mean a decimal comma; ``201.5`` or
``1,234.5`` only a decimal point. A column whose only marks are followed by exactly three digits
(``200,002``) could be read either way, 1000 times apart; ``ambiguous_cell`` finds such a cell so
that intake refuses it and asks for ``--decimal`` instead of guessing.
"""

from __future__ import annotations

import re

from ..errors import InputError
from .dates import date_from_text
from .table import Table
from .values import is_missing

_SAMPLE = 500
_MONEY = re.compile(r"[$€£¥₹]")
_SIGN = re.compile(r"^[-+\u2212(]?\s*")
_EITHER = re.compile(r"[1-9]\d{0,2}[.,]\d{3}")  # one mark, three digits after: either reading
_COMMA_DECIMAL = re.compile(r"\d*,\d+|\d{1,3}(?:\.\d{3})+,\d*|\d{1,3}(?:\.\d{3}){2,}")
_POINT_DECIMAL = re.compile(r"\d*\.\d+|\d{1,3}(?:,\d{3})+\.\d*|\d{1,3}(?:,\d{3}){2,}")


def _text(cell) -> str | None:
    """The bare number text of a text cell (sign and spaces removed), None for other cells."""
    if not isinstance(cell, str) or is_missing(cell) or date_from_text(cell) is not None:
        return None
    return _SIGN.sub("", _MONEY.sub("", cell.strip())).rstrip(")").replace(" ", "")


def decimal_mark(table: Table):
    """'.' or ',' for the table's numbers, or None when nothing in a text file tells them apart.

    Tables that are not text files, and comma-separated files, use the point.
    """
    if table.separator in (None, ","):
        return "."
    comma = point = 0
    for column in table.columns:
        cells = table.cells[column]
        if not isinstance(cells, list):
            continue
        for cell in cells[:_SAMPLE]:
            text = _text(cell)
            if not text or _EITHER.fullmatch(text):
                continue
            comma += bool(_COMMA_DECIMAL.fullmatch(text))
            point += bool(_POINT_DECIMAL.fullmatch(text))
    if comma or point:
        return "," if comma > point else "."
    return None


def refuse_either_reading(table: Table, column: str) -> None:
    """InputError at the first cell of ``column`` that reads either way (``200,002``)."""
    cells = table.cells[column]
    if not isinstance(cells, list):
        return
    for cell, row in zip(cells, table.rows):
        text = _text(cell)
        if text and _EITHER.fullmatch(text):
            mark = "," if "," in text else "."
            other = "." if mark == "," else ","
            shown = str(cell).strip()
            whole = shown.replace(mark, "")
            raise InputError(
                f"row {row}, column {column!r}: {shown!r} could be {whole} ({mark!r} grouping "
                f"thousands) or {shown.replace(mark, '.')} ({mark!r} as the decimal mark) in a "
                f"{table.separator!r}-separated file; say which with --decimal {mark} (decimal "
                f"{'comma' if mark == ',' else 'point'}) or --decimal {other}")
