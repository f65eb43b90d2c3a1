"""The calendar: frequency words, inferring unit and step from the dates, aligning dates to the
start of their period, and placing every row on one regular calendar (holes named or filled)."""

from __future__ import annotations

import re

import numpy as np
import pandas as pd

from ..errors import InputError
from ..series import Frequency
from .wording import listing

# words accepted by --frequency, each mapped to (unit, step)
FREQUENCY_WORDS = {
    "annual": ("year", 1), "annually": ("year", 1), "yearly": ("year", 1), "year": ("year", 1),
    "quarterly": ("quarter", 1), "quarter": ("quarter", 1),
    "monthly": ("month", 1), "month": ("month", 1),
    "weekly": ("week", 1), "week": ("week", 1),
    "daily": ("day", 1), "day": ("day", 1),
    "biweekly": ("week", 2), "fortnightly": ("week", 2),
    "semiannual": ("month", 6), "half-yearly": ("month", 6),
}
_UNIT_WORDS = {"year": "year", "years": "year", "quarter": "quarter", "quarters": "quarter",
               "month": "month", "months": "month", "week": "week", "weeks": "week",
               "day": "day", "days": "day"}
MONTHS_PER_UNIT = {"year": 12, "quarter": 3, "month": 1}
_DAYS_PER_UNIT = {"week": 7, "day": 1}


MAX_STEP = 1000  # units per period: beyond this no calendar arithmetic is meaningful


def parse_frequency(text) -> Frequency:
    """Read a plain-word frequency: ``monthly``, ``quarterly``, ``2 weeks``, ``every 10 years``.

    Accepts the words in ``FREQUENCY_WORDS`` and ``[every] N unit(s)`` with unit one of year,
    quarter, month, week, day. A ``Frequency`` passes through unchanged.
    """
    if isinstance(text, Frequency):
        return text
    words = " ".join(str(text).strip().lower().replace("_", " ").split())
    if words in FREQUENCY_WORDS:
        return Frequency(*FREQUENCY_WORDS[words])
    m = re.fullmatch(r"(?:every\s+)?(\d+)\s*-?\s*([a-z]+)", words)
    if m and m.group(2) in _UNIT_WORDS and int(m.group(1)) >= 1:
        if int(m.group(1)) > MAX_STEP:
            raise InputError(f"--frequency {str(text)!r}: a period of more than {MAX_STEP:,} "
                             f"{_UNIT_WORDS[m.group(2)]}s is not a business calendar; check "
                             f"the number")
        return Frequency(_UNIT_WORDS[m.group(2)], int(m.group(1)))
    m = re.fullmatch(r"every\s+([a-z]+)", words)
    if m and m.group(1) in _UNIT_WORDS:
        return Frequency(_UNIT_WORDS[m.group(1)], 1)
    raise InputError(f"--frequency {str(text)!r} is not understood; use annual, quarterly, "
                     f"monthly, weekly or daily, or a multiple such as '2 weeks' or '10 years'")


def frequency_option(frequency):
    """The ``Frequency`` the caller asked for, or None to infer it."""
    if frequency is None or (isinstance(frequency, str) and not frequency.strip()):
        return None
    return parse_frequency(frequency)


def reject_duplicates(starts, rows, column, what) -> None:
    """InputError naming the first two neighbouring rows with the same (sorted) start."""
    same = np.flatnonzero(starts[1:] == starts[:-1])
    if same.size:
        i = int(same[0])
        first, second = sorted((int(rows[i]), int(rows[i + 1])))
        raise InputError(f"rows {first} and {second} {what} ({starts[i]}, column {column!r}); "
                         f"keep one row per period")


def _mode(d: np.ndarray) -> int:
    values, counts = np.unique(d, return_counts=True)
    return int(values[np.argmax(counts)])


def _month_numbers(starts) -> np.ndarray:
    return starts.astype("datetime64[M]").astype(np.int64)


def infer_frequency(starts, rows, hint, column) -> Frequency:
    """Unit and step from the notation (hint) and the spacing of the sorted period starts."""
    idx = pd.DatetimeIndex(starts)
    same_day_of_month = bool(np.all(idx.day == idx.day[0])) and idx.day[0] <= 28
    month_family = hint in MONTHS_PER_UNIT or same_day_of_month \
        or bool(np.all(idx.is_month_end))
    if month_family:
        d = np.diff(_month_numbers(starts))
        if hint in MONTHS_PER_UNIT:
            unit = hint
        elif np.all(idx.month == idx.month[0]) and _mode(d) % 12 == 0:
            unit = "year"
        elif np.all(idx.month % 3 == idx.month[0] % 3) and _mode(d) % 3 == 0:
            unit = "quarter"
        else:
            unit = "month"
        if unit != "month":
            d = np.diff(_month_numbers(period_starts(starts, unit))) // MONTHS_PER_UNIT[unit]
        if np.any(d == 0):
            raise InputError(_same_period_message(d, rows, unit, column))
        return Frequency(unit, _regular_step(d, rows, unit, column))
    d = np.diff(starts.astype(np.int64))
    if np.all(d % 7 == 0):
        return Frequency("week", _regular_step(d // 7, rows, "week", column),
                         int(idx[0].day_of_week))
    return Frequency("day", _regular_step(d, rows, "day", column))


def _same_period_message(d, rows, unit, column) -> str:
    i = int(np.flatnonzero(d == 0)[0])
    first, second = sorted((int(rows[i]), int(rows[i + 1])))
    return (f"rows {first} and {second} fall in the same {unit} (column {column!r}); keep one "
            f"row per period")


def _regular_step(d, rows, unit, column) -> int:
    step = _mode(d)
    odd = np.flatnonzero(d % step != 0)
    if odd.size:
        i = int(odd[0])
        raise InputError(f"rows {rows[i]} and {rows[i + 1]} (column {column!r}) are {d[i]} "
                         f"{unit}s apart while most neighbours are {step} apart, so the calendar "
                         f"is not regular; set --frequency if it should be")
    return step


def period_starts(starts, unit) -> np.ndarray:
    """Move each date to the start of its year/quarter/month; weeks and days stay as they are."""
    if unit == "year":
        return starts.astype("datetime64[Y]").astype("datetime64[D]")
    if unit == "quarter":
        m = _month_numbers(starts)
        return (m - m % 3).astype("datetime64[M]").astype("datetime64[D]")
    if unit == "month":
        return starts.astype("datetime64[M]").astype("datetime64[D]")
    return starts


def calendar_positions(aligned, rows, freq: Frequency, column) -> np.ndarray:
    """Position of each period on the regular calendar that starts at the first period."""
    if freq.unit in MONTHS_PER_UNIT:
        span = MONTHS_PER_UNIT[freq.unit] * freq.step
        offsets = _month_numbers(aligned) - _month_numbers(aligned[:1])[0]
    else:
        span = _DAYS_PER_UNIT[freq.unit] * freq.step
        offsets = aligned.astype(np.int64) - aligned[:1].astype(np.int64)[0]
    off = np.flatnonzero(offsets % span != 0)
    if off.size:
        i = int(off[0])
        raise InputError(f"row {rows[i]}, column {column!r}: {freq.label(aligned[i])} is not on "
                         f"the {freq.name} calendar that starts {freq.label(aligned[0])}; check "
                         f"the date or set --frequency")
    return offsets // span


def complete_calendar(aligned, values, rows, positions, freq, column, fill_missing):
    """Insert missing periods and fill missing values (only when asked); else explain the hole."""
    total = int(positions[-1]) + 1
    present = np.zeros(total, dtype=bool)
    present[positions] = True
    holes = np.flatnonzero(~present)
    all_starts = _calendar_from(aligned[0], total, freq)
    missing_rows = rows[np.isnan(values)]
    if not fill_missing:
        if holes.size:
            k = int(holes[0])
            after = int(np.searchsorted(positions, k))
            run = [int(h) for h in holes]
            labels = listing([freq.label(all_starts[h]) for h in run], limit=5, quote=False)
            raise InputError(f"gap in the {freq.name} calendar: {labels} missing ({holes.size} "
                             f"period{'s' if holes.size > 1 else ''}; first gap before row "
                             f"{rows[after]}); add the rows or use --fill-missing to interpolate")
        if missing_rows.size:
            raise InputError(f"row {missing_rows[0]}, column {column!r}: the value is missing "
                             f"({missing_rows.size} missing in all: rows "
                             f"{listing(missing_rows, limit=8, quote=False)}); fix the file or "
                             f"use --fill-missing to interpolate")
        return aligned, values, None
    full = np.full(total, np.nan)
    full[positions] = values
    gaps = np.flatnonzero(np.isnan(full))
    if not gaps.size:
        return aligned, values, None
    known = np.flatnonzero(~np.isnan(full))
    if known.size < 2 or gaps[0] < known[0] or gaps[-1] > known[-1]:
        end = "start" if gaps[0] < known[0] else "end"
        raise InputError(f"column {column!r}: values are missing at the {end} of the series, "
                         f"where interpolation has no value on one side; remove those rows")
    full[gaps] = np.interp(gaps, known, full[known])
    parts = []
    if missing_rows.size:
        parts.append(f"rows {listing(missing_rows, limit=10, quote=False)}")
    if holes.size:
        parts.append("missing periods " + listing([freq.label(all_starts[h]) for h in holes],
                                                  limit=10, quote=False))
    note = (f"filled {gaps.size} missing value{'s' if gaps.size > 1 else ''} by linear "
            f"interpolation: {'; '.join(parts)}")
    return all_starts, full, note


def _calendar_from(first, total, freq: Frequency) -> np.ndarray:
    if freq.unit in MONTHS_PER_UNIT:
        span = MONTHS_PER_UNIT[freq.unit] * freq.step
        m0 = _month_numbers(np.array([first]))[0]
        return (m0 + span * np.arange(total)).astype("datetime64[M]").astype("datetime64[D]")
    span = _DAYS_PER_UNIT[freq.unit] * freq.step
    return first + np.arange(total) * np.timedelta64(span, "D")
