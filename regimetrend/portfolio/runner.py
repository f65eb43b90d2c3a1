"""``run_portfolio``: read the series, skip the finished ones, analyse the rest in chunks on an
engine, and write the per-series results, the summary table and the portfolio page.

Order of work: read and check everything first (the portfolio file, the override file, the
output folder), so bad input stops the run before any file is written; then results are written
as each chunk comes back (a killed run keeps every finished series); the summary, the page and
the reports come last, each built in memory and written whole.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import InputError
from ..output import write_atomic
from ..settings import Settings
from . import ranking, summary
from .engines import make_engine
from .inputs import read_portfolio
from .overrides import read_overrides, with_changes
from .store import Store, result_key
from .worker import LEVELS, Job, Record, report_chunk, run_chunk

# Series per task, at most: enough to make scheduling cheap, few enough to spread well. A scan
# costs a small part of a full analysis (``benchmarks/bench_portfolio.py``), so its chunks are
# larger: each is a few seconds of work, and a cluster's scheduler is not the limit at either.
MAX_CHUNK = {"full": 25, "scan": 200}


@dataclass
class RunSummary:
    total: int
    ok: int
    failed: int
    reused: int
    computed: int
    seconds: float
    files: dict = field(default_factory=dict)  # output name -> path
    reports: int = 0

    @property
    def rate(self) -> float:
        return self.computed / self.seconds if self.seconds > 0 else float("inf")

    def line(self) -> str:
        speed = (f"{self.rate:.2f} series per second" if self.computed
                 else "nothing new to analyse")
        return (f"portfolio: {self.total} series ({self.ok} ok, {self.failed} failed; "
                f"{self.reused} reused from an earlier run, {self.computed} analysed) in "
                f"{self.seconds:.1f} s, {speed}")


def chunk_size(todo: int, workers: int, level: str = "full") -> int:
    """About four chunks per worker, at most ``MAX_CHUNK[level]`` series each."""
    return max(1, min(MAX_CHUNK[level], -(-todo // (4 * max(workers, 1)))))


def chunked(items, size):
    return [items[i:i + size] for i in range(0, len(items), size)]


def parse_reports(text) -> tuple[str, int]:
    """``none``, ``all`` or ``top:N`` -> (mode, N)."""
    text = (text or "none").strip().lower()
    if text in ("none", "all"):
        return text, 0
    if text.startswith("top:"):
        try:
            k = int(text[4:])
        except ValueError:
            k = 0
        if k >= 1:
            return "top", k
    raise InputError(f"option --reports: expected none, all or top:N (N at least 1), "
                     f"got {text!r}")


def run_portfolio(source, output, *, id_columns=(), date_column=None, value_column=None,
                  sheet=None, load_options=None, settings: Settings | None = None,
                  settings_file=None, level="full", engine="local", workers=None,
                  scheduler=None, reports="none", formats=summary.FORMATS, progress=None,
                  engine_object=None) -> RunSummary:
    """Analyse every series of ``source`` into the folder ``output``; see the module docstring.

    ``load_options``: ``load_series`` options shared by every series (frequency, decimal,
    date_format, fill_missing); decimal None is found from the file
    (``inputs.file_decimal``). ``settings``: one ``Settings`` for all; ``settings_file``
    overrides it per id.
    ``progress(done, total)``: called as series finish (the command passes its progress bar).
    ``engine_object``: an engine already made (tests pass a Dask cluster of threads)."""
    from .page import write_page

    started = time.perf_counter()
    if level not in LEVELS:
        raise InputError(f"option --level: {level!r} is not one of {', '.join(LEVELS)}")
    mode, top = parse_reports(reports)
    if mode != "none" and level != "full":
        raise InputError("option --reports: reports need the full level (--level full)")
    folder = Path(output)
    if folder.exists() and not folder.is_dir():
        raise InputError(f"option --output: {folder} exists and is not a folder")
    base = settings or Settings()
    load = dict(load_options or {})
    portfolio = read_portfolio(source, id_columns=tuple(id_columns), date_column=date_column,
                               value_column=value_column, sheet=sheet,
                               decimal=load.get("decimal"))
    if portfolio.decimal is not None:
        load["decimal"] = portfolio.decimal
    tasks = portfolio.tasks
    overrides = (read_overrides(settings_file, portfolio.id_columns, [t.id for t in tasks])
                 if settings_file else {})
    store = Store(folder)
    store.remove_leftovers()
    jobs, reused = [], {}
    for k, task in enumerate(tasks):
        s = with_changes(base, overrides.get(task.id, {}))
        key = result_key(task, s, level, load)
        job = Job(k, task, s, key, load, level, report=(mode == "all"))
        if store.stored_key(task.id) == key:
            reused[k] = job
        jobs.append(job)
    todo = [j for j in jobs if j.index not in reused]
    if mode == "all":  # reused series still need their report when it is missing
        todo_reports = [j for j in jobs if j.index in reused and not store.report_done(
            j.task.id, j.key)]
    else:
        todo_reports = []

    rows: list[dict | None] = [None] * len(jobs)
    done = 0
    eng = engine_object or (make_engine(engine, workers, scheduler) if todo or todo_reports
                            else None)
    n_reports = 0
    if eng is not None:
        with (eng if engine_object is None else _Borrowed(eng)) as running:
            size = chunk_size(len(todo), getattr(running, "workers", 1), level)
            for records in running.map(run_chunk, chunked(todo, size)):
                for rec in records:
                    _keep(store, rec)
                    rows[rec.index] = rec.row
                    if rec.report_files:
                        store.write_report(rec.id, rec.key, rec.report_files)
                        n_reports += 1
                done += len(records)
                if progress is not None:
                    progress(done, len(todo))
            for idx in reused:
                rows[idx] = store.read_result(jobs[idx].task.id)["row"]
            chosen = _report_jobs(mode, top, jobs, rows, store) + todo_reports
            if chosen:
                size = chunk_size(len(chosen), getattr(running, "workers", 1))
                for done in running.map(report_chunk, chunked(chosen, size)):
                    for index, ident, files, _failure in done:
                        if files:
                            store.write_report(ident, jobs[index].key, files)
                            n_reports += 1
    for idx in reused:
        if rows[idx] is None:
            rows[idx] = store.read_result(jobs[idx].task.id)["row"]
    done_rows: list[dict] = [r if r is not None else {} for r in rows]
    order = ranking.rank(done_rows)
    ranks = [0] * len(rows)
    for r, k in enumerate(order, start=1):
        ranks[k] = r
    columns = summary.header(portfolio.id_columns)
    recs = summary.records(done_rows, tasks, ranks, portfolio.id_columns)
    files = {}
    for name, data in summary.summary_files(recs, columns, formats).items():
        files[name] = write_atomic(folder / name, data, "--output")
    files["page"] = write_page(folder, recs, order, store, tasks, level)
    ok = sum(1 for r in done_rows if r.get("status") == "ok")
    return RunSummary(total=len(done_rows), ok=ok, failed=len(done_rows) - ok, reused=len(reused),
                      computed=len(todo), seconds=time.perf_counter() - started, files=files,
                      reports=n_reports)


def _keep(store: Store, rec: Record) -> None:
    if rec.keep:
        store.write_result(rec.id, rec.text)
    else:  # an unexpected failure: no stored result, so the next run tries again
        path = store.result_path(rec.id)
        if path.exists():
            path.unlink()


def _report_jobs(mode, top, jobs, rows, store) -> list[Job]:
    if mode != "top":
        return []
    order = [k for k in ranking.rank(rows) if rows[k] and rows[k].get("status") == "ok"][:top]
    return [jobs[k] for k in sorted(order) if not store.report_done(jobs[k].task.id, jobs[k].key)]


class _Borrowed:
    """An engine the caller started and stops: entering and leaving it does nothing."""

    def __init__(self, engine):
        self.engine = engine

    def __enter__(self):
        return self.engine

    def __exit__(self, *exc):
        return False
