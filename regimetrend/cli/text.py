"""Plain-text helpers for the terminal: number formatting, aligned tables, the cautions."""

from __future__ import annotations

import math

from .. import numformat


def fmt(x, digits: int | None = None) -> str:
    """A number rounded for reading by the one rule of ``regimetrend.numformat`` (``digits``
    fixes the decimals instead); ``-`` when missing."""
    if digits is None:
        return numformat.number(x, missing="-")
    if x is None or not math.isfinite(float(x)):
        return "-"
    text = f"{float(x):,.{digits}f}"
    return "0" if text.lstrip("-").strip("0.,") == "" else text


def table(header: list[str], rows: list[list[str]]) -> str:
    """Left-aligned first column, right-aligned others, two spaces apart."""
    cells = [header] + [[str(c) for c in row] for row in rows]
    widths = [max(len(r[i]) for r in cells) for i in range(len(header))]
    out = []
    for j, row in enumerate(cells):
        parts = [row[0].ljust(widths[0])] + [c.rjust(w) for c, w in zip(row[1:], widths[1:])]
        out.append("  ".join(parts).rstrip())
        if j == 0:
            out.append("  ".join("-" * w for w in widths))
    return "\n".join(out)


def caution_lines() -> list[str]:
    """The standing cautions shown with a plain trend forecast."""
    from ..cautions import EXTRAPOLATION, JUDGEMENT

    return [EXTRAPOLATION, JUDGEMENT]
