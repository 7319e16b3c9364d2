"""``verify``: is the journal exactly as fieldlog wrote it?

Checks every file in the site's ``log/`` folder (its name, its TOML, every entry, the hash
chain) and the log as a whole (an entry id used twice, a device's numbering with a hole in
it). Each finding names the file, the entry and what is wrong: edited, removed, reordered,
misfiled, bad name, not TOML.

One gap is known and stated: the very last entry a device ever wrote can be removed without a
trace in the site folder alone (nothing was chained after it). The office copy catches that,
since a synced file may only ever grow.
"""

from __future__ import annotations

from pathlib import Path

from fieldlog.journal.filecheck import Finding
from fieldlog.journal.reader import read_journal


def verify(folder: Path | str) -> list[Finding]:
    """Every integrity finding for the site folder ``folder`` (empty when the log is sound).

    Raises:
        JournalError: the log folder cannot be read at all.
    """
    return list(read_journal(folder).findings)
