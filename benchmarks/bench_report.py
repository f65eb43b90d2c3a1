"""Time, peak memory and size of ``regimetrend report`` on the demo and on a 2,000-point daily series.

Each run is a fresh ``python -m regimetrend`` process, so start-up and imports count as an
analyst would feel them. The baseline, measured in the same run on the same input, is
``regimetrend compare`` (the evaluation the report is built on), so the ratio shows what the
break search, growth figures, charts and files add. Goal: the report folder stays under 5 MB.

Run: python benchmarks/bench_report.py [--repeat N]
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "demo" / "lumen_grid_energy.csv"
SIZE_GOAL = 5_000_000


def daily_series(path: Path, n: int = 2000) -> Path:
    """An invented daily series: weekly pattern, a growth change two thirds of the way in."""
    rng = np.random.default_rng(2000)
    days = pd.date_range("2019-01-01", periods=n, freq="D")
    t = np.arange(n)
    brk = int(n * 2 / 3)
    level = 200 + 0.05 * t
    level[brk:] = level[brk] + 15 + 0.15 * (t[brk:] - brk)
    weekly = 8 * np.sin(2 * np.pi * days.day_of_week.values / 7)
    values = level + weekly + rng.normal(0, 4, n)
    pd.DataFrame({"day": days.strftime("%Y-%m-%d"), "orders": np.round(values, 2)}).to_csv(
        path, index=False)
    return path


RUNNER = """
import resource, sys, time
t0 = time.perf_counter()
import regimetrend.report as report
writing = [0.0]
_write = report.write_report
def timed(*args, **kwargs):
    w0 = time.perf_counter()
    try:
        return _write(*args, **kwargs)
    finally:
        writing[0] += time.perf_counter() - w0
report.write_report = timed
from regimetrend.cli import main
code = main(sys.argv[1:])
elapsed = time.perf_counter() - t0
peak_kib = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
print(f"BENCH {code} {elapsed:.6f} {peak_kib} {writing[0]:.6f}", file=sys.stderr)
"""


def run(args: list[str]) -> tuple[float, float, float]:
    """Seconds, peak resident memory (MiB) and seconds spent writing the report files, of one
    command in a fresh process."""
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""),
               MPLBACKEND="Agg")
    wall0 = time.perf_counter()
    proc = subprocess.run([sys.executable, "-c", RUNNER, *args], capture_output=True, text=True,
                          env=env, cwd=ROOT)
    wall = time.perf_counter() - wall0
    line = [ln for ln in proc.stderr.splitlines() if ln.startswith("BENCH ")]
    if proc.returncode != 0 or not line or line[-1].split()[1] != "0":
        raise SystemExit(f"command failed: {' '.join(args)}\n{proc.stderr[-2000:]}")
    _, _, _, peak_kib, writing = line[-1].split()
    return wall, int(peak_kib) / 1024.0, float(writing)


def folder_size(folder: Path) -> int:
    return sum(p.stat().st_size for p in folder.rglob("*") if p.is_file())


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=1, help="runs per case (best is kept)")
    opts = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        cases = [("demo (120 monthly)", DEMO, ["--shape", "exponential"]),
                 ("daily (2,000 points)", daily_series(tmp / "daily_orders.csv"), [])]
        print(f"{'case':<22} {'command':<8} {'seconds':>8} {'peak MiB':>9} {'ratio':>6} "
              f"{'writing s':>9} {'html MB':>8} {'folder MB':>9}")
        for label, path, model in cases:
            base = min((run(["compare", str(path), *model, "--json"])
                        for _ in range(opts.repeat)), key=lambda r: r[0])
            best = None
            for i in range(opts.repeat):
                out = tmp / f"report_{label.split()[0]}_{i}"
                r = run(["report", str(path), *model, "--output", str(out)])
                if best is None or r[0] < best[0]:
                    best = (*r, out)
            secs, peak, writing, out = best
            html_mb = (out / "report.html").stat().st_size / 1e6
            total_mb = folder_size(out) / 1e6
            print(f"{label:<22} {'compare':<8} {base[0]:>8.2f} {base[1]:>9.1f} {1.0:>6.2f}")
            print(f"{label:<22} {'report':<8} {secs:>8.2f} {peak:>9.1f} {secs / base[0]:>6.2f} "
                  f"{writing:>9.2f} {html_mb:>8.2f} {total_mb:>9.2f}"
                  + ("" if html_mb * 1e6 < SIZE_GOAL else "   ** over the 5 MB goal **"))
    print(f"(ratio = report seconds / compare seconds on the same input; writing = seconds "
          f"inside write_report: charts, tables, files; size goal {SIZE_GOAL / 1e6:.0f} MB for "
          f"report.html)")


if __name__ == "__main__":
    main()
