"""One module per ``fieldlog`` subcommand: ``add_parser(subparsers)`` and ``run(args) -> int``.

Modules here import Textual only inside ``run`` (the ``open`` and ``demo`` commands), so the
printed commands start fast.
"""
