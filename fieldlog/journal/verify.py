"""``verify``: is the journal exactly as fieldlog wrote it?

Checks every file in the site's ``log/`` folder (its name, its TOML, every entry, the hash
chain), the seal of every device key file, and the log as a whole (an entry id used twice, a
device's numbering with a hole in it). Each finding names the file, the entry and what is
wrong: edited, removed, reordered, misfiled, bad name, not TOML, bad key file.

One gap is known and stated: the very last entry a device ever wrote can be removed without a
trace in the site folder alone (nothing was chained after it). The office copy catches that,
since a synced file may only ever grow.
"""

from __future__ import annotations

from pathlib import Path

from fieldlog.journal.filecheck import Finding
from fieldlog.journal.key_seal import seal_findings
from fieldlog.journal.reader import Journal, read_journal


def verify(folder: Path | str) -> list[Finding]:
    """Every integrity finding for the site folder ``folder`` (empty when the log is sound).

    Raises:
        JournalError: the log folder cannot be read at all.
    """
    return integrity_findings(read_journal(folder))


def integrity_findings(journal: Journal) -> list[Finding]:
    """The findings of the read (files, entries, signatures) and of the key files' seals.

    The seals are checked here rather than on every read: only ``verify`` and the app's log
    check print what a key file says, and ``fieldlog schedule`` need not load cryptography.
    """
    return [*journal.findings, *seal_findings(journal.devices.values())]
