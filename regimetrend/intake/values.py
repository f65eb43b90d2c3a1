"""Value cells: missing markers, numbers written by people (grouping, currency, accounting
parentheses, either decimal mark), and the value column read into floats.

A value such as ``12%`` is rejected rather than read: it could mean 12 or 0.12, and a growth model
fitted on the wrong scale gives wrong growth figures without any warning.
"""

from __future__ import annotations

import math
import re
from decimal import Decimal

import numpy as np
import pandas as pd

from ..errors import InputError

MISSING_WORDS = {"", "na", "n/a", "nan", "null", "none", "-", "--", "\u2014", ".", "#n/a"}

_CURRENCY = re.compile(r"^(?:[$€£¥₹]|usd|eur|gbp|chf|jpy|cad|aud)\s*|\s*(?:[$€£¥₹]|usd|eur|"
                       r"gbp|chf|jpy|cad|aud)$", re.IGNORECASE)
PLAIN = re.compile(r"[-+]?(\d+([.,]\d*)?|[.,]\d+)([eE][-+]?\d+)?")
_SPACES = re.compile(r"[\s\u00a0\u202f\u2009']")


def plain_number(text: str) -> bool:
    """True for text that is just digits with at most one mark (no signs of money or grouping)."""
    return bool(PLAIN.fullmatch(text.strip()))


def plain_float(text: str, decimal: str):
    """The float of a plain number written with ``decimal`` as its mark, or None."""
    t = text.strip()
    if not PLAIN.fullmatch(t):
        return None
    other = "," if decimal == "." else "."
    if other in t:
        return None
    return float(t.replace(",", "."))


def is_missing(cell) -> bool:
    """True for empty cells, NaN/NaT and the usual words for 'no value' (NA, n/a, null, -)."""
    if cell is None or cell is pd.NA:
        return True
    if isinstance(cell, Decimal):
        return cell.is_nan()
    if isinstance(cell, (float, np.floating)) and math.isnan(cell):
        return True
    if isinstance(cell, str):
        return cell.strip().lower() in MISSING_WORDS
    return cell is pd.NaT or (isinstance(cell, np.datetime64) and np.isnat(cell))


def number(cell, decimal: str) -> float:
    """A float from a number cell or text with grouping, currency, parentheses; ValueError if not.

    Missing cells are not numbers; callers check ``is_missing`` first.
    """
    # ValueError (not TypeError) for every cell that is no number: callers catch one kind
    if isinstance(cell, bool):
        raise ValueError("a true/false cell is not a number")  # noqa: TRY004
    if isinstance(cell, (int, float, np.integer, np.floating, Decimal)):
        return float(cell)
    if not isinstance(cell, str):
        raise ValueError(f"a {type(cell).__name__} cell is not a number")  # noqa: TRY004
    s = cell.strip().replace("\u2212", "-")
    if "%" in s:
        raise ValueError("percent")
    negative = False
    for _ in range(3):  # peel currency, sign and accounting parentheses in any order
        s = _CURRENCY.sub("", s).strip()
        if s.startswith("(") and s.endswith(")"):
            negative, s = not negative, s[1:-1].strip()
        elif s and s[0] in "-+":
            negative, s = negative != (s[0] == "-"), s[1:].strip()
    if s.lower() in ("inf", "infinity", "\u221e"):
        return -math.inf if negative else math.inf
    group = "," if decimal == "." else "."
    s = _SPACES.sub(" ", s)
    parts = re.fullmatch(r"(.*?)((?:[eE][-+]?\d+)?)", s)
    assert parts is not None  # the first group matches any text
    mantissa, exponent = parts.groups()
    whole, _, fraction = mantissa.partition(decimal)
    if decimal in fraction or group in fraction or " " in fraction:
        raise ValueError("mark")
    if not re.fullmatch(r"\d*", fraction):
        raise ValueError("fraction")
    if group in whole or " " in whole:
        if not re.fullmatch(rf"\d{{1,3}}(?:[{re.escape(group)} ]\d{{3}})+", whole):
            raise ValueError("grouping")
        whole = re.sub(r"\D", "", whole)
    elif not re.fullmatch(r"\d*", whole):
        raise ValueError("digits")
    if not whole and not fraction:
        raise ValueError("empty")
    value = float(f"{whole or '0'}.{fraction or '0'}{exponent}")
    return -value if negative else value


def numbers(cells, decimal):
    """All non-missing cells as floats, or None if any is not a plain number."""
    if isinstance(cells, np.ndarray):
        if np.issubdtype(cells.dtype, np.number):
            return cells[~np.isnan(cells)].astype(float)
        return None
    other = "," if decimal == "." else "."
    if cells and all(isinstance(c, str) and PLAIN.fullmatch(c) and other not in c
                     for c in cells):  # fast path: text that is plain numbers throughout
        return np.array([c.replace(",", ".") for c in cells], dtype=float)
    out = []
    for c in cells:
        if is_missing(c):
            continue
        if isinstance(c, bool):
            return None
        if isinstance(c, (int, float, np.integer, np.floating, Decimal)):
            out.append(float(c))
        elif isinstance(c, str) and plain_float(c, decimal) is not None:
            out.append(plain_float(c, decimal))
        else:
            return None
    return np.array(out, dtype=float)


def parse_values(cells, rows, column, decimal) -> np.ndarray:
    """Floats for the value column, NaN where missing; InputError for unreadable or infinite."""
    values: np.ndarray | None
    if isinstance(cells, np.ndarray) and np.issubdtype(cells.dtype, np.number):
        values = cells.astype(float)
    elif isinstance(cells, np.ndarray):
        raise InputError(f"column {column!r} holds dates, not values; choose the value column "
                         f"with --value-column")
    else:
        values = _plain_floats(cells, decimal)
    if values is None:
        values = np.empty(len(cells), dtype=float)
        for k, cell in enumerate(cells):
            if is_missing(cell):
                values[k] = np.nan
                continue
            try:
                values[k] = number(cell, decimal)
            except ValueError as exc:
                raise InputError(_bad_value_message(cell, rows[k], column, decimal, str(exc))) \
                    from None
    bad = np.flatnonzero(np.isinf(values))
    if bad.size:
        raise InputError(f"row {rows[bad[0]]}, column {column!r}: the value is infinite")
    return values


_PLAIN_WITH = {
    mark: re.compile(rf"[-+]?(?:\d{{1,3}}(?:{re.escape(group)}\d{{3}})+|\d+)"
                     rf"(?:{re.escape(mark)}\d*)?(?:[eE][-+]?\d+)?")
    for mark, group in ((".", ","), (",", "."))
}


def _plain_floats(cells, decimal: str):
    """Fast path for text cells that are all plain numbers (grouped or not) with ``decimal``.

    Reads exactly what ``number`` reads for such cells; None sends the column to ``number``.
    """
    pattern = _PLAIN_WITH[decimal]
    if not all(isinstance(c, str) and pattern.fullmatch(c) for c in cells):
        return None
    group = "," if decimal == "." else "."
    return np.array([c.replace(group, "").replace(decimal, ".") for c in cells], dtype=float)


def _bad_value_message(cell, row, column, decimal, reason) -> str:
    text = str(cell).strip()
    where = f"row {row}, column {column!r}"
    if reason == "percent":
        return (f"{where}: {text!r} has a percent sign, which could mean {text.rstrip('% ')} or a "
                f"hundredth of it; write the number without the sign in the scale you mean")
    other = "," if decimal == "." else "."
    try:
        number(cell, other)
        return (f"{where}: cannot read {text!r} as a number with {decimal!r} as the decimal "
                f"mark; if {other!r} is the decimal mark, use --decimal {other}")
    except ValueError:
        return f"{where}: cannot read {text!r} as a number"
