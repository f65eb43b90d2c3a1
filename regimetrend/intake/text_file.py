"""Reading delimited text (.csv, .txt) as strings, each record with its line number."""

from __future__ import annotations

import csv
import io
from pathlib import Path

from ..errors import InputError
from .table import Table, table_from_records


def read_text(path: Path, decimal: str) -> Table:
    """Read a delimited text file as strings, keeping each record's line number."""
    raw = path.read_bytes()
    for encoding in ("utf-8-sig", "cp1252", "latin-1"):
        try:
            text = raw.decode(encoding)
            break
        except UnicodeDecodeError:
            continue
    if not text.strip():
        raise InputError(f"file {path.name!r} is empty")
    delimiter = guess_delimiter(text, decimal)
    records: list[tuple[int, list[str]]] = []
    reader = csv.reader(io.StringIO(text), delimiter=delimiter)
    end_of_previous = 0
    try:
        for fields in reader:
            line = end_of_previous + 1
            end_of_previous = reader.line_num
            stripped = [f.strip() for f in fields]
            if any(stripped):
                records.append((line, stripped))
    except csv.Error as exc:
        raise InputError(f"{path.name!r} line {end_of_previous + 1}: cannot read the text "
                         f"({exc})") from None
    return table_from_records(records, f"file {path.name!r}", sep_hint=delimiter)


def guess_delimiter(text: str, decimal: str) -> str:
    """The first separator that splits every sampled line into the same number (>1) of fields."""
    candidates = [";", "\t", "|", ","] if decimal == "," else [",", ";", "\t", "|"]
    sample = "\n".join(text.splitlines()[:200])
    best, best_width = candidates[0], 1
    for sep in candidates:
        try:
            widths = [len(r) for r in csv.reader(io.StringIO(sample), delimiter=sep) if r]
        except csv.Error:
            continue
        if widths and min(widths) == max(widths) > 1:
            return sep
        common = max(set(widths), key=widths.count) if widths else 1
        if common > best_width:
            best, best_width = sep, common
    return best
