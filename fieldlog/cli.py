"""The ``fieldlog`` command line: one subcommand per module in :mod:`fieldlog.commands`.

stdout carries data, stderr carries diagnostics. Exit codes: 0 ok, 1 a problem was found
(a late job is not a problem; a broken log is), 2 bad input. A mistake a user can make is one
line on stderr, never a traceback.
"""

from __future__ import annotations

import argparse
import importlib
import sys
import warnings
from collections.abc import Sequence

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


class _Parser(argparse.ArgumentParser):
    """argparse that exits 2 with one line (its default, kept explicit for the contract)."""

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
    argv = sys.argv[1:] if argv is None else list(argv)
    first = argv[0] if argv else None
    # Importing only the chosen command's module keeps `fieldlog schedule` quick to start.
    parser = build_parser(first if first in COMMANDS else None, argv)
    args = parser.parse_args(argv)
    warnings.formatwarning = _one_line_warning
    if args.command not in LONG_RUNNING:
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


def _print_key_warnings() -> None:
    """Say once on stderr that a new signing key could not be made owner-only (only when a
    command made one: the key module is not even imported otherwise)."""
    keys = sys.modules.get("fieldlog.journal.keys")
    if keys is not None:
        for warning in keys.take_warnings():
            print(f"fieldlog: warning: {warning}", file=sys.stderr)
