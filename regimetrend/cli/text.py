"""Plain-text helpers for the terminal: number formatting, aligned tables, the cautions."""

from __future__ import annotations

import math


def fmt(x, digits: int | None = None) -> str:
    """A number rounded for reading: about four significant figures, thousands separated."""
    if x is None:
        return "-"
    x = float(x)
    if not math.isfinite(x):
        return "-"
    if digits is None:
        ax = abs(x)
        digits = 0 if ax >= 1000 else 1 if ax >= 100 else 2 if ax >= 1 else 3
    return f"{x:,.{digits}f}"


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
