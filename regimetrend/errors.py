"""The one exception type users see, and how its messages name the settings.

Every problem caused by the input (a bad file, a bad row, a bad option) is raised as
``InputError`` with a plain message that names the row, column or option. The CLI prints the
message on one line and exits with code 2; Python callers can catch it like any exception.

A message names a setting through ``about``, ``option`` or ``setting``: from Python they give
the parameter name (``max_breaks``, ``max_breaks=0``); while the command line runs them (it
installs its table of flags with ``named_by``, see ``cli/names.py``) they give the flag
(``--max-breaks``, ``--max-breaks 0``). So one message serves both callers.
"""

from __future__ import annotations

import contextlib
from collections.abc import Iterator, Mapping
from contextvars import ContextVar


class InputError(ValueError):
    """Bad input or a bad option; the message says what and where, in one line."""

    def __init__(self, message: str):
        super().__init__(" ".join(str(message).split()))


_FLAGS: ContextVar[Mapping[str, str] | None] = ContextVar("regimetrend_flags", default=None)


@contextlib.contextmanager
def named_by(flags: Mapping[str, str]) -> Iterator[None]:
    """Within the block, messages name settings by ``flags`` (Python name -> flag)."""
    token = _FLAGS.set(flags)
    try:
        yield
    finally:
        _FLAGS.reset(token)


def option(name: str) -> str:
    """The setting ``name`` as the caller knows it: ``--max-breaks`` or ``max_breaks``."""
    flags = _FLAGS.get()
    if flags is None:
        return name
    return flags.get(name) or "--" + name.replace("_", "-")


def about(name: str) -> str:
    """The start of a message about one setting: ``option --trim`` or ``parameter trim``."""
    return f"{'option' if _FLAGS.get() is not None else 'parameter'} {option(name)}"


def setting(name: str, value) -> str:
    """A setting with a value, written as the caller would: ``--max-breaks 0`` or
    ``max_breaks=0``."""
    if _FLAGS.get() is not None:
        return f"{option(name)} {value}"
    return f"{name}={value!r}"
