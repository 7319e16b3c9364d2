"""Signed entries: who may have written an entry, and which entries are forged.

Every entry's ``hash`` is the SHA-256 of its canonical content including ``prev``
(:mod:`fieldlog.journal.chain`), and the file check has already proved the content matches
it. The device signs that hash with Ed25519 (``sig``), prefixed with a fixed context string so
a fieldlog signature can never be mistaken for a signature over anything else. So the
signature covers every value of the entry and its place in the chain; a hash chain alone
could be recomputed by anyone, a signature only by the holder of the device's private key.

An entry is **forged**, reported and never used (replay, schedule, lookahead, reports and the
app only ever see :attr:`Checked.kept`) when:

* its content no longer matches its hash and it is signed, or its device has a key;
* it is signed, but its device has no registered key, or the signature does not verify
  against the registered key (another key, or a bad signature);
* it is unsigned, yet its device has a key and signs from an earlier entry number
  (``signed_from``), or the device signed an earlier entry;
* it is unsigned, its device has no key, the site registers keys (an invented device), and
  it describes a day after the site began signing.

A site with no key files at all predates signing: its unsigned entries are kept, counted and
said to be unsigned. The same holds for a device not yet registered on a site that has begun
signing, for the days up to and including the first day the site signed: the other device of
a job that upgrades first must not turn its partner's genuine old record into forgeries.
"Began signing" is the earliest day of a validly signed entry or of a key file's
registration, whichever is earlier; moving it later would need a signed entry to move, so an
edited key file cannot widen the window. Unsigned days before it are as open as any log
from before signing; the office's receipts are what protect them.
An entry whose content does not match its hash is never used either.
"""

from __future__ import annotations

import hashlib
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from datetime import date
from functools import lru_cache
from typing import TYPE_CHECKING

from fieldlog.journal.entries import Entry
from fieldlog.journal.filecheck import CONTENT_EDITED, Finding
from fieldlog.journal.registry import DEVICES_DIR, Registry, key_file_name

# cryptography is imported where a key or signature is used (about 30 ms of start-up that
# `fieldlog schedule` on an unsigned or already-checked log never needs).
if TYPE_CHECKING:
    from cryptography.hazmat.primitives.asymmetric.ed25519 import (
        Ed25519PrivateKey,
        Ed25519PublicKey,
    )

CONTEXT = b"fieldlog journal entry v1\n"
"""Prefixed to the hash before signing (domain separation)."""


def signed_message(entry_hash: str) -> bytes:
    """The bytes a device signs for an entry whose hash (hex) is ``entry_hash``."""
    return CONTEXT + bytes.fromhex(entry_hash)


def sign(key: Ed25519PrivateKey, entry_hash: str) -> str:
    """The ``sig`` value for an entry whose hash is ``entry_hash``."""
    return key.sign(signed_message(entry_hash)).hex()


@lru_cache(maxsize=64)
def _public(public_hex: str) -> Ed25519PublicKey:
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PublicKey

    return Ed25519PublicKey.from_public_bytes(bytes.fromhex(public_hex))


_VERIFIED: set[bytes] = set()
_VERIFIED_MAX = 250_000
"""Digests of (key, hash, signature) triples already verified in this process: about 100
bytes each, so the app re-checks only new entries without holding whole strings."""


def signature_ok(public_hex: str, entry_hash: str, sig: str) -> bool:
    """True when ``sig`` is the signature of ``entry_hash`` by ``public_hex``.

    A good signature is remembered: the app re-reads the log after every entry, and a
    signature once checked against a key stays checked (the arguments are the whole question).
    """
    token = hashlib.blake2b(f"{public_hex}:{entry_hash}:{sig}".encode(), digest_size=20).digest()
    if token in _VERIFIED:
        return True
    from cryptography.exceptions import InvalidSignature

    try:
        _public(public_hex).verify(bytes.fromhex(sig), signed_message(entry_hash))
    except (InvalidSignature, ValueError):
        return False
    if len(_VERIFIED) >= _VERIFIED_MAX:
        _VERIFIED.clear()
    _VERIFIED.add(token)
    return True


def forget_signatures() -> None:
    """Empty the cache of verified signatures (benchmarks measure a cold verify)."""
    _VERIFIED.clear()


@dataclass(frozen=True)
class Checked:
    """The entries that may be used, and every forged one as a finding."""

    kept: tuple[Entry, ...]
    findings: tuple[Finding, ...]
    signed: int
    unsigned: int
    """Kept entries without a signature (written before this site's devices signed)."""
    forged: int


def check_signatures(
    entries: Iterable[Entry],
    registry: Registry,
    findings: Iterable[Finding],
    verdicts: Mapping[int, bool] | None = None,
) -> Checked:
    """Sort ``entries`` into kept and forged (see the module docstring for the rules).

    Args:
        entries: every entry read from the log, in any order.
        registry: the site's device keys.
        findings: the file checks' findings (content edits are read from them).
        verdicts: signatures already verified against the very key ``registry`` holds for
            the entry's device, by ``id()`` of the entry object in ``entries`` (the journal
            cache's, see :mod:`fieldlog.journal.check_cache`); any other entry is verified
            here.
    """
    entries = list(entries)
    good = _Verifier(registry, verdicts or {})
    edited = {
        (f.file, f.entry_id)
        for f in findings
        if f.problem == "edited" and f.detail == CONTENT_EDITED
    }
    first_signed: dict[str, int] = {}
    for e in entries:
        if e.sig:
            first_signed[e.device] = min(first_signed.get(e.device, e.seq), e.seq)
    began = _signing_began(entries, registry, good)
    kept: list[Entry] = []
    out: list[Finding] = []
    signed = unsigned = 0
    for e in entries:
        why = _forged_because(e, registry, (e.file, e.id) in edited, first_signed, began, good)
        if why is None:
            kept.append(e)
            if e.sig:
                signed += 1
            else:
                unsigned += 1
        elif why:
            out.append(Finding(e.file, e.id, "forged", why))
    return Checked(tuple(kept), tuple(out), signed, unsigned, len(entries) - len(kept))


class _Verifier:
    """Whether an entry's signature verifies against its device's registered key, decided
    once per entry: from the verdicts given, else by Ed25519 (remembered per process)."""

    def __init__(self, registry: Registry, verdicts: Mapping[int, bool]) -> None:
        self.registry, self.verdicts = registry, verdicts
        self.seen: dict[int, bool] = {}
        """By ``id()`` of the entry: the caller's list keeps every entry alive meanwhile."""

    def __call__(self, e: Entry) -> bool:
        found = self.seen.get(id(e))
        if found is None:
            record = self.registry.devices.get(e.device)
            if not e.sig or record is None:
                found = False
            else:
                known = self.verdicts.get(id(e))
                found = (
                    known if known is not None else signature_ok(record.public_key, e.hash, e.sig)
                )
            self.seen[id(e)] = found
        return found


def _signing_began(entries: list[Entry], registry: Registry, good: _Verifier) -> date | None:
    """The first day this site signed: the earliest registration or validly signed entry."""
    days = [record.registered for record in registry.devices.values()]
    days += [e.day for e in entries if e.sig and good(e)]
    return min(days, default=None)


def _forged_because(
    e: Entry,
    registry: Registry,
    content_edited: bool,
    first_signed: dict[str, int],
    began: date | None,
    good: _Verifier,
) -> str | None:
    """Why ``e`` is forged; None when it may be used; ``""`` when unusable but already
    reported (an unsigned older entry whose content no longer matches its hash)."""
    record = registry.devices.get(e.device)
    if record is not None and e.sig and not content_edited and good(e):  # the usual case
        return None
    key_file = f"{DEVICES_DIR}/{key_file_name(e.device)}"
    if content_edited:
        if e.sig or record is not None:
            return "its content was changed after it was signed; it is not used"
        return ""
    if e.sig:
        if record is None:
            return (
                f"signed, but device {e.device} has no registered key ({key_file}); it is not used"
            )
        if not good(e):
            return (
                f"its signature does not match device {e.device}'s registered key "
                f"({key_file}); it is not used"
            )
        return None
    if record is not None and e.seq >= record.signed_from:
        return (
            f"unsigned, yet device {e.device} signs every entry from number "
            f"{record.signed_from} ({key_file}); it is not used"
        )
    if e.device in first_signed and first_signed[e.device] < e.seq:
        return (
            f"unsigned, yet device {e.device} signed an earlier entry "
            f"({e.device}.{first_signed[e.device]}); it is not used"
        )
    if record is None and registry.in_use and (began is None or e.day > began):
        return (
            f"device {e.device} has no registered key ({key_file}), and this site's "
            f"devices sign their entries since {began}; it is not used"
        )
    return None
