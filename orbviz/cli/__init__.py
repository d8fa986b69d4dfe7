"""Command line: ``orbviz COMMAND ...``; :func:`main` is testable in-process.

Exit status: 0 done, 1 a batch item failed (or a bug, reported in one line), 2 bad input,
130 interrupted (SIGINT or SIGTERM: nothing new written; a batch keeps the items it finished).
Errors and notes go to stderr, one line each, prefixed ``orbviz:``.
"""

from __future__ import annotations

import os
import signal
import sys
from collections.abc import Sequence
from typing import NoReturn

from orbviz import _interrupt
from orbviz.errors import OrbvizError

__all__ = ["main", "run"]

_MANY_WRITES = {"batch", "demo"}  # commands that put files in place item by item


def _quiet_stdout() -> None:
    """After a closed pipe (``orbviz info 3dz2 | head -1``), send the rest nowhere."""
    with open(os.devnull, "w") as devnull:  # noqa: PTH123 - a file descriptor is needed
        os.dup2(devnull.fileno(), sys.stdout.fileno())


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; return the exit status."""
    previous = _interrupt.install()
    try:
        return _run(argv)
    finally:
        _interrupt.restore(previous)


def run() -> NoReturn:
    """Run the ``orbviz`` program: exit with the status of :func:`main`.

    Once main has returned, the run is over and its status decided: SIGINT and SIGTERM are
    ignored while the interpreter shuts down, rather than killing it with its outputs in place.
    """
    status = main()
    for sig in (signal.SIGINT, signal.SIGTERM):
        signal.signal(sig, signal.SIG_IGN)
    sys.exit(status)


def _run(argv: Sequence[str] | None) -> int:
    try:  # an interrupt while the commands load is an interrupt too
        from orbviz.cli.commands import COMMANDS
        from orbviz.cli.parser import build_parser

        parser = build_parser(sys.argv[1:] if argv is None else argv)
        args = parser.parse_args(argv)
        if not getattr(args, "command", None):
            parser.print_help()
            return 2
        if args.command not in _MANY_WRITES:
            _interrupt.one_write()
        status = COMMANDS[args.command](args)
        _interrupt.check()
        sys.stdout.flush()
        return status
    except SystemExit as stop:  # --help and --version
        return int(stop.code or 0)
    except KeyboardInterrupt:
        print("orbviz: interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        _quiet_stdout()
        return 0
    except OrbvizError as error:
        print(f"orbviz: error: {_as_flag(error)}", file=sys.stderr)
        return 2
    except MemoryError:
        print("orbviz: error: out of memory; use a smaller grid or image", file=sys.stderr)
        return 2
    except Exception as error:  # a bug, not bad input: one line, unless debugging
        if os.environ.get("ORBVIZ_DEBUG"):
            raise
        if _interrupt.pending():
            print("orbviz: interrupted", file=sys.stderr)
            return 130
        print(
            f"orbviz: internal error: {type(error).__name__}: {error} "
            "(set ORBVIZ_DEBUG=1 for the traceback)",
            file=sys.stderr,
        )
        return 1


def _as_flag(error: OrbvizError) -> str:
    """Name an option checked after parsing by its flag, as the parser's own checks do.

    ``layout`` is checked against the panel count once the specs are made: ``--layout``.
    """
    from orbviz.errors import OptionError

    if isinstance(error, OptionError) and error.key.isidentifier():
        return f"--{error.key.replace('_', '-')}: {error.rule}"
    return str(error)
