"""Forged entries never land in ``log/``: a journal file holding one is kept in quarantine.

The journal's file check proves a file is a sound chain; it cannot say who wrote it. Every
entry is signed by its device's key (``devices/``, see the journal's signing), so before a
journal file lands on either side its entries are checked against the receiving side's keys
(which sync has just brought up to date, never replacing one). A file with any forged entry
(signature that does not verify, unsigned where the device signs, no key on a signing site)
is not copied into ``log/``: it is saved as ``quarantine/<name>.<hash>.toml`` on the
receiving side and reported, so a person can see exactly what was refused and why. The whole
file is held back (it is the unit sync moves; splitting it would rewrite a record).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from fieldlog.errors import JournalError
from fieldlog.journal.reader import checked
from fieldlog.journal.registry import Registry, read_registry
from fieldlog.journal.signing import check_signatures

QUARANTINE_DIR = "quarantine"
"""Beside ``log/``: journal files refused because they hold forged entries."""


class ForgedEntries(JournalError):
    """A journal file holds at least one forged entry; it is kept out of ``log/``."""


SignatureCheck = Callable[[str, bytes], None]


def signature_check(side_folder: Path) -> SignatureCheck:
    """``check(name, data)`` against the keys of ``side_folder`` (read once, now).

    Raises (from the check):
        ForgedEntries: an entry of the file is forged; the message names the first one.
    """
    registry = read_registry(side_folder)
    return lambda name, data: _check(registry, name, data)


def _check(registry: Registry, name: str, data: bytes) -> None:
    found = checked(name, data)
    forged = [
        f
        for f in check_signatures(found.entries, registry, found.findings).findings
        if f.problem == "forged"
    ]
    if forged:
        more = f" (and {len(forged) - 1} more)" if len(forged) > 1 else ""
        raise ForgedEntries(f"entry {forged[0].entry_id}: {forged[0].detail}{more}")
