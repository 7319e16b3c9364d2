"""The ``fieldlog`` command line: one subcommand per module in :mod:`fieldlog.commands`.

stdout carries data, stderr carries diagnostics. Exit codes: 0 ok, 1 a problem was found
(a late job is not a problem; a broken log is), 2 bad input. A mistake a user can make is one
line on stderr, never a traceback.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys
import warnings
from collections.abc import Sequence
from typing import Any, NoReturn

from fieldlog import __version__
from fieldlog.commands.arguments import EXIT_BAD_INPUT, EXIT_OK
from fieldlog.errors import FieldlogError

COMMANDS = (
    "schedule",
    "lookahead",
    "history",
    "record",
    "report",
    "verify",
    "sync",
    "sites",
    "check",
    "export",
    "open",
    "demo",
)
"""Subcommands, each a module ``fieldlog.commands.<name>`` with ``add_parser`` and ``run``."""

LONG_RUNNING = frozenset({"open", "demo"})
"""Subcommands that run the app (many loads in one process); the others load once and exit."""


def _columns() -> int:
    """``shutil.get_terminal_size().columns`` (``COLUMNS``, else the terminal on stdout, else
    80), without importing shutil: argparse imports it for every parser and argument it
    builds, and with it ``bz2``, ``lzma`` and ``zlib``, which no command needs."""
    try:
        columns = int(os.environ["COLUMNS"])
    except (KeyError, ValueError):
        columns = 0
    if columns > 0:
        return columns
    try:
        size = os.get_terminal_size(sys.__stdout__.fileno())  # type: ignore[union-attr]
    except (AttributeError, ValueError, OSError):
        return 80
    return size.columns or 80


class _Formatter(argparse.HelpFormatter):
    """argparse's help layout, told the width it would find (see :func:`_columns`)."""

    def __init__(
        self,
        prog: str,
        indent_increment: int = 2,
        max_help_position: int = 24,
        width: int | None = None,
    ) -> None:
        width = _columns() - 2 if width is None else width  # argparse's own "- 2"
        super().__init__(prog, indent_increment, max_help_position, width)


class _Parser(argparse.ArgumentParser):
    """argparse that exits 2 with one line (its default, kept explicit for the contract)."""

    def __init__(self, *args: Any, **kwargs: Any) -> None:
        kwargs.setdefault("formatter_class", _Formatter)
        super().__init__(*args, **kwargs)

    def error(self, message: str) -> None:  # type: ignore[override]
        self.exit(EXIT_BAD_INPUT, f"fieldlog: {message} (see '{self.prog} --help')\n")


def build_parser(only: str | None = None, words: Sequence[str] = ()) -> argparse.ArgumentParser:
    """The parser with every subcommand registered, or just ``only`` (faster start).

    ``words``: the command line to be parsed, for ``record``, which then builds only the
    entry forms it names (see :func:`fieldlog.commands.record.add_parser`).
    """
    parser = _Parser(
        prog="fieldlog",
        description="End-of-shift site log, live critical-path float and a two-week lookahead "
        "for construction foremen. A schedule is a plan, not a permit.",
    )
    parser.add_argument("--version", action="version", version=f"fieldlog {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    sub.required = True
    for name in COMMANDS if only is None else (only,):
        module = importlib.import_module(f"fieldlog.commands.{name}")
        if name == "record":
            module.add_parser(sub, words)
        else:
            module.add_parser(sub)
    return parser


def _one_line_warning(
    message: Warning | str,
    category: type[Warning],
    filename: str,
    lineno: int,
    line: str | None = None,
) -> str:
    """Warnings (a site cache that cannot be written) as one diagnostic line on stderr."""
    return f"fieldlog: warning: {message}\n"


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    global _one_shot
    argv = sys.argv[1:] if argv is None else list(argv)
    first = argv[0] if argv else None
    # Importing only the chosen command's module keeps `fieldlog schedule` quick to start.
    parser = build_parser(first if first in COMMANDS else None, argv)
    args = parser.parse_args(argv)
    warnings.formatwarning = _one_line_warning
    _one_shot = args.command not in LONG_RUNNING
    if _one_shot:
        from fieldlog.site.files import freeze_after_loads

        freeze_after_loads()  # one load, one answer, exit: nothing to collect afterwards
    try:
        return int(args.run(args))
    except FieldlogError as exc:
        print(f"fieldlog: {exc.message}", file=sys.stderr)
        return exc.exit_code
    except KeyboardInterrupt:
        print("fieldlog: interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return EXIT_OK
    finally:
        _print_key_warnings()


_one_shot = False
"""Set by :func:`main` once the command line names a one-shot command (see :func:`entry`)."""


def entry() -> NoReturn:
    """The ``fieldlog`` command and ``python -m fieldlog``: :func:`main`, then exit.

    A one-shot command ends with ``os._exit`` once stdout and stderr are flushed: the
    interpreter's own shutdown (freeing every module, the site and the schedule one object
    at a time) takes longer than a small command's work (about 20 ms for ``fieldlog
    schedule`` on the sample site, 0.15 s on a 10,000-activity one) and keeps nothing.
    Nothing else is pending then: journal and cache writes are complete and fsynced (or
    replaced whole) before their command returns, and files are closed by ``with``. The
    normal exit is kept whenever that cannot be shown: the app, an error that escaped
    :func:`main` (its traceback is printed as usual), ``--help`` and bad arguments
    (argparse's own exit), another thread still running, an ``atexit`` callback
    registered (``weakref.finalize``, ``logging``, a temporary folder), or an output that
    cannot be flushed (a closed pipe, a full disk: Python reports it as it always did).
    tests/test_exit_path.py runs it through pipes.

    numpy's BLAS is told to use one thread (unless the user set it): fieldlog does no
    linear algebra, and OpenBLAS otherwise starts a thread per core at import that spins
    for a while, doubling the CPU time of ``import numpy`` and taking the other core from
    whatever the machine is doing (measured on 2 cores: 205 -> 111 ms CPU, 120 -> 115 ms).
    """
    os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
    code = main()
    if _one_shot and _nothing_pending():
        try:
            for stream in (sys.stdout, sys.stderr):
                if stream is not None:
                    stream.flush()
        except (OSError, ValueError):
            pass  # the normal exit below tries again and reports it as Python always has
        else:
            os._exit(code & 0xFF)
    sys.exit(code)


def _nothing_pending() -> bool:
    """True when no other thread runs and no ``atexit`` callback is registered (on a Python
    that cannot tell, False: the normal exit)."""
    import atexit

    count = getattr(atexit, "_ncallbacks", None)
    threading = sys.modules.get("threading")  # not imported: no thread was started with it
    alone = threading is None or threading.active_count() == 1
    return count is not None and count() == 0 and alone


def _print_key_warnings() -> None:
    """Say once on stderr that a new signing key could not be made owner-only (only when a
    command made one: the key module is not even imported otherwise)."""
    keys = sys.modules.get("fieldlog.journal.keys")
    if keys is not None:
        for warning in keys.take_warnings():
            print(f"fieldlog: warning: {warning}", file=sys.stderr)
