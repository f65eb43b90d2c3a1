"""The summary table of a portfolio, as CSV, Parquet and Excel, with the same bytes each run.

One row per series in input order: the id column(s), then ``rank`` (triage order, see
``ranking.py``), then the row fields (``row.COLUMNS``). CSV keeps full precision (Python's
shortest round-trip form); text that a spreadsheet would read as a formula is made inert. The
Parquet file is written by pyarrow with an explicit schema and no pandas metadata, and the
workbook's time stamps are fixed (``determinism.steady_xlsx``).
"""

from __future__ import annotations

import csv
import io

from ..report.safety import inert_text
from ..determinism import steady_xlsx
from .row import COLUMNS

FORMATS = ("csv", "parquet", "xlsx")
_INTEGERS = {"n", "rank"}
_FLOATS = {"last_break_f", "growth_now_pct_a_year", "growth_now_low", "growth_now_high",
           "growth_before_pct_a_year", "growth_before_low", "growth_before_high",
           "growth_change_p", "gain_over_global", "supf_p"}
_BOOLS = {"recent_change"}


def header(id_columns) -> list[str]:
    ids = [c for c in id_columns if c != "id"]
    return [*ids, "id", "rank", *[c for c in COLUMNS if c != "id"]]


def records(rows, tasks, ranks, id_columns) -> list[dict]:
    """Summary records in input order; ``ranks[k]`` is row k's triage rank (1 = first)."""
    names = [c for c in id_columns if c != "id"]
    out = []
    for k, (row, task) in enumerate(zip(rows, tasks)):
        rec: dict = {}
        if names:
            rec.update(zip(names, task.parts))
        rec["id"] = task.id
        rec["rank"] = ranks[k]
        rec.update({c: row.get(c) for c in COLUMNS if c != "id"})
        out.append(rec)
    return out


def _csv_cell(value):
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        return repr(value)
    if isinstance(value, int):
        return str(value)
    return inert_text(str(value))


def csv_bytes(recs, columns) -> bytes:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(columns)
    for rec in recs:
        w.writerow([_csv_cell(rec.get(c)) for c in columns])
    return buf.getvalue().encode("utf-8")


def parquet_bytes(recs, columns) -> bytes:
    import pyarrow as pa
    import pyarrow.parquet as pq

    def kind(c):
        if c in _INTEGERS:
            return pa.int64()
        if c in _FLOATS:
            return pa.float64()
        if c in _BOOLS:
            return pa.bool_()
        return pa.string()

    schema = pa.schema([(c, kind(c)) for c in columns])
    data = {c: [rec.get(c) if kind(c) != pa.string() or rec.get(c) is None
                else str(rec.get(c)) for rec in recs] for c in columns}
    table = pa.table(data, schema=schema)
    sink = io.BytesIO()
    pq.write_table(table, sink, compression="zstd")
    return sink.getvalue()


def xlsx_bytes(recs, columns) -> bytes:
    from openpyxl import Workbook
    from openpyxl.styles import Font

    wb = Workbook()
    ws = wb.worksheets[0]
    ws.title = "summary"
    ws.append(columns)
    for cell in ws[1]:
        cell.font = Font(bold=True)
    for rec in recs:
        ws.append([inert_text(v) if isinstance(v, str) else v for v in
                   (rec.get(c) for c in columns)])
    ws.freeze_panes = "A2"
    buf = io.BytesIO()
    wb.save(buf)
    return steady_xlsx(buf.getvalue())


def summary_files(recs, columns, formats=FORMATS) -> dict[str, bytes]:
    """{file name: bytes} of the summary in each format asked for."""
    makers = {"csv": csv_bytes, "parquet": parquet_bytes, "xlsx": xlsx_bytes}
    return {f"summary.{fmt}": makers[fmt](recs, columns) for fmt in formats}
