"""`fieldlog open`: not built yet."""

from __future__ import annotations

import argparse
import sys


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register `fieldlog open`."""
    p = sub.add_parser("open", help="(not built yet)")
    p.add_argument("rest", nargs="*")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Not built yet."""
    print("fieldlog: 'open' is not built yet", file=sys.stderr)
    return 2
