"""The journal check every incoming or outgoing log file must pass before it lands.

The journal owns what a valid journal file is (its name, its entries, the hash chain); sync
only asks, through :func:`fieldlog.journal.check_journal_bytes`. The check is a parameter of
the sync so tests can count or fail calls, and so sync never guesses the format.
"""

from __future__ import annotations

from collections.abc import Callable

from fieldlog.journal import check_journal_bytes

JournalCheck = Callable[[str, bytes], None]
"""``check(name, data)``: raises :class:`~fieldlog.errors.JournalError` when ``data`` is not a
valid, intact journal file that may be called ``name``."""


def default_check() -> JournalCheck:
    """The journal's own check."""
    return check_journal_bytes
