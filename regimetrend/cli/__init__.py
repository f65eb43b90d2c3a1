"""Command line: ``regimetrend COMMAND FILE [options]``.

Each command lives in its own module with a ``register(subparsers)`` function; this module only
collects them, runs the chosen one and turns ``InputError`` into one line on standard error and
exit code 2 (no traceback for bad input).
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys

from ..errors import InputError, named_by
from .names import FLAGS

# Command modules, in the order they appear in --help.
COMMANDS = ("forecast", "scan", "compare", "report", "portfolio", "demo")


class _Parser(argparse.ArgumentParser):
    """argparse that reports a bad option as one line and exit code 2."""

    def error(self, message):  # noqa: D401 - argparse API
        # main() prints the one "regimetrend: error: " prefix; a command's parser adds its name
        command = self.prog.removeprefix("regimetrend").strip()
        raise InputError(f"{command}: {message}" if command else message)


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="regimetrend",
                     description="Find where a trend's growth regime changed, compare "
                                 "regime-aware forecasts with one global trend, and report "
                                 "growth by regime.")
    from .. import __version__
    parser.add_argument("--version", action="version", version=f"regimetrend {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name in COMMANDS:
        try:
            module = importlib.import_module(f"{__name__}.{name}")
        except ModuleNotFoundError as exc:
            if exc.name == f"{__name__}.{name}":
                continue  # command not built yet
            raise
        module.register(sub)
    return parser


def main(argv=None) -> int:
    from .text import VisibleStream, visible

    stdout = sys.stdout
    sys.stdout = VisibleStream(stdout)  # every line a command prints, control characters shown
    try:
        parser = build_parser()
        args = parser.parse_args(argv)
        if not getattr(args, "run", None):
            parser.print_help()
            return 2
        from ..output import protecting

        with protecting(getattr(args, "file", None)), named_by(FLAGS):
            return int(args.run(args) or 0)  # outputs never replace the input
    except InputError as exc:
        print(f"regimetrend: error: {visible(exc)}", file=sys.stderr)  # one line, always
        return 2
    except KeyboardInterrupt:
        print("regimetrend: interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:  # output piped into a reader that stopped early (head, less)
        os.dup2(os.open(os.devnull, os.O_WRONLY), stdout.fileno())
        return 1
    except OSError as exc:  # the system refused (permissions, a full disk): one line, no trace
        where = f": {exc.filename}" if exc.filename else ""
        print(f"regimetrend: error: {visible(exc.strerror or exc)}{visible(where)}",
              file=sys.stderr)
        return 2
    finally:
        sys.stdout = stdout


if __name__ == "__main__":
    sys.exit(main())
