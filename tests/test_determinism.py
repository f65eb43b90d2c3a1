"""Workbooks with fixed time stamps (``regimetrend.determinism``), the one helper the report's
and the portfolio's workbooks share.

Outside checks: Python's ``zipfile`` reads each entry's time and openpyxl reads the document
properties and the cells back.
"""

import io
import zipfile
from datetime import datetime

import openpyxl

from regimetrend.determinism import FIXED_ZIP_TIME, steady_xlsx


def _workbook(created: datetime) -> bytes:
    wb = openpyxl.Workbook()
    wb.active.append(["period", "value"])
    wb.active.append(["2020", 1.5])
    wb.properties.created = created
    wb.properties.modified = created
    buf = io.BytesIO()
    wb.save(buf)
    return buf.getvalue()


def test_workbooks_written_at_other_times_give_the_same_bytes():
    a = steady_xlsx(_workbook(datetime(2021, 3, 4, 5, 6, 7)))
    b = steady_xlsx(_workbook(datetime(2024, 9, 10, 11, 12, 13)))
    assert a == b
    assert steady_xlsx(a) == a  # applying it twice changes nothing
    entries = zipfile.ZipFile(io.BytesIO(a)).infolist()
    assert entries and all(e.date_time == FIXED_ZIP_TIME for e in entries)
    wb = openpyxl.load_workbook(io.BytesIO(a))
    assert wb.properties.created == datetime(1980, 1, 1)
    assert wb.properties.modified == datetime(1980, 1, 1)
    assert [c.value for c in wb.active[2]] == ["2020", 1.5]
