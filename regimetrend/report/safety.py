"""Making user-data strings harmless in the outputs.

- HTML: every string that comes from the user's data (series, column and file names, labels) is
  escaped before it enters the page, quotes included, so markup or script in a name shows as text.
- CSV and spreadsheets: a text cell that starts with ``=``, ``+``, ``-`` or ``@`` (or a tab or
  carriage return, which some programs strip before reading a formula) would be run as a formula
  by a spreadsheet program. Such cells get a leading apostrophe, which spreadsheets show as
  plain text. Numbers stay numbers: only text cells are touched.
"""

from __future__ import annotations

import html
import math

FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def esc(value) -> str:
    """Text for HTML, escaped (``<``, ``>``, ``&``, and both quote marks)."""
    return html.escape("" if value is None else str(value), quote=True)


def inert_text(text: str) -> str:
    """A text cell a spreadsheet shows as text, never runs as a formula."""
    return "'" + text if text.startswith(FORMULA_STARTS) else text


def cell(value):
    """A table cell for CSV or a workbook: numbers unchanged (NaN and infinities empty),
    booleans as words, every other value as inert text."""
    if value is None:
        return None
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, (int, float)):
        return value if math.isfinite(float(value)) else None
    try:  # numpy scalars
        import numpy as np

        if isinstance(value, np.bool_):
            return "yes" if bool(value) else "no"
        if isinstance(value, np.integer):
            return int(value)
        if isinstance(value, np.floating):
            v = float(value)
            return v if math.isfinite(v) else None
    except ImportError:  # pragma: no cover - numpy is a dependency
        pass
    return inert_text(str(value))
