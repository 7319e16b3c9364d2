"""`fieldlog sync`: not built yet."""

from __future__ import annotations

import argparse
import sys


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register `fieldlog sync`."""
    p = sub.add_parser("sync", help="(not built yet)")
    p.add_argument("rest", nargs="*")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Not built yet."""
    print("fieldlog: 'sync' is not built yet", file=sys.stderr)
    return 2
