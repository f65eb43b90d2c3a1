"""Benchmark: the cost of one analysis and of a portfolio, on this machine, against baselines
measured in the same run, and the figures the 1,000,000-series projection is built from.

1. One analysis of the demo series (120 monthly points, invented data), on one core:
   baseline BLAS threads left free, measured BLAS held to one thread (as in every worker); CPU
   time (``time.process_time``) and wall time, best of several runs; goals: whole analysis
   <= 150 ms, scan <= 15 ms.
2. The engine's own costs: worker start-up (pool entered to first empty chunk back), BLAS
   threads and peak memory reported by each worker (``worker.worker_facts``: threadpoolctl and
   ``resource.getrusage``), chunk size and count, and per series: the job sent, the record
   returned (pickled bytes, time to unpickle) and the client's work (reading the portfolio
   file, writing each result, the summary and the page).
3. A portfolio of invented monthly series of 120 points (planted slope and level breaks):
   scan-level triage and the full analysis on the local engine with 1 and 2 workers; baseline:
   a plain loop of the same work in this process. Printed: seconds including the pool's
   start-up, series per second, the 2-worker / 1-worker speed-up (goal >= 1.8; measured with
   the baseline on the first 200 series), the CPU seconds per series in each run (equal CPU
   per series: the work divides; a wall speed-up short of 2 then comes from the shared
   machine), peak resident memory per worker. Default 1,000 series
   at each level (goals 15 s scan, 150 s full, on 2 workers).
4. Dask: a LocalCluster of 2 worker processes: start-up, scheduler round trip per task (empty
   chunks), the scan-level run on it against the local engine.
5. The projection for 1,000,000 series on N Dask workers from those figures (the formula is in
   DEVELOPERS.md, "Portfolio at scale").

The long-series search (100,000 points, ruptures' searches against ours) is in
``bench_portfolio_long.py``. Run niced on a shared machine:
    nice -n 10 python benchmarks/bench_portfolio.py --quick
"""

from __future__ import annotations

import argparse
import logging
import os
import pickle
import shutil
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import scipy.linalg  # noqa: E402,F401  (loads scipy's BLAS before any limit is set)
from threadpoolctl import threadpool_limits  # noqa: E402

from regimetrend import analyze, demo_path, load_series  # noqa: E402
from regimetrend.breaks import detect_breaks  # noqa: E402
from regimetrend.portfolio import ranking, run_portfolio, summary  # noqa: E402
from regimetrend.portfolio.engines import DaskEngine, LocalEngine  # noqa: E402
from regimetrend.portfolio.inputs import read_portfolio  # noqa: E402
from regimetrend.portfolio.page import build_page  # noqa: E402
from regimetrend.portfolio.runner import chunk_size  # noqa: E402
from regimetrend.portfolio.store import Store, result_key  # noqa: E402
from regimetrend.portfolio.worker import Job, run_chunk, worker_facts  # noqa: E402
from regimetrend.settings import Settings  # noqa: E402

GOAL_ANALYSIS_MS, GOAL_SCAN_MS = 150.0, 15.0
GOAL_SECONDS = {"scan": 15.0, "full": 150.0}  # 1,000 series on this two-core machine


def best(fn, repeats: int) -> tuple[float, float]:
    """(best CPU seconds, best wall seconds) over ``repeats`` calls."""
    cpu, wall = np.inf, np.inf
    for _ in range(repeats):
        c0, w0 = time.process_time(), time.perf_counter()
        fn()
        cpu, wall = min(cpu, time.process_time() - c0), min(wall, time.perf_counter() - w0)
    return cpu, wall


def one_analysis(repeats: int) -> dict:
    series = load_series(str(demo_path()))
    spec = Settings().spec_for(series)

    def scan():
        detect_breaks(series, shape=spec.shape, seasonality=spec.seasonality,
                      season_length=spec.season_length)

    analyze(series)  # warm caches and imports
    free = best(lambda: analyze(series), max(1, repeats // 2))
    with threadpool_limits(limits=1):
        held = best(lambda: analyze(series), repeats)
        scan_held = best(scan, 5 * repeats)
    print("1. one analysis of the demo series (120 monthly points), one core")
    print(f"   whole analysis, BLAS threads free (baseline): CPU {1000 * free[0]:8.1f} ms, "
          f"wall {1000 * free[1]:8.1f} ms")
    print(f"   whole analysis, BLAS held to one thread:      CPU {1000 * held[0]:8.1f} ms, "
          f"wall {1000 * held[1]:8.1f} ms  (goal <= {GOAL_ANALYSIS_MS:.0f} ms; "
          f"{held[0] * 1000 / GOAL_ANALYSIS_MS:.1f}x the goal)")
    print(f"   scan (break search and tests), BLAS held:     CPU {1000 * scan_held[0]:8.1f} ms, "
          f"wall {1000 * scan_held[1]:8.1f} ms  (goal <= {GOAL_SCAN_MS:.0f} ms; "
          f"{scan_held[0] * 1000 / GOAL_SCAN_MS:.1f}x the goal)")
    print(f"   wall/CPU ratio {held[1] / held[0]:.2f} (above 1: the machine is shared)")
    return {"analysis_cpu": held[0], "scan_cpu": scan_held[0]}


def invented_portfolio(count: int, n: int = 120, seed: int = 7) -> pd.DataFrame:
    """Invented monthly series (long table): level + trend + season + noise, a planted slope
    break in two thirds of them and a level shift in a sixth."""
    rng = np.random.default_rng(seed)
    t = np.arange(n)
    dates = pd.date_range("2014-01-01", periods=n, freq="MS").strftime("%Y-%m-%d").tolist()
    ids, all_dates, values = [], [], []
    for k in range(count):
        level, slope = rng.uniform(50, 500), rng.uniform(-0.2, 1.5)
        y = level + slope * t + rng.uniform(2, 20) * np.sin(2 * np.pi * (t + k) / 12)
        if k % 3:
            b = int(rng.integers(n // 4, n - n // 8))
            y = y + rng.uniform(-1.5, 3.0) * np.clip(t - b, 0, None)
        if k % 6 == 0:
            y = y + rng.uniform(10, 40) * (t >= int(rng.integers(n // 4, 3 * n // 4)))
        y = y + rng.normal(0, rng.uniform(1, 6), n)
        ids += [f"store-{k:05d}"] * n
        all_dates += dates
        values += [f"{v:.3f}" for v in y]
    return pd.DataFrame({"store": ids, "month": all_dates, "sales": values})


def jobs_of(src, level, settings) -> list[Job]:
    portfolio = read_portfolio(src, id_columns=("store",))
    return [Job(k, t, settings, result_key(t, settings, level, {}), {}, level)
            for k, t in enumerate(portfolio.tasks)]


def facts_of_workers(engine, workers: int) -> list[dict]:
    """``worker_facts`` from every worker: calls sent together, each waiting a moment."""
    facts = {}
    for got in engine.map(worker_facts, [0.3] * workers):
        facts[got["pid"]] = got
    return list(facts.values())


def engine_costs(src, workers: int) -> dict:
    """Section 2: start-up, BLAS and chunks of the local engine; per-series transfer and client
    costs measured on the scan level (a record of the full level is larger: printed too)."""
    print("\n2. the engine's own costs (local engine, 2 workers)")
    t0 = time.perf_counter()
    with LocalEngine(workers) as engine:
        list(engine.map(run_chunk, [[] for _ in range(workers)]))
        startup = time.perf_counter() - t0
        t1 = time.perf_counter()
        rounds = 20
        for _ in range(rounds):
            list(engine.map(run_chunk, [[] for _ in range(workers)]))
        round_trip = (time.perf_counter() - t1) / (rounds * workers)
        facts = facts_of_workers(engine, workers)
    print(f"   worker start-up (pool entered, regimetrend imported by the fork server, first "
          f"empty chunk back): {startup:.2f} s once per run")
    print(f"   round trip of an empty chunk: {1000 * round_trip:.2f} ms")
    print(f"   BLAS threads in each worker (threadpoolctl): "
          f"{', '.join(str(f['blas_threads']) for f in facts)}; workers: {len(facts)}")
    settings = Settings()
    count = len(read_portfolio(src, id_columns=("store",)).tasks)
    for level in ("scan", "full"):
        size = chunk_size(1000, workers, level)
        print(f"   chunks, {level} level: 1000 series on {workers} workers -> {size} series a "
              f"chunk, {-(-1000 // size)} chunks (at most {2 * workers} in flight); 1,000,000 "
              f"series -> {chunk_size(1_000_000, 256, level)} a chunk")
    t0 = time.perf_counter()
    jobs = jobs_of(src, "scan", settings)
    read_s = (time.perf_counter() - t0) / count
    sample = jobs[:50]
    with threadpool_limits(limits=1):
        records = run_chunk(sample)
        full_records = run_chunk([Job(j.index, j.task, j.settings, j.key, j.load, "full")
                                  for j in sample[:5]])
    job_bytes = len(pickle.dumps(sample)) / len(sample)
    blob = pickle.dumps(records)
    t0 = time.perf_counter()
    for _ in range(5):
        pickle.loads(blob)
    unpickle_s = (time.perf_counter() - t0) / (5 * len(records))
    full_bytes = len(pickle.dumps(full_records)) / len(full_records)
    out = Path(tempfile.mkdtemp(prefix="bench-portfolio-store-"))
    try:
        store = Store(out)
        tasks = [jobs[k].task for k in range(count)]
        t0 = time.perf_counter()
        for k in range(count):
            store.write_result(tasks[k].id, records[k % len(records)].text)
        write_s = (time.perf_counter() - t0) / count
        rows = [records[k % len(records)].row for k in range(count)]
        t0 = time.perf_counter()
        order = ranking.rank(rows)
        ranks = [0] * count
        for r, k in enumerate(order, start=1):
            ranks[k] = r
        recs = summary.records(rows, tasks, ranks, ("store",))
        summary.summary_files(recs, summary.header(("store",)), ("csv", "parquet"))
        build_page(recs, order, store, tasks, "scan")
        table_s = (time.perf_counter() - t0) / count
    finally:
        shutil.rmtree(out, ignore_errors=True)
    client = read_s + unpickle_s + write_s + table_s
    print(f"   per series sent: job {job_bytes / 1024:.1f} KB; returned: record "
          f"{len(blob) / len(records) / 1024:.1f} KB scan, {full_bytes / 1024:.1f} KB full")
    print(f"   client per series: read and hash {1000 * read_s:.2f} ms, unpickle "
          f"{1000 * unpickle_s:.3f} ms, write result {1000 * write_s:.2f} ms, summary and page "
          f"{1000 * table_s:.2f} ms; total {1000 * client:.2f} ms (serial, on the client)")
    return {"startup": startup, "round_trip": round_trip, "client": client,
            "peaks": [f["peak_mb"] for f in facts], "full_bytes": full_bytes}


def timed_run(src, level, workers, settings) -> dict:
    """One run on a fresh pool: seconds with and without its start-up, CPU per series in the
    workers, peak memory of each worker."""
    out = Path(tempfile.mkdtemp(prefix="bench-portfolio-"))
    try:
        t0 = time.perf_counter()
        with LocalEngine(workers) as engine:
            before = facts_of_workers(engine, workers)
            t1, c1 = time.perf_counter(), time.process_time()
            result = run_portfolio(src, out, id_columns=["store"], level=level,
                                   settings=settings, engine_object=engine, formats=("csv",))
            t2, c2 = time.perf_counter(), time.process_time()
            after = facts_of_workers(engine, workers)
        assert result.computed == result.total
        cpu = sum(a["cpu_s"] for a in after) - sum(b["cpu_s"] for b in before)
        busiest = max(a["cpu_s"] - b["cpu_s"] for a, b in zip(
            sorted(after, key=lambda f: f["pid"]), sorted(before, key=lambda f: f["pid"])))
        return {"seconds": t2 - t1, "with_startup": t2 - t0, "cpu_per_series":
                cpu / result.total, "peaks": [a["peak_mb"] for a in after],
                "client_cpu": c2 - c1, "busiest_worker_cpu": busiest,
                # two cores shared by the workers and the client, none waiting for another
                "idle_estimate": max(busiest, c2 - c1, (cpu + c2 - c1) / 2)}
    finally:
        shutil.rmtree(out, ignore_errors=True)


def plain_loop(src, level, settings) -> float:
    """Baseline: the same work in this process, no engine, no files."""
    jobs = jobs_of(src, level, settings)
    t0 = time.perf_counter()
    run_chunk(jobs)
    return time.perf_counter() - t0


def portfolio_runs(files: dict, target: int, compare: int) -> dict:
    """Section 3: the whole portfolio on 2 workers (the goal's figure); the 1-worker run, the
    2-worker run it is compared with and the in-process baseline on its first ``compare``
    series (the same series for all three)."""
    settings = Settings()
    out = {}
    print("\n3. portfolio of invented monthly series, 120 points each (local engine)")
    for level, (src, count) in files.items():
        part = src.with_name(f"{level}-first-{compare}.csv")
        frame = pd.read_csv(src, dtype=str)
        keep = frame["store"].isin(frame["store"].drop_duplicates().head(compare))
        frame[keep].to_csv(part, index=False)
        small = min(count, compare)
        with threadpool_limits(limits=1):
            base = plain_loop(part, level, settings)
        one = timed_run(part, level, 1, settings)
        two_small = timed_run(part, level, 2, settings)
        two = timed_run(src, level, 2, settings)
        out[level] = {"count": count, "one": one, "two": two}
        print(f"   {level:4s} level, {small} series: plain loop in-process (baseline) "
              f"{base:7.1f} s ({small / base:6.2f}/s); 1 worker {one['seconds']:7.1f} s "
              f"({small / one['seconds']:6.2f}/s); 2 workers {two_small['seconds']:7.1f} s "
              f"({small / two_small['seconds']:6.2f}/s)")
        print(f"        2 workers / 1 worker speed-up: "
              f"{one['seconds'] / two_small['seconds']:.2f}x (goal >= 1.8); CPU per series in "
              f"the workers: 1 worker {1000 * one['cpu_per_series']:.1f} ms, 2 workers "
              f"{1000 * two_small['cpu_per_series']:.1f} ms (equal: the work divides; 1 worker "
              f"vs plain loop: {one['seconds'] / base:.2f}x)")
        peaks = one["peaks"] + two_small["peaks"] + two["peaks"]
        print(f"        peak resident memory per worker (getrusage): {max(peaks):.0f} MB "
              f"(workers: {', '.join(f'{p:.0f}' for p in peaks)} MB)")
        print(f"        CPU seconds of the {count}-series run on 2 workers: busiest worker "
              f"{two['busiest_worker_cpu']:.1f} s, client {two['client_cpu']:.1f} s: on an idle "
              f"two-core machine the run would take about {two['idle_estimate']:.1f} s (all "
              f"CPU over two cores, at least the busiest process; wall above "
              f"{two['seconds']:.1f} s, the rest is waiting for the shared cores)")
        label = "measured" if count >= target else f"projected from {count} series"
        total = two["with_startup"] if count >= target else (
            two["seconds"] * target / count + two["with_startup"] - two["seconds"])
        print(f"        {count} series on 2 workers: {two['seconds']:.1f} s "
              f"({count / two['seconds']:.2f}/s); {target} series, pool start-up included: "
              f"{total:7.1f} s ({label}; goal <= {GOAL_SECONDS[level]:.0f} s)")
    return out


def dask_costs(src, count: int, workers: int) -> dict:
    """Section 4: a LocalCluster of worker processes, as a real cluster runs them."""
    from distributed import Client, LocalCluster

    print(f"\n4. Dask LocalCluster, {workers} worker processes, one thread each")
    t0 = time.perf_counter()
    cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                           dashboard_address=None, silence_logs=logging.ERROR)
    client = Client(cluster, set_as_default=False)
    try:
        client.submit(run_chunk, [], pure=False).result()
        startup = time.perf_counter() - t0
        tasks = 400
        t0 = time.perf_counter()
        futures = [client.submit(run_chunk, [], pure=False) for _ in range(tasks)]
        client.gather(futures)
        per_task = (time.perf_counter() - t0) / tasks
        del futures
        facts = client.run(worker_facts)
    finally:
        client.close()
        cluster.close()
    print(f"   cluster start-up: {startup:.2f} s; {tasks} empty chunks: "
          f"{1000 * per_task:.2f} ms a task (scheduler, transfer and worker round trip)")
    print(f"   BLAS threads in each worker: "
          f"{', '.join(str(f['blas_threads']) for f in facts.values())}")
    settings = Settings()
    runs = {}
    for name in ("local", "dask"):
        out = Path(tempfile.mkdtemp(prefix="bench-portfolio-dask-"))
        try:
            engine = LocalEngine(workers) if name == "local" else DaskEngine(workers)
            with engine:
                list(engine.map(run_chunk, [[] for _ in range(workers)]))
                t0 = time.perf_counter()
                run_portfolio(src, out, id_columns=["store"], level="scan", settings=settings,
                              engine_object=engine, formats=("csv",))
                runs[name] = time.perf_counter() - t0
        finally:
            shutil.rmtree(out, ignore_errors=True)
    print(f"   scan level, {count} series: local engine (baseline) {runs['local']:.1f} s, "
          f"Dask {runs['dask']:.1f} s ({runs['dask'] / runs['local']:.2f}x)")
    return {"startup": startup, "per_task": per_task,
            "dask_vs_local": runs["dask"] / runs["local"]}


def projection(one: dict, costs: dict, dask: dict | None, runs: dict) -> None:
    """Section 5: T(N) = start-up + max(S c / N, S client, K task) + one chunk's tail."""
    print("\n5. projection: 1,000,000 series of 120 monthly points on a Dask cluster of N "
          "workers (one core each)")
    series = 1_000_000
    per_task = dask["per_task"] if dask else 0.005
    startup = dask["startup"] if dask else costs["startup"]
    client = costs["client"]
    levels = {"scan": one["scan_cpu"], "full": one["analysis_cpu"]}
    for level, run in runs.items():  # CPU per series as measured inside the workers
        levels[level] = run["two"]["cpu_per_series"]
    print(f"   inputs: CPU per series {', '.join(f'{k} {1000 * v:.1f} ms' for k, v in levels.items())}"
          f" (section 3, or 1); client {1000 * client:.2f} ms a series (2); "
          f"{1000 * per_task:.2f} ms a task (4); start-up {startup:.1f} s")
    for level, cpu in levels.items():
        size = chunk_size(series, 256, level)
        chunks = series // size
        for workers in (16, 64, 256, 1024):
            compute = series * cpu / workers
            serial_client = series * client
            scheduler = chunks * per_task
            total = startup + max(compute, serial_client, scheduler) + size * cpu
            bound = max((compute, "workers"), (serial_client, "client"),
                        (scheduler, "scheduler"))[1]
            print(f"   {level:4s} N={workers:5d}: {total / 60:8.1f} min (workers "
                  f"{compute / 60:7.1f}, client {serial_client / 60:5.1f}, scheduler "
                  f"{scheduler / 60:5.2f} min; bound by the {bound})")
    print(f"   the client is the limit from N = {levels['full'] / client:.0f} workers (full) and "
          f"N = {levels['scan'] / client:.0f} (scan): beyond that, split the portfolio into "
          f"parts run by separate clients (their summaries concatenate); results are about "
          f"{costs['full_bytes'] / 1024:.0f} KB a series at the full level "
          f"({costs['full_bytes'] * series / 1e9:.0f} GB for 1,000,000)")


def main(argv=None) -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--quick", action="store_true", help="small sizes (a few minutes)")
    p.add_argument("--series", type=int, default=None, help="portfolio size for both levels")
    p.add_argument("--full-series", type=int, default=None, help="portfolio size, full level")
    p.add_argument("--compare-series", type=int, default=200,
                   help="series for the 1-worker / 2-worker comparison and the baseline")
    p.add_argument("--no-dask", action="store_true", help="skip section 4")
    args = p.parse_args(argv)
    load = os.getloadavg()
    print(f"machine: {os.cpu_count()} cores, load average {load[0]:.1f} at the start (above the "
          f"core count, wall times and the worker speed-up are those of a shared machine)\n")
    repeats = 2 if args.quick else 5
    one = one_analysis(repeats)
    scan_n = args.series or (60 if args.quick else 1000)
    full_n = args.full_series or args.series or (12 if args.quick else 1000)
    tmp = Path(tempfile.mkdtemp(prefix="bench-portfolio-src-"))
    try:
        files = {}
        for level, count in (("scan", scan_n), ("full", full_n)):
            src = tmp / f"{level}.csv"
            invented_portfolio(count).to_csv(src, index=False)
            files[level] = (src, count)
        costs = engine_costs(files["scan"][0], 2)
        runs = portfolio_runs(files, 1000, args.compare_series)
        dask = None if args.no_dask else dask_costs(files["scan"][0], scan_n, 2)
        projection(one, costs, dask, runs)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print(f"\nload average at the end: {os.getloadavg()[0]:.1f}")


if __name__ == "__main__":
    main()
