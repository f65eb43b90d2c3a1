"""Reading delimited text (.csv, .txt) as strings, each record with its line number.

The encoding is found from a byte-order mark (UTF-8, UTF-16, UTF-32), from the pattern of zero
bytes of UTF-16 without one, or else by trying UTF-8, Windows-1252 and Latin-1 in turn. Lines may
end in LF, CR LF or CR alone.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

from ..errors import InputError
from .table import Table, table_from_records

_BOMS = ((b"\xff\xfe\x00\x00", "utf-32"), (b"\x00\x00\xfe\xff", "utf-32"),
         (b"\xff\xfe", "utf-16"), (b"\xfe\xff", "utf-16"))


def read_text(path: Path, decimal: str | None) -> Table:
    """Read a delimited text file as strings, keeping each record's line number."""
    text = decode(path.read_bytes(), path.name)
    if not text.strip():
        raise InputError(f"file {path.name!r} is empty")
    delimiter = guess_delimiter(text, decimal)
    records: list[tuple[int, list[str]]] = []
    reader = csv.reader(io.StringIO(text, newline=None), delimiter=delimiter)
    end_of_previous = 0
    try:
        for fields in reader:
            line = end_of_previous + 1
            end_of_previous = reader.line_num
            if end_of_previous > line and any("\n" in f for f in fields):
                raise InputError(_open_quote_message(path.name, line, end_of_previous, text))
            stripped = [f.strip() for f in fields]
            if any(stripped):
                records.append((line, stripped))
    except csv.Error as exc:
        raise InputError(f"{path.name!r} line {end_of_previous + 1}: cannot read the text "
                         f"({exc})") from None
    return table_from_records(records, f"file {path.name!r}", sep_hint=delimiter)


def _open_quote_message(name, line, last, text) -> str:
    total = len(io.StringIO(text, newline=None).read().rstrip("\n").split("\n"))
    if last >= total:
        return (f"{name!r} line {line}: a quote (\") opened on this line is never closed, so "
                f"the rest of the file would be one value; close or remove the quote")
    return (f"{name!r} line {line}: a quoted value runs from line {line} to line {last}; "
            f"check the quotes (\") on those lines")


def decode(raw: bytes, name: str) -> str:
    """The text of a file's bytes, or InputError naming what the bytes are instead."""
    for bom, encoding in _BOMS:
        if raw.startswith(bom):
            try:
                return raw.decode(encoding)
            except UnicodeDecodeError as exc:
                raise InputError(f"file {name!r} starts like {encoding.upper()} text but byte "
                                 f"{exc.start} is not {encoding.upper()}; save it as UTF-8 "
                                 f"CSV") from None
    head = raw[:4096]
    if b"\x00" in head:
        even, odd = head[0::2].count(0), head[1::2].count(0)
        wide = None  # UTF-16 without a byte-order mark: every other byte of ASCII text is zero
        if even == 0 and odd > 0.2 * len(head):
            wide = "utf-16-le"
        elif odd == 0 and even > 0.2 * len(head):
            wide = "utf-16-be"
        if wide is not None:
            try:
                return raw.decode(wide)
            except UnicodeDecodeError:
                pass
        raise InputError(f"file {name!r} holds zero bytes, so it is not plain text (a "
                         f"spreadsheet or a database file?); save the data as UTF-8 CSV")
    for encoding in ("utf-8-sig", "cp1252"):
        try:
            return raw.decode(encoding)
        except UnicodeDecodeError:
            continue
    return raw.decode("latin-1")


def guess_delimiter(text: str, decimal: str | None) -> str:
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
