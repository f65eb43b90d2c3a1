"""Numbers written for people: one rounding rule by magnitude, used by the terminal and the report.

The rule (JSON, CSV and the workbook keep full precision; only text read by people is rounded):

- a plain number (a level, a forecast, an error, a slope per period) keeps about three
  significant figures, never fewer than the whole-number digits:

  ========================  ==============================  ===================
  size                      written as                      example
  ========================  ==============================  ===================
  1,000,000,000 and above   three figures and a word        1.47 billion
  100 to 999,999,999        whole number, thousands comma   14,683 ; 630
  10 to 100                 one decimal                     62.9
  1 to 10                   two decimals                    6.30
  below 1                   three significant figures       0.630 ; 0.00226
  ========================  ==============================  ===================

- a percentage has one decimal from 1% up (12.5%) and two significant figures below (0.42%,
  0.035%);
- a value that rounds to zero is written ``0`` (``0%``), never ``-0.0`` or ``+0``: a tiny
  non-zero value keeps its significant figures instead (``+0.00226``);
- a p-value has three decimals, ``< 0.001`` below that;
- ``signed`` puts an explicit ``+`` before positive changes; exponents (``1.468e+04``) are never
  written;
- missing or non-finite values are written as the caller's ``missing`` text.
"""

from __future__ import annotations

import math

MISSING = "\u2013"  # en dash
_WORDS = ((1e12, "trillion"), (1e9, "billion"))


def _finite(x) -> float | None:
    if x is None or isinstance(x, bool):
        return None
    try:
        v = float(x)
    except (TypeError, ValueError):
        return None
    return v if math.isfinite(v) else None


def _decimals(a: float, figures: int) -> int:
    """Decimals that keep ``figures`` significant figures of a number of size ``a`` below 1."""
    return max(0, figures - 1 - math.floor(math.log10(a)))


def _digits(a: float) -> int:
    """Decimals for a plain number of size ``a`` (the table in the module docstring)."""
    if a >= 100:
        return 0
    if a >= 10:
        return 1
    if a >= 1:
        return 2
    return _decimals(a, 3)


def _plain(v: float) -> str:
    a = abs(v)
    if a < 1e-12:
        return "0"
    for i, (size, word) in enumerate(_WORDS):
        if a >= size:
            scaled = v / size
            text = f"{scaled:,.{_digits(abs(scaled))}f}"
            if i and abs(float(text.replace(",", ""))) >= 1000:  # 999.96 billion -> trillion
                return _plain(math.copysign(1000.0 * size, v))
            return f"{text} {word}"
    digits = _digits(a)
    text = f"{v:,.{digits}f}"
    rounded = abs(float(text.replace(",", "")))
    if rounded >= _WORDS[-1][0]:
        return _plain(math.copysign(rounded, v))
    if _digits(rounded) != digits:  # 99.96 -> "100.0": written by the rule of its rounded size
        text = f"{v:,.{_digits(rounded)}f}"
    return text


def number(x, missing: str = MISSING) -> str:
    """A plain number by the magnitude rule, e.g. ``14,683``, ``62.9``, ``0.00226``."""
    v = _finite(x)
    if v is None:
        return missing
    text = _plain(v)
    return "0" if text.lstrip("-") == "0" else text


def signed(x, missing: str = MISSING) -> str:
    """A change with its sign, e.g. ``+3.12``, ``-0.00226``; zero has no sign."""
    text = number(x, missing)
    if text in ("0", missing):
        return text
    return text if text.startswith("-") else "+" + text


def _percent(v: float) -> str:
    a = abs(v)
    if a < 5e-4:
        return "0"
    text = f"{v:.1f}" if a >= 0.995 else f"{v:.{_decimals(a, 2)}f}"
    return "0" if float(text) == 0 else text


def percent(x, missing: str = MISSING, sign: bool = False, symbol: bool = True) -> str:
    """A percentage, e.g. ``12.5%``, ``0.42%``; ``sign`` adds ``+`` to positive values,
    ``symbol=False`` leaves out the ``%`` (for table columns whose heading says %)."""
    v = _finite(x)
    if v is None:
        return missing
    text = _percent(v)
    if sign and text != "0" and not text.startswith("-"):
        text = "+" + text
    return text + ("%" if symbol else "")


def points(x, missing: str = MISSING) -> str:
    """A difference of two percentages in percentage points, signed, e.g. ``+1.3``."""
    return percent(x, missing, sign=True, symbol=False)


def pvalue(x, missing: str = MISSING) -> str:
    """A p-value: three decimals, ``< 0.001`` below that and ``> 0.999`` above (a simulated
    p-value of 1 means no simulated statistic was smaller, not certainty)."""
    v = _finite(x)
    if v is None:
        return missing
    if v < 0.001:
        return "< 0.001"
    return "> 0.999" if v > 0.999 else f"{v:.3f}"


def statistic(x, missing: str = MISSING) -> str:
    """A test statistic (F, t, DM): two decimals below 100, whole above."""
    v = _finite(x)
    if v is None:
        return missing
    return f"{v:,.0f}" if abs(v) >= 100 else f"{v:.2f}"


def interval(low, high, kind=number, missing: str = MISSING) -> str:
    """``low to high`` in one format, or ``missing`` when either end is missing."""
    if _finite(low) is None or _finite(high) is None:
        return missing
    return f"{kind(low)} to {kind(high)}"


def count(x, missing: str = MISSING) -> str:
    """A whole number with thousands separated."""
    v = _finite(x)
    return missing if v is None else f"{round(v):,d}"
