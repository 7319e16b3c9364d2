"""The seal of a device key file: its author, registration day and first signed entry, signed.

A key file (``devices/<device>.toml``, :mod:`fieldlog.journal.registry`) says whose name a device
records under, the day its key was registered and the first entry number it signs. ``verify``
prints those lines, so in a dispute they are evidence too. The entries' own signatures do not
cover them, so without a seal anyone could change the name or the day in a text editor and
``verify`` would still say "log intact". The device therefore signs its key file when it
writes it, with the same private key that signs its entries: ``seal`` is the Ed25519 signature
of a fixed context string and the SHA-256 of the five values.

What a seal proves and what it does not:

* a key file whose author, ``registered`` or ``signed_from`` was edited no longer matches its
  seal: that is a finding, exit 1 (the entries are still checked against its public key, so
  one edited line does not turn a genuine record into forgeries);
* a key file without a seal is a finding too (fieldlog has sealed every key file it wrote since
  the seal was introduced, so a missing seal means the line was removed or the file was made by
  hand);
* a key file planted whole, with a key of the planter's own and entries signed with it, seals
  itself; that case is caught against the office's receipts (DEVELOPERS.md, "Signed entries").

cryptography is imported only when a seal is made or checked, so reading a journal for
``fieldlog schedule`` does not pay for it.
"""

from __future__ import annotations

import hashlib
from collections.abc import Iterable
from functools import lru_cache
from typing import TYPE_CHECKING

from fieldlog.journal.filecheck import Finding
from fieldlog.journal.registry import DEVICES_DIR, DeviceRecord, key_file_name

if TYPE_CHECKING:
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

SEAL_CONTEXT = b"fieldlog device key file v1\n"
"""Prefixed to the digest before signing, so a seal is never mistaken for an entry signature."""

NO_SEAL = (
    "it carries no seal, so nothing vouches for its author, registration day and first signed "
    "entry; fieldlog seals every key file it writes; restore fieldlog's copy (the office has "
    "one after a sync)"
)
BAD_SEAL = (
    "its seal does not match: the author, registration day or first signed entry was changed "
    "after fieldlog wrote it (its entries are still checked against its public key); restore "
    "fieldlog's copy (the office has one after a sync)"
)


def sealed_message(record: DeviceRecord) -> bytes:
    """The bytes a device signs for its key file: the context and a digest of the five values.

    Each value is on its own line and none may hold a line break (the registry refuses such
    names), so two different records never give the same text.
    """
    text = "\n".join(
        (
            record.device,
            record.public_key,
            record.author,
            record.registered.isoformat(),
            str(record.signed_from),
        )
    )
    return SEAL_CONTEXT + hashlib.sha256(text.encode("utf-8")).digest()


def seal(key: Ed25519PrivateKey, record: DeviceRecord) -> str:
    """The ``seal`` value of ``record``, made with the device's own private key."""
    return key.sign(sealed_message(record)).hex()


@lru_cache(maxsize=256)
def seal_ok(record: DeviceRecord) -> bool:
    """True when ``record.seal`` is its device key's signature of its values.

    Remembered per record (a frozen value: the question is the whole answer), since the app
    shows the log check on every repaint.
    """
    from cryptography.exceptions import InvalidSignature
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PublicKey

    if not record.seal:
        return False
    try:
        public = Ed25519PublicKey.from_public_bytes(bytes.fromhex(record.public_key))
        public.verify(bytes.fromhex(record.seal), sealed_message(record))
    except (InvalidSignature, ValueError):
        return False
    return True


def seal_problem(record: DeviceRecord) -> str | None:
    """What is wrong with ``record``'s seal (none, or not matching), or None when it holds."""
    if seal_ok(record):
        return None
    return BAD_SEAL if record.seal else NO_SEAL


def seal_findings(records: Iterable[DeviceRecord]) -> list[Finding]:
    """A finding for every key file without a seal or whose seal does not match its values."""
    return [
        Finding(key_file_name(record.device), "", "bad key file", problem, folder=DEVICES_DIR)
        for record in records
        if (problem := seal_problem(record)) is not None
    ]
