"""Reading speed of ``load_series`` on invented daily CSV files, against pandas on the same files.

Three files of N rows each (ISO dates with decimal points; ';'-separated with decimal commas
and dotted thousands; Excel day numbers). The baseline, measured in the same run on the same
bytes, is ``pandas.read_csv`` with the separator, decimal mark and date parsing stated by hand,
which does none of intake's checks (calendar, holes, row-named messages). The ratio shows what
those checks and the detection cost. Goal (common practice for an interactive tool): 100,000
rows read in under 2 s.

Run: python benchmarks/bench_intake.py [--rows N] [--repeat R]
"""

from __future__ import annotations

import argparse
import statistics
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

from regimetrend.intake import load_series


def files(folder: Path, n: int) -> dict:
    """The three invented files and how pandas is told to read each."""
    days = np.arange(np.datetime64("1950-01-01"), np.datetime64("1950-01-01") + n)
    values = 1000 + np.cumsum(np.random.default_rng(7).normal(0.1, 1.0, n))
    iso = folder / "iso.csv"
    iso.write_text("date,sales\n" + "".join(f"{d},{v:.3f}\n" for d, v in zip(days, values)))
    comma = folder / "comma.csv"
    comma.write_text("Datum;Umsatz\n" + "".join(
        f"{d};{v:,.2f}\n".replace(",", "_").replace(".", ",").replace("_", ".")
        for d, v in zip(days, values)))
    serial = folder / "serial.csv"
    excel_days = (days - np.datetime64("1899-12-30")).astype(int)
    five = excel_days < 100_000  # Excel day numbers are read when they have five digits
    serial.write_text("date,sales\n" + "".join(f"{s},{v:.3f}\n"
                                               for s, v in zip(excel_days[five], values[five])))
    return {
        "ISO dates": (iso, {"parse_dates": ["date"]}),
        "';' and decimal commas": (comma, {"sep": ";", "decimal": ",", "thousands": ".",
                                            "parse_dates": ["Datum"]}),
        f"Excel days ({int(five.sum())} rows)": (serial, {}),
    }


def timed(fn, repeat: int) -> float:
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=100_000)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        print(f"{args.rows} daily rows, median of {args.repeat} runs")
        print(f"{'file':<30}{'intake s':>10}{'pandas s':>10}{'ratio':>8}")
        for label, (path, how) in files(Path(tmp), args.rows).items():
            ours = timed(lambda p=path: load_series(p), args.repeat)
            theirs = timed(lambda p=path, h=how: pd.read_csv(p, **h), args.repeat)
            print(f"{label:<30}{ours:>10.3f}{theirs:>10.3f}{ours / theirs:>8.1f}")


if __name__ == "__main__":
    main()
