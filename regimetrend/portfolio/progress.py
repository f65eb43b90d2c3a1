"""A one-line progress bar on standard error: done/total, rate and time left.

Silent when standard error is not a terminal or when asked to be quiet; it never writes to
standard output, so results piped from the command stay clean. Redrawn at most five times a
second.
"""

from __future__ import annotations

import sys
import time


def _clock(seconds: float) -> str:
    seconds = round(seconds)
    h, rest = divmod(seconds, 3600)
    m, s = divmod(rest, 60)
    return f"{h}:{m:02d}:{s:02d}" if h else f"{m}:{s:02d}"


class Progress:
    def __init__(self, total: int, label: str = "series", stream=None, quiet: bool = False,
                 width: int = 28):
        self.total, self.label, self.width = total, label, width
        self.stream = stream if stream is not None else sys.stderr
        self.enabled = not quiet and total > 0 and bool(getattr(self.stream, "isatty",
                                                                lambda: False)())
        self.done = 0
        self.start = time.perf_counter()
        self._drawn = 0.0

    def line(self, now: float | None = None) -> str:
        """The bar's text at this moment (no carriage return)."""
        now = time.perf_counter() if now is None else now
        elapsed = max(now - self.start, 1e-9)
        rate = self.done / elapsed
        filled = int(self.width * self.done / self.total) if self.total else self.width
        left = _clock((self.total - self.done) / rate) if rate > 0 else "--:--"
        return (f"[{'#' * filled}{'.' * (self.width - filled)}] {self.done}/{self.total} "
                f"{self.label}, {rate:.1f}/s, {left} left")

    def advance(self, k: int = 1) -> None:
        self.done += k
        if not self.enabled:
            return
        now = time.perf_counter()
        if now - self._drawn >= 0.2 or self.done >= self.total:
            self._drawn = now
            self.stream.write("\r" + self.line(now) + "\x1b[K")
            self.stream.flush()

    def close(self) -> None:
        if self.enabled:
            self.stream.write("\r\x1b[K")
            self.stream.flush()

    @property
    def elapsed(self) -> float:
        return time.perf_counter() - self.start
