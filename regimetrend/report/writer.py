"""Write every report output into one folder, each file through a temporary file and a rename.

Files written (names relative to the folder):

- ``report.html``             the self-contained report (charts inline, no scripts, no fetches)
- ``report.json``             the full result (``Analysis.to_dict()``) plus what the report shows
- ``report.xlsx``             one workbook: a sheet per table, the summary and the cautions
- ``charts/<name>.png``       each chart
- ``tables/<name>.csv``       each table, full precision, formula-like text made inert
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

from ..output import dumps, write_atomic
from . import html
from .content import Content, build
from .extract import gather
from .safety import cell, inert_text
from .tables import Table


def table_csv(table: Table) -> str:
    """A table as CSV text: header, then raw values; numbers as numbers, text made inert."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    for i, row in enumerate(table.matrix()):
        out = []
        for v in row:
            c = cell(v)
            out.append("" if c is None else (repr(c) if isinstance(c, float) else c))
        w.writerow(out)
    return buf.getvalue()


def workbook_bytes(content: Content) -> bytes:
    """All tables in one .xlsx workbook (openpyxl), plus a sheet with summary and cautions."""
    from openpyxl import Workbook
    from openpyxl.styles import Alignment, Font

    wb = Workbook()
    first = wb.active
    first.title = "summary"
    first.append([inert_text(content.title)])
    first["A1"].font = Font(bold=True, size=13)
    first.append([inert_text(content.subtitle)])
    first.append([])
    for sentence in content.summary:
        first.append([inert_text(sentence)])
    first.append([])
    first.append(["Cautions"])
    first.cell(row=first.max_row, column=1).font = Font(bold=True)
    for text in content.cautions:
        first.append([inert_text(text)])
    first.column_dimensions["A"].width = 120
    for row in first.iter_rows():
        for c in row:
            c.alignment = Alignment(wrap_text=True, vertical="top")
    for table in content.tables:
        ws = wb.create_sheet(table.name[:31])
        for r, row in enumerate(table.matrix(), start=1):
            for col, v in enumerate(row, start=1):
                target = ws.cell(row=r, column=col)
                target.value = cell(v)
                if isinstance(target.value, str):
                    target.data_type = "s"  # never a formula
                if r == 1:
                    target.font = Font(bold=True)
        for col in range(1, len(table.columns) + 1):
            ws.column_dimensions[ws.cell(row=1, column=col).column_letter].width = 16
        if table.note:
            ws.cell(row=ws.max_row + 2, column=1, value=inert_text(table.note))
    buf = io.BytesIO()
    wb.save(buf)
    return buf.getvalue()


def report_json(data, content: Content) -> dict:
    """The full result, with the report's own parts beside it."""
    result = dict(data.result)
    if data.growth is not None and "growth" not in result:
        result["growth"] = data.growth
    result["report"] = {"summary": content.summary, "cautions": content.cautions,
                        "charts": [c.name for c in content.charts],
                        "tables": [t.name for t in content.tables],
                        "not_shown": content.missing}
    return result


CHART_NAMES = ("series_regimes", "forecast_errors", "cusum", "history_sweep",
               "accuracy_by_horizon", "growth_by_regime")
TABLE_NAMES = ("growth_by_regime", "candidate_ranking", "forecast", "breaks")


def _remove_stale(folder: Path, content: Content) -> None:
    """Drop report files of an earlier run that this run did not write (only our own names),
    so a folder never mixes two analyses."""
    shown = {c.name for c in content.charts}
    tabled = {t.name for t in content.tables}
    for name in CHART_NAMES:
        if name not in shown:
            (folder / "charts" / f"{name}.png").unlink(missing_ok=True)
    for name in TABLE_NAMES:
        if name not in tabled:
            (folder / "tables" / f"{name}.csv").unlink(missing_ok=True)


def write_report(analysis, folder, *, source_name: str | None = None) -> dict:
    """Write the HTML report, charts, CSV tables, workbook and JSON for ``analysis`` into
    ``folder``; returns {output name: path}."""
    from .. import __version__

    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    data = gather(analysis, source_name)
    content = build(data)
    written: dict[str, Path] = {}
    for chart in content.charts:
        written[f"chart {chart.name}"] = write_atomic(folder / "charts" / f"{chart.name}.png",
                                                      chart.png)
    for table in content.tables:
        written[f"table {table.name}"] = write_atomic(folder / "tables" / f"{table.name}.csv",
                                                      table_csv(table))
    written["workbook"] = write_atomic(folder / "report.xlsx", workbook_bytes(content))
    written["json"] = write_atomic(folder / "report.json", dumps(report_json(data, content)))
    page = html.page(title=content.title, subtitle=content.subtitle, facts=content.facts,
                     summary=content.summary, charts=content.charts, tables=content.tables,
                     cautions=content.cautions, missing=content.missing,
                     footer=f"Made with regimetrend {__version__}. The full result is in "
                            f"report.json; tables as CSV in tables/ and in report.xlsx; charts "
                            f"as PNG in charts/.")
    written["html"] = write_atomic(folder / "report.html", page)
    _remove_stale(folder, content)
    return {k: str(v) for k, v in written.items()}
