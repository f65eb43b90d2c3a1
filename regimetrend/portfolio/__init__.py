"""Portfolio mode: many series, one settings set, analysed in chunks on a local process pool or
a Dask cluster, resumable, with one summary row per series and a triage page.

``run_portfolio(source, output, ...)`` (``runner.py``) does the whole run. Modules, one job each:
``inputs`` (long/wide/folder layouts -> ``SeriesTask``), ``overrides`` (per-id settings file),
``store`` (per-series result files and resume keys), ``worker`` (a chunk of series -> records,
on the worker), ``row`` (an analysis flattened into a summary row), ``ranking`` (the triage
order and its written rule), ``engines`` (local and Dask), ``summary`` (CSV/Parquet/.xlsx),
``page`` (the self-contained triage page); workbook time stamps are fixed by
``regimetrend.determinism``.
"""

from .runner import RunSummary, run_portfolio

__all__ = ["RunSummary", "run_portfolio"]
