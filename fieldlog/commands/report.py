"""`fieldlog report`: not built yet."""

from __future__ import annotations

import argparse
import sys


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register `fieldlog report`."""
    p = sub.add_parser("report", help="(not built yet)")
    p.add_argument("rest", nargs="*")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Not built yet."""
    print("fieldlog: 'report' is not built yet", file=sys.stderr)
    return 2
