"""Write every report output into one folder: all of it built first, then written.

Files written (names relative to the folder):

- ``report.html``             the self-contained report (charts inline, no scripts, no fetches)
- ``report.json``             the full result (``Analysis.to_dict()``) plus what the report shows;
                              ``report.files`` lists every file this run wrote (the manifest)
- ``report.xlsx``             one workbook: a sheet per table, the summary and the cautions
- ``charts/<name>.png``       each chart
- ``tables/<name>.csv``       each table, full precision, formula-like text made inert

Every output's bytes are made in memory before the first file is touched, so a failure while
building (a chart that cannot be drawn, say) leaves the folder as it was. The targets are then
checked (none may be a folder or the input file) and ``output_folder.publish_folder`` switches
the folder as a whole: a complete new folder is written beside it (``report.json`` last) and
swapped in by rename, so an interrupt, a kill or a full disk leaves either the earlier report or
this one, never a mix. The earlier report's own files (``report.*`` and the charts and tables
its ``report.json`` lists) are not carried over; everything else in the folder (a file the
analyst put in ``charts/``, the input) is. ``report.files`` is the manifest and
``report.checksums`` holds each other file's SHA-256, so a reader can check the set is whole.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import re
from datetime import date
from pathlib import Path

from ..determinism import steady_xlsx
from ..errors import InputError
from ..output import check_targets, dumps
from ..output_folder import publish_folder
from . import html
from .content import Content, build
from .extract import gather
from .safety import cell, inert_text
from .tables import EXCEL_FORMATS, Table, excel_value


def table_csv(table: Table) -> str:
    """A table as CSV text: header, then raw values; numbers as numbers, text made inert."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    for row in table.matrix():
        out = []
        for v in row:
            c = cell(v)
            out.append("" if c is None else (repr(c) if isinstance(c, float) else c))
        w.writerow(out)
    return buf.getvalue()


_XL_ILLEGAL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f]")  # what a workbook cannot hold


def xl_text(value):
    """A cell value a workbook can hold: control characters (a name from the data may carry
    them) shown as ``\\x1b``-style escapes; other values unchanged."""
    if not isinstance(value, str):
        return value
    return _XL_ILLEGAL.sub(lambda m: f"\\x{ord(m.group()):02x}", value)


def workbook_bytes(content: Content) -> bytes:
    """All tables in one .xlsx workbook (openpyxl), plus a sheet with summary and cautions."""
    from openpyxl import Workbook
    from openpyxl.styles import Alignment, Font

    wb = Workbook()
    first = wb.worksheets[0]
    first.title = "summary"
    first.append([xl_text(inert_text(content.title))])
    first["A1"].font = Font(bold=True, size=13)
    first.append([xl_text(inert_text(content.subtitle))])
    first.append([])
    for sentence in content.summary:
        first.append([xl_text(inert_text(sentence))])
    first.append([])
    first.append(["Cautions"])
    first.cell(row=first.max_row, column=1).font = Font(bold=True)
    for text in content.cautions:
        first.append([xl_text(inert_text(text))])
    first.column_dimensions["A"].width = 120
    for row in first.iter_rows():
        for c in row:
            c.alignment = Alignment(wrap_text=True, vertical="top")
    for table in content.tables:
        ws = wb.create_sheet(table.name[:31])
        kinds = [c.kind for c in table.columns]
        for r, row in enumerate(table.matrix(), start=1):
            for col, v in enumerate(row, start=1):
                target = ws.cell(row=r, column=col)
                kind = kinds[col - 1]
                value = v if r == 1 else excel_value(v, kind)
                target.value = value if isinstance(value, date) else xl_text(cell(value))
                if isinstance(target.value, str):
                    target.data_type = "s"  # never a formula
                elif r > 1 and kind in EXCEL_FORMATS:
                    target.number_format = EXCEL_FORMATS[kind]
                if r == 1:
                    target.font = Font(bold=True)
        for col in range(1, len(table.columns) + 1):
            ws.column_dimensions[ws.cell(row=1, column=col).column_letter].width = 16
        if table.note:
            ws.cell(row=ws.max_row + 2, column=1, value=xl_text(inert_text(table.note)))
    wb.properties.creator = "regimetrend"
    buf = io.BytesIO()
    wb.save(buf)
    return steady_xlsx(buf.getvalue())


def report_json(data, content: Content, files: list[str],
                checksums: dict[str, str] | None = None) -> dict:
    """The full result, with the report's own parts beside it; ``files`` is the manifest and
    ``checksums`` the SHA-256 of every file but ``report.json`` itself."""
    result = dict(data.result)
    if data.growth is not None and "growth" not in result:
        result["growth"] = data.growth
    result["report"] = {"summary": content.summary, "cautions": content.cautions,
                        "charts": [c.name for c in content.charts],
                        "tables": [t.name for t in content.tables],
                        "not_shown": content.missing, "files": files,
                        "checksums": dict(checksums or {})}
    return result


MANIFEST = "report.json"
OWN_FOLDERS = {"charts": ".png", "tables": ".csv"}  # the only places stale files are removed


def _own_file(entry) -> Path | None:
    """A manifest entry as a relative path, when it names one of the report's own chart or
    table files (``charts/<name>.png``, ``tables/<name>.csv``); anything else is ignored."""
    if not isinstance(entry, str):
        return None
    parts = entry.split("/")
    if len(parts) != 2 or parts[0] not in OWN_FOLDERS:
        return None
    name = parts[1]
    if (not name.endswith(OWN_FOLDERS[parts[0]]) or name.startswith(".") or "\\" in name
            or name in ("", "..")):
        return None
    return Path(*parts)


def previous_files(folder: Path) -> set[Path]:
    """The chart and table files an earlier run listed in its ``report.json`` (none when the
    file is missing, unreadable or not one of ours)."""
    try:
        earlier = json.loads((folder / MANIFEST).read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return set()
    files = earlier.get("report", {}).get("files") if isinstance(earlier, dict) else None
    if not isinstance(files, list):
        return set()
    return {p for p in map(_own_file, files) if p is not None}


def _digest(payload: bytes | str) -> str:
    return hashlib.sha256(payload.encode("utf-8") if isinstance(payload, str)
                          else payload).hexdigest()


def build_outputs(data, content: Content,
                  extra: dict[str, bytes] | None = None) -> dict[str, tuple[Path, bytes | str]]:
    """Every output in memory: {output name: (path relative to the folder, bytes or text)};
    ``extra`` adds files by name (the demo's copy of its data)."""
    from .. import __version__

    out: dict[str, tuple[Path, bytes | str]] = {}
    for chart in content.charts:
        out[f"chart {chart.name}"] = (Path("charts", f"{chart.name}.png"), chart.png)
    for table in content.tables:
        out[f"table {table.name}"] = (Path("tables", f"{table.name}.csv"), table_csv(table))
    out["workbook"] = (Path("report.xlsx"), workbook_bytes(content))
    out["html"] = (Path("report.html"),
                   html.page(title=content.title, subtitle=content.subtitle, facts=content.facts,
                             summary=content.summary, charts=content.charts,
                             tables=content.tables, cautions=content.cautions,
                             missing=content.missing,
                             footer=f"Made with regimetrend {__version__}. The full result is "
                                    f"in report.json; tables as CSV in tables/ and in "
                                    f"report.xlsx; charts as PNG in charts/."))
    for name, payload in (extra or {}).items():
        out[name] = (Path(name), payload)
    files = sorted([p.as_posix() for p, _ in out.values()] + [MANIFEST])
    checksums = {p.as_posix(): _digest(payload) for p, payload in out.values()}
    out["json"] = (Path(MANIFEST), dumps(report_json(data, content, files, checksums)))
    return out


def write_report(analysis, folder, *, source_name: str | None = None, units: str | None = None,
                 log_scale: bool = False, progress=None,
                 extra: dict[str, bytes] | None = None) -> dict:
    """Write the HTML report, charts, CSV tables, workbook and JSON for ``analysis`` into
    ``folder``; returns {output name: path}. ``units`` names the values' units on every axis
    and in the sentences (the series name by default); ``log_scale`` draws value axes on a log
    scale; ``progress(done, total)`` is called as the parts are drawn. ``extra`` adds files by
    name, written only where the folder has no file of that name yet. Nothing is written when
    building any output fails, and the folder switches from the earlier report to this one as
    a whole."""
    folder = Path(folder)
    data = gather(analysis, source_name, units)
    extra = {k: v for k, v in (extra or {}).items() if not (folder / k).exists()}
    outputs = build_outputs(data, build(data, log_scale=log_scale, progress=progress), extra)
    return publish_report(folder, outputs)


def publish_report(folder, outputs: dict[str, tuple[Path, bytes | str]]) -> dict:
    """Switch ``folder`` to the built ``outputs`` (see ``build_outputs``) as a whole; returns
    {output name: path}."""
    folder = Path(folder)
    if folder.exists() and not folder.is_dir():
        raise InputError(f"--output: {folder} is a file, not a folder")
    check_targets([folder / rel for rel, _ in outputs.values()], "--output")
    publish_folder(folder, {rel: payload for rel, payload in outputs.values()},
                   earlier_own=previous_files, manifest=MANIFEST, what="--output")
    return {k: str(folder / rel) for k, (rel, _) in outputs.items()}
