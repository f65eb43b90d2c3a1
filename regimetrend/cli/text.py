"""Plain-text helpers for the terminal: number formatting, aligned tables, the cautions, and
``visible``, the one place control characters are made harmless before they reach a terminal."""

from __future__ import annotations

import re

from ..plaintext import fmt as fmt  # re-exported: the commands format through cli.text
from ..plaintext import table as table

# C0 and C1 control characters (escape sequences, bell, backspace, carriage return ...), DEL,
# line and paragraph separators and the bidirectional overrides that reorder what is shown.
_CONTROLS = re.compile("[\x00-\x09\x0b-\x1f\x7f-\x9f\u061c\u200e\u200f\u2028\u2029"
                       "\u202a-\u202e\u2066-\u2069]")
_CONTROLS_AND_NEWLINE = re.compile(_CONTROLS.pattern[:-1] + "\n]")


def _escape(match) -> str:
    code = ord(match.group())
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


def visible(text, keep_newlines: bool = False) -> str:
    """``text`` with every control character shown as an escape (``\\x1b``, ``\\u202e``), so
    a name from the data can neither clear the screen nor fake or reorder a line; newlines are
    escaped too unless ``keep_newlines`` (for text laid out in lines by the program)."""
    pattern = _CONTROLS if keep_newlines else _CONTROLS_AND_NEWLINE
    return pattern.sub(_escape, str(text))


class VisibleStream:
    """A text stream that passes everything written through ``visible`` (newlines kept): the
    commands print through it, so no user string reaches the terminal raw."""

    def __init__(self, stream):
        self._stream = stream

    def write(self, text) -> int:
        self._stream.write(visible(text, keep_newlines=True))
        return len(text)

    def __getattr__(self, name):  # flush, fileno, isatty, encoding, buffer ...
        return getattr(self._stream, name)


def caution_lines() -> list[str]:
    """The cautions shown with a plain trend forecast (the ``forecast`` command): they speak of
    the one trend it fitted, not of regimes it never looked for."""
    from ..cautions import ONE_TREND_CAUTIONS

    return list(ONE_TREND_CAUTIONS)
