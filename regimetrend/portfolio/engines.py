"""Engines: where chunks of series run. Both give the same records; only the speed differs.

- ``LocalEngine``: a pool of worker processes on this machine (``workers``, default all cores),
  started by a fork server that has regimetrend already imported, so each worker starts fast
  and no thread of the parent is copied into it.
- ``DaskEngine``: a Dask cluster, either an existing one (``scheduler`` address) or a local
  cluster started for the run and stopped after it (``processes=False`` runs its workers as
  threads of this process, which the tests use).

``engine.map(fn, chunks)`` yields each chunk's result as soon as it is done (in completion
order; the caller puts records back in input order).
"""

from __future__ import annotations

import logging
import os
from typing import Any
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait

ENGINES = ("local", "dask")


def default_workers() -> int:
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # pragma: no cover - platforms without affinity
        return max(1, os.cpu_count() or 1)


class LocalEngine:
    name = "local"

    def __init__(self, workers: int | None = None):
        self.workers = workers or default_workers()
        self._pool = None

    def __enter__(self):
        import multiprocessing as mp

        methods = mp.get_all_start_methods()
        if "forkserver" in methods:
            ctx = mp.get_context("forkserver")
            ctx.set_forkserver_preload(["regimetrend.portfolio.worker", "regimetrend.analysis"])
        else:  # pragma: no cover - Windows
            ctx = mp.get_context("spawn")
        self._pool = ProcessPoolExecutor(max_workers=self.workers, mp_context=ctx)
        return self

    def __exit__(self, *exc):
        if self._pool is not None:
            self._pool.shutdown(wait=exc[0] is None, cancel_futures=True)
            self._pool = None
        return False

    def map(self, fn, chunks):
        # at most a few chunks queued per worker: a killed run then loses little queued work
        pending, chunks = set(), iter(chunks)
        limit = 2 * self.workers
        while True:
            while len(pending) < limit:
                chunk = next(chunks, None)
                if chunk is None:
                    break
                pending.add(self._pool.submit(fn, chunk))
            if not pending:
                return
            done, pending = wait(pending, return_when=FIRST_COMPLETED)
            for fut in done:
                yield fut.result()


class DaskEngine:
    name = "dask"

    def __init__(self, workers: int | None = None, scheduler: str | None = None,
                 processes: bool = True):
        self.workers = workers or default_workers()
        self.scheduler = scheduler
        self.processes = processes
        self._client: Any = None  # distributed.Client while the engine is entered
        self._cluster: Any = None

    def __enter__(self):
        from distributed import Client, LocalCluster

        if self.scheduler:
            self._client = Client(self.scheduler, set_as_default=False)
        else:
            self._cluster = LocalCluster(n_workers=self.workers, threads_per_worker=1,
                                         processes=self.processes, dashboard_address=None,
                                         silence_logs=logging.ERROR)
            self._client = Client(self._cluster, set_as_default=False)
        return self

    def __exit__(self, *exc):
        if self._client is not None:
            self._client.close()
        if self._cluster is not None:
            self._cluster.close()
        self._client = self._cluster = None
        return False

    def slots(self) -> int:
        """Chunks kept in flight: two per worker thread of the cluster, so that each worker
        has its next chunk at hand while the client holds only a few chunks' data (sending
        all of a million-series portfolio's chunks at once would park every job on the
        scheduler)."""
        try:
            threads = sum(self._client.nthreads().values())
        except Exception:  # noqa: BLE001 - a cluster that cannot say: assume the workers asked
            threads = 0
        return 2 * max(threads or self.workers, 1)

    def map(self, fn, chunks):
        from distributed import as_completed

        chunks = iter(chunks)
        pending = []
        for chunk in chunks:
            pending.append(self._client.submit(fn, chunk, pure=False))
            if len(pending) >= self.slots():
                break
        flow = as_completed(pending, loop=self._client.loop)
        try:
            for fut in flow:
                result = fut.result()
                fut.release()
                pending.remove(fut)
                chunk = next(chunks, None)
                if chunk is not None:
                    nxt = self._client.submit(fn, chunk, pure=False)
                    pending.append(nxt)
                    flow.add(nxt)
                yield result
        finally:
            for fut in pending:
                fut.cancel()


def make_engine(name: str, workers: int | None = None, scheduler: str | None = None):
    if name == "local":
        return LocalEngine(workers)
    if name == "dask":
        return DaskEngine(workers, scheduler)
    raise ValueError(name)
