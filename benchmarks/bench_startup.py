"""Start-up time of ``regimetrend --help`` and ``regimetrend --version``.

Each run is a fresh ``python -m regimetrend`` process, as an analyst would type it. The
baselines, measured in the same run, are a bare interpreter (``python -c pass``) and an
interpreter that imports the numerical stack the analysis needs (numpy, pandas, scipy.stats):
the command line should cost little more than the first, far less than the second, because it
loads the heavy parts only when a command runs. Goal: the median under 0.5 s.

Run: python benchmarks/bench_startup.py [--repeat N]
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
GOAL = 0.5


def timed(args: list[str], repeat: int) -> float:
    """Median wall time of ``python ARGS`` over ``repeat`` fresh processes, in seconds."""
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        subprocess.run([sys.executable, *args], cwd=ROOT, check=True,
                       stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=7)
    n = parser.parse_args().repeat
    bare = timed(["-c", "pass"], n)
    heavy = timed(["-c", "import numpy, pandas, scipy.stats"], n)
    rows = [("python -c pass (baseline)", bare),
            ("import numpy, pandas, scipy.stats (baseline)", heavy)]
    for flag in ("--help", "--version"):
        rows.append((f"regimetrend {flag}", timed(["-m", "regimetrend", flag], n)))
    print(f"median of {n} fresh processes each")
    for name, t in rows:
        print(f"  {name:<46} {t:6.3f} s  {t / bare:5.2f} x bare  {t / heavy:5.2f} x heavy")
    worst = max(t for name, t in rows[2:])
    print(f"slowest command: {worst:.3f} s; goal under {GOAL} s: "
          f"{'met' if worst < GOAL else 'NOT met'}")


if __name__ == "__main__":
    main()
