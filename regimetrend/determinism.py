"""Byte-identical workbooks: the same content gives the same bytes on every run.

A workbook (.xlsx) is a zip archive whose entries carry the time they were written, and whose
document properties carry the creation and modification times; both are set to one fixed
moment here, so a rerun, another engine or another worker count writes the same bytes. The
report's workbook and the portfolio's summary workbook both pass through ``steady_xlsx``.
"""

from __future__ import annotations

import io
import re
import zipfile

FIXED_ZIP_TIME = (1980, 1, 1, 0, 0, 0)  # the earliest time a zip entry can hold
FIXED_STAMP = "1980-01-01T00:00:00Z"
_STAMPS = re.compile(rb"(<dcterms:(created|modified)[^>]*>)[^<]*(</dcterms:\2>)")


def steady_xlsx(data: bytes) -> bytes:
    """``data`` (an .xlsx file) with every time stamp fixed and entries in a fixed order."""
    src = zipfile.ZipFile(io.BytesIO(data))
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", compression=zipfile.ZIP_DEFLATED) as dst:
        for info in src.infolist():
            body = src.read(info.filename)
            if info.filename == "docProps/core.xml":
                body = _STAMPS.sub(rb"\g<1>" + FIXED_STAMP.encode() + rb"\g<3>", body)
            entry = zipfile.ZipInfo(info.filename, date_time=FIXED_ZIP_TIME)
            entry.compress_type = zipfile.ZIP_DEFLATED
            entry.external_attr = 0o644 << 16
            dst.writestr(entry, body)
    return out.getvalue()
