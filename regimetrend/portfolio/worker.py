"""What runs on a worker: one chunk of series in, one JSON record per series out.

A record is the text of the per-series JSON file (``store.py`` writes it). It is built entirely
on the worker from the series and its settings, so its bytes do not depend on which engine,
process or thread made it. BLAS is held to one thread in every worker process: the linear
algebra is many tiny least-squares problems, which BLAS threads only slow down.

A series that fails never stops the chunk: a bad-input failure (``InputError``) becomes a record
with status ``failed`` and the one-line reason, and it is kept for resuming (the same data and
settings fail the same way); any other exception is reported the same way but marked
``retry`` so that a rerun tries it again.
"""

from __future__ import annotations

import json
import shutil
import tempfile
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..errors import InputError
from ..output import json_safe
from ..settings import Settings
from .inputs import SeriesTask, file_rows_message
from .row import failed_row, row_from_analysis, row_from_scan

LEVELS = ("full", "scan")
_BLAS_HELD: list = []


def hold_blas() -> None:
    """One BLAS thread in this process from now on (threadpoolctl; found once per process).

    threadpoolctl limits only the libraries loaded when it is called, and numpy and scipy each
    bring their own OpenBLAS, so both are imported first (scipy's loads with ``scipy.linalg``)."""
    if not _BLAS_HELD:
        import numpy  # noqa: F401
        import scipy.linalg  # noqa: F401
        from threadpoolctl import threadpool_limits

        _BLAS_HELD.append(threadpool_limits(limits=1))


@dataclass(frozen=True)
class Job:
    """A series with everything needed to analyse it."""

    index: int  # position in the portfolio (input order)
    task: SeriesTask
    settings: Settings
    key: str  # content hash of data and settings (resume key)
    load: dict  # load_series options shared by the portfolio
    level: str = "full"  # full (analyze) or scan (break search and growth only)
    report: bool = False  # also build the HTML report's files


@dataclass(frozen=True)
class Record:
    index: int
    id: str
    key: str
    text: str  # the per-series JSON file's content
    row: dict
    keep: bool  # False: an unexpected failure, tried again on the next run
    report_files: dict | None = None  # {relative path: bytes} of the report folder


def load(task: SeriesTask, shared: dict):
    """The validated ``Series`` of one task (intake's validation; file rows in messages)."""
    from ..intake import load_series

    if task.problem:
        raise InputError(task.problem)
    options = dict(shared, **{k: v for k, v in task.load.items() if v is not None})
    options.setdefault("name", task.id)
    try:
        return load_series(task.source, **options)
    except InputError as exc:
        raise InputError(file_rows_message(str(exc), task.rows)) from None


def chart_data(series, fitted, breaks, used_dates=None, cited_dates=()) -> dict:
    """What the portfolio page draws for one series: values, regime fit, the breaks the search
    found and those the chosen model uses (``used_dates``, the verdict's; None: all found).
    ``cited_dates``: a break another shape's search dated that the diagnosis names (the
    triage table's latest break when the model does not use it), drawn among those found."""
    where = {series.iso(i): i for i in range(series.n)}
    found = sorted({int(p) for p in breaks.positions} |
                   {where[d] for d in cited_dates if d in where})
    if used_dates is None:
        used = found
    else:
        used = sorted(where[d] for d in used_dates if d in where)
    values = [float(v) for v in np.asarray(fitted, dtype=float)]
    # a model fitted on the recent history only (truncated) has no fit before its cut
    gap: list[float | None] = [None] * max(series.n - len(values), 0)
    fit = gap + values
    return {"values": [float(v) for v in series.values],
            "fitted": fit,
            "breaks": found, "used": used,
            "start_label": series.label(0), "end_label": series.label(series.n - 1)}


def _compact_evaluation(ev: dict) -> dict:
    keep = ("rolling_origin", "optimistic", "optimistic_note", "reference", "recommended",
            "history", "diagnosis", "cautions")
    out = {k: ev.get(k) for k in keep}
    out["candidates"] = [{k: v for k, v in c.items() if k != "per_horizon"}
                         for c in ev.get("candidates", [])]
    return out


def analyse(job: Job, series):
    """(row, detail dict, chart dict, analysis or None) for one series."""
    settings = job.settings
    if job.level == "scan":
        from ..breaks.detect import find_breaks
        from ..growth import growth_table

        spec = settings.spec_for(series)
        breaks = find_breaks(series, spec, settings.breaks)
        growth = growth_table(series, spec, breaks)
        detail = {"series": series.to_dict(), "settings": settings.to_dict(),
                  "breaks": breaks.to_dict(), "growth": growth.to_dict()}
        return (row_from_scan(series, breaks, growth), detail,
                chart_data(series, growth.fitted, breaks), None)
    from ..analysis import analyze

    analysis = analyze(series, settings)
    detail = analysis.to_dict()
    detail["evaluation"] = _compact_evaluation(detail["evaluation"])
    row = row_from_analysis(analysis)
    used = [d for d in (row.get("breaks") or "").split("; ") if d]  # the verdict's breaks
    cited = [row["last_break"]] if row.get("last_break_in_model") is False else []
    return (row, detail,
            chart_data(series, analysis.growth.fitted, analysis.breaks, used, cited), analysis)


def one_line(exc: BaseException) -> str:
    text = " ".join(str(exc).split())
    return text if isinstance(exc, InputError) else f"internal error ({type(exc).__name__}): {text}"


def encode(job: Job, row: dict, detail, chart, status: str) -> tuple[str, dict]:
    """The per-series JSON text (key first, so a resume reads only the file's first line)."""
    row = json.loads(json.dumps(json_safe(row), allow_nan=False))
    head = json.dumps({"key": job.key}, allow_nan=False)[:-1]
    body = json.dumps(json_safe({"id": job.task.id, "parts": list(job.task.parts),
                                 "status": status, "row": row, "chart": chart,
                                 "analysis": detail}),
                      allow_nan=False, separators=(",", ":"))
    return f"{head},\n{body[1:]}\n", row


def run_job(job: Job) -> Record:
    report, series = None, None
    try:
        series = load(job.task, job.load)
        row, detail, chart, analysis = analyse(job, series)
        if job.report and analysis is not None:
            report = report_files(analysis)
        text, row = encode(job, row, detail, chart, "ok")
        return Record(job.index, job.task.id, job.key, text, row, True, report)
    except Exception as exc:  # noqa: BLE001 - one bad series never stops the batch
        row = failed_row(one_line(exc), job.level, series.n if series is not None else None)
        text, row = encode(job, row, None, None, "failed")
        return Record(job.index, job.task.id, job.key, text, row, isinstance(exc, InputError))


def run_chunk(jobs: list[Job]) -> list[Record]:
    """The unit of work sent to a worker."""
    hold_blas()
    return [run_job(job) for job in jobs]


def worker_facts(hold: float = 0.0) -> dict:
    """What a worker process says about itself (for benchmarks and checks): its pid, the thread
    count of every BLAS it has loaded once held, its peak resident memory and CPU seconds so
    far (``resource.getrusage``). ``hold``: seconds to wait first, so that calls sent together
    land on different workers."""
    import os
    import resource
    import time

    from threadpoolctl import threadpool_info

    time.sleep(hold)
    hold_blas()
    usage = resource.getrusage(resource.RUSAGE_SELF)
    return {"pid": os.getpid(),
            "blas_threads": sorted({i["num_threads"] for i in threadpool_info()
                                    if i["user_api"] == "blas"}),
            "peak_mb": usage.ru_maxrss / 1024, "cpu_s": usage.ru_utime + usage.ru_stime}


def report_files(analysis) -> dict:
    """The report folder's files as {relative path: bytes}, built by the report writer in a
    private temporary folder (so the worker needs no shared file system)."""
    from ..report import write_report

    tmp = tempfile.mkdtemp(prefix="regimetrend-report-")
    try:
        write_report(analysis, tmp)
        out = {}
        for path in sorted(Path(tmp).rglob("*")):
            if path.is_file():
                rel = path.relative_to(tmp).as_posix()
                out[rel] = path.read_bytes()  # the report's workbook is steady already
        return out
    finally:
        shutil.rmtree(tmp, ignore_errors=True)


def report_chunk(jobs: list[Job]) -> list[tuple[int, str, dict | None, str | None]]:
    """Reports for series whose results already exist: (index, id, files, failure)."""
    hold_blas()
    out: list[tuple[int, str, dict | None, str | None]] = []
    for job in jobs:
        try:
            from ..analysis import analyze

            analysis = analyze(load(job.task, job.load), job.settings)
            out.append((job.index, job.task.id, report_files(analysis), None))
        except Exception as exc:  # noqa: BLE001 - one bad series never stops the batch
            out.append((job.index, job.task.id, None, one_line(exc)))
    return out


