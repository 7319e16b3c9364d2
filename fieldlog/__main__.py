"""``python -m fieldlog``: the same as the ``fieldlog`` command."""

from fieldlog.cli import entry

entry()
