"""The journal check every incoming or outgoing log file must pass before it lands.

The journal owns what a valid journal file is (its name, its entries, the hash chain); sync
only asks, through :func:`fieldlog.journal.check_journal_bytes`. The check is a parameter of
the sync so tests can count or fail calls, and so sync never guesses the format.
"""

from __future__ import annotations

from collections.abc import Callable

from fieldlog.errors import JournalError
from fieldlog.journal import check_journal_bytes
from fieldlog.journal.names import LOG_DIR

JournalCheck = Callable[[str, bytes], None]
"""``check(name, data)``: raises :class:`~fieldlog.errors.JournalError` when ``data`` is not a
valid, intact journal file that may be called ``name``."""


def default_check() -> JournalCheck:
    """The journal's own check, with a file too deeply nested to parse refused like any other
    unreadable file (the parser gives up with RecursionError; sync carries on)."""
    return _journal_check


def _journal_check(name: str, data: bytes) -> None:
    try:
        check_journal_bytes(name, data)
    except RecursionError as exc:
        raise JournalError(f"{LOG_DIR}/{name}: not TOML: nested too deeply to read",
                           fix="this is not a file fieldlog wrote; find where it came from") \
            from exc
