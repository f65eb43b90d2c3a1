"""Progress of long runs on standard error: a one-line bar with the rate and the time left.

``StageBar(label)`` is a ``progress(done, total)`` callable, the form the rolling origin
(``evaluate.compare``) and the report (``report.write_report``) call after each step. The bar is
drawn only when standard error is a terminal and the user did not ask for ``--quiet``; it never
writes to standard output, so results piped from a command stay clean. It is redrawn at most five
times a second and wiped when the stage ends.
"""

from __future__ import annotations

import sys
import time


def clock(seconds: float) -> str:
    """``m:ss`` or ``h:mm:ss``."""
    seconds = round(seconds)
    h, rest = divmod(seconds, 3600)
    m, s = divmod(rest, 60)
    return f"{h}:{m:02d}:{s:02d}" if h else f"{m}:{s:02d}"


class StageBar:
    """A bar for one stage (``label``), e.g. ``rolling origin [#####.....] 12/24 origins,
    1.5/s, 0:08 left``."""

    def __init__(self, label: str, unit: str = "steps", *, quiet: bool = False, stream=None,
                 width: int = 24, clock_fn=time.perf_counter):
        self.label, self.unit, self.width = label, unit, width
        self.stream = stream if stream is not None else sys.stderr
        self.enabled = not quiet and bool(getattr(self.stream, "isatty", lambda: False)())
        self._clock = clock_fn
        self.start: float | None = None
        self._drawn = -1.0

    def line(self, done: int, total: int, now: float) -> str:
        """The bar's text (no carriage return)."""
        elapsed = max(now - (self.start if self.start is not None else now), 1e-9)
        rate = done / elapsed
        filled = int(self.width * done / total) if total else self.width
        left = clock((total - done) / rate) if rate > 0 and done else "--:--"
        return (f"{self.label} [{'#' * filled}{'.' * (self.width - filled)}] {done}/{total} "
                f"{self.unit}, {rate:.1f}/s, {left} left")

    def __call__(self, done: int, total: int) -> None:
        now = self._clock()
        if self.start is None:
            self.start = now
        if not self.enabled:
            return
        if done >= total:
            self.stream.write("\r\x1b[K")
            self.stream.flush()
            self.start = None
            return
        if now - self._drawn >= 0.2:
            self._drawn = now
            self.stream.write("\r" + self.line(done, total, now) + "\x1b[K")
            self.stream.flush()
