"""The validated series every later stage works on, and its calendar.

A ``Series`` is a regular calendar of period starts (``datetime64[D]``) with one float value per
period. ``Frequency`` knows how to step that calendar forward (for forecasts), how many periods
make a year (for annualised growth), the default season length, and how to write a period in
the series' own notation (``2019-07``, ``2019Q3``, ``2019``, ...).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd
from pandas.tseries.offsets import BaseOffset

# unit -> (pandas offset alias for period starts, periods per year for step 1, season length)
_UNITS = {
    "year": ("YS", 1.0, 1),
    "quarter": ("QS", 4.0, 4),
    "month": ("MS", 12.0, 12),
    "week": ("W", 52.1775, 52),
    "day": ("D", 365.25, 7),
}


@dataclass(frozen=True)
class Frequency:
    """A regular calendar: a unit (year, quarter, month, week, day) and a step (every k units)."""

    unit: str
    step: int = 1
    weekday: int = 0  # for weekly calendars: weekday of the period start (Monday = 0)

    def __post_init__(self):
        if self.unit not in _UNITS:
            raise ValueError(f"unknown frequency unit {self.unit!r}")
        if self.step < 1:
            raise ValueError("frequency step must be at least 1")

    @property
    def name(self) -> str:
        """Plain name, e.g. ``monthly``, ``quarterly``, ``every 2 weeks``."""
        if self.step == 1:
            return {"year": "annual", "quarter": "quarterly", "month": "monthly",
                    "week": "weekly", "day": "daily"}[self.unit]
        return f"every {self.step} {self.unit}s"

    @property
    def periods_per_year(self) -> float:
        return _UNITS[self.unit][1] / self.step

    @property
    def season_length(self) -> int:
        """Default season length: 12 monthly, 4 quarterly, 52 weekly, 7 daily, 1 otherwise."""
        return _UNITS[self.unit][2] if self.step == 1 else 1

    def offset(self) -> BaseOffset:
        alias = _UNITS[self.unit][0]
        if self.unit == "week":
            day = ["MON", "TUE", "WED", "THU", "FRI", "SAT", "SUN"][self.weekday]
            return pd.tseries.frequencies.to_offset(f"{self.step}W-{day}")
        return pd.tseries.frequencies.to_offset(f"{self.step}{alias}")

    def future(self, last: np.datetime64, h: int) -> np.ndarray:
        """The h period starts after ``last``."""
        rng = pd.date_range(pd.Timestamp(last), periods=h + 1, freq=self.offset())
        return rng[1:].values.astype("datetime64[D]")

    def label(self, start) -> str:
        """A period start written in the series' own notation."""
        ts = pd.Timestamp(start)
        if self.unit == "year":
            return f"{ts.year}"
        if self.unit == "quarter":
            return f"{ts.year}Q{(ts.month - 1) // 3 + 1}"
        if self.unit == "month":
            return f"{ts.year}-{ts.month:02d}"
        return ts.strftime("%Y-%m-%d")

    def season_of(self, start) -> int:
        """Calendar season (0-based) of a period start, so seasonal terms line up with the calendar."""
        ts = pd.Timestamp(start)
        if self.step != 1:
            return 0
        if self.unit == "quarter":
            return (ts.month - 1) // 3
        if self.unit == "month":
            return ts.month - 1
        if self.unit == "day":
            return ts.day_of_week
        if self.unit == "week":
            return min(ts.isocalendar()[1] - 1, 51)
        return 0

    def to_dict(self) -> dict:
        return {"unit": self.unit, "step": self.step, "name": self.name,
                "periods_per_year": self.periods_per_year}


@dataclass(frozen=True, eq=False)
class Series:
    """A validated, regular series: period starts, float values, its calendar and intake notes."""

    name: str
    starts: np.ndarray  # datetime64[D], strictly increasing, regular in ``frequency``
    values: np.ndarray  # float64, finite
    frequency: Frequency
    notes: tuple[str, ...] = field(default=())  # what intake did (sorted, filled, ...)

    def __post_init__(self):
        starts = np.asarray(self.starts, dtype="datetime64[D]").copy()
        values = np.asarray(self.values, dtype=float).copy()
        if starts.shape != values.shape or values.ndim != 1:
            raise ValueError("starts and values must be 1-d and of equal length")
        starts.setflags(write=False)
        values.setflags(write=False)
        object.__setattr__(self, "starts", starts)
        object.__setattr__(self, "values", values)

    def __len__(self) -> int:
        return len(self.values)

    @property
    def n(self) -> int:
        return len(self.values)

    def label(self, i: int) -> str:
        """Label of the period at position i (positions past the end are forecast periods)."""
        return self.frequency.label(self.start_of(i))

    def start_of(self, i: int) -> np.datetime64:
        """Period start of position i; positions past the end step the calendar forward."""
        if 0 <= i < self.n:
            return self.starts[i]
        if i >= self.n:
            return self.frequency.future(self.starts[-1], i - self.n + 1)[-1]
        raise IndexError(i)

    def iso(self, i: int) -> str:
        return str(self.start_of(i))

    def first_season(self) -> int:
        return self.frequency.season_of(self.starts[0])

    def head(self, n: int) -> "Series":
        """The first n periods (what a forecaster knew at origin n)."""
        return Series(self.name, self.starts[:n], self.values[:n], self.frequency, self.notes)

    def to_frame(self) -> pd.DataFrame:
        return pd.DataFrame({"date": self.starts, "value": self.values})

    def to_dict(self) -> dict:
        return {"name": self.name, "frequency": self.frequency.name,
                "start": self.iso(0), "end": self.iso(self.n - 1), "n": self.n,
                "start_label": self.label(0), "end_label": self.label(self.n - 1),
                "notes": list(self.notes)}
