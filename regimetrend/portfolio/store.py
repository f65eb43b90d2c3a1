"""The output folder's per-series results, and the resume keys.

``DIR/series/<file id>.json`` holds one series' result; its first line is ``{"key": "..."``, the
content hash of the series' raw cells, its settings, the level, and the package version. A rerun
reads only that first line to decide whether a series is done. Every file is written through a
temporary file and a rename (``output.write_atomic``), so a killed run leaves whole files only.

``DIR/reports/<file id>/`` holds a series' HTML report folder when reports are asked for, with
``DIR/reports/<file id>.key`` written last, naming the result the report was made from.
"""

from __future__ import annotations

import hashlib
import json
import re
from pathlib import Path

from .. import __version__
from ..output import write_atomic

FORMAT = 2  # bump when the per-series record changes shape (2: the latest break the verdict
#            names, whether the model uses it, and the gain's reference)
_TEMPORARY = re.compile(r"^\.[^/]+\.(json|key|html|png|csv|xlsx)\.[A-Za-z0-9_]{6,}$")
_KEY_LINE = re.compile(r'^\{"key": "([0-9a-f]{64})"')


def file_id(ident: str) -> str:
    """A file name for an id: readable, safe on every file system, unique (hash suffix)."""
    readable = re.sub(r"[^A-Za-z0-9._-]+", "_", ident).strip("._-")[:60] or "series"
    return f"{readable}-{hashlib.sha256(ident.encode('utf-8')).hexdigest()[:10]}"


def result_key(task, settings, level: str, load: dict) -> str:
    """Content hash of everything a series' result depends on."""
    meta = json.dumps({"format": FORMAT, "version": __version__, "level": level,
                       "settings": settings.to_dict(), "load": load, "id": task.id,
                       "data": task.digest}, sort_keys=True, default=str)
    return hashlib.sha256(meta.encode("utf-8")).hexdigest()


class Store:
    def __init__(self, folder: Path):
        self.folder = Path(folder)
        self.series_dir = self.folder / "series"
        self.reports_dir = self.folder / "reports"

    def remove_leftovers(self) -> None:
        """Temporary files a killed run left behind (``.<name>.<random>``, never a result)."""
        for folder in (self.series_dir, self.reports_dir):
            if folder.is_dir():
                for path in folder.rglob(".*"):
                    if path.is_file() and _TEMPORARY.match(path.name):
                        path.unlink()

    def result_path(self, ident: str) -> Path:
        return self.series_dir / f"{file_id(ident)}.json"

    def stored_key(self, ident: str) -> str | None:
        path = self.result_path(ident)
        try:
            with open(path, encoding="utf-8") as fh:
                first = fh.readline(200)
        except OSError:
            return None
        m = _KEY_LINE.match(first)
        return m.group(1) if m else None

    def write_result(self, ident: str, text: str) -> Path:
        # no sweep per write: ``remove_leftovers`` swept the folder once at the start
        return write_atomic(self.result_path(ident), text, "--output", sweep=False)

    def read_result(self, ident: str) -> dict:
        return json.loads(self.result_path(ident).read_text(encoding="utf-8"))

    def report_done(self, ident: str, key: str) -> bool:
        marker = self.reports_dir / f"{file_id(ident)}.key"
        try:
            return marker.read_text(encoding="utf-8").strip() == key
        except OSError:
            return False

    def write_report(self, ident: str, key: str, files: dict) -> Path:
        folder = self.reports_dir / file_id(ident)
        marker = self.reports_dir / f"{file_id(ident)}.key"
        if marker.exists():
            marker.unlink()
        for rel, data in sorted(files.items()):
            write_atomic(folder / rel, data, "--output")
        write_atomic(marker, key + "\n", "--output", sweep=False)
        return folder
