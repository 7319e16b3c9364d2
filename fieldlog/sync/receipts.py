"""Office receipts: what the office folder held after each sync, hash-chained and append-only.

A journal can show an edited or a removed entry in the middle, but not one removed from the
very end: nothing was chained after it. So at every sync the office side is given a receipt:
for each device, the highest entry number both folders hold and that entry's hash (and the
file it is in). A log that later holds less than a receipt says was removed from, and the
receipt names the device, the entry and the file.

A receipts file is TOML written by fieldlog only, by appending::

    [[receipt]]
    number = 4                      # 1, 2, 3 ... in the file, no gaps
    synced_by = "tab-north-3fa9c1"  # the device whose sync wrote it
    written = 2026-03-06 17:32:00+00:00   # that device's clock, for people only
    known = ["tab-north-3fa9c1", "tab-south-77b0e2"]   # devices with a chain of their own
    prev = "<hash of receipt 3>"    # "" for the first receipt
    hash = "<sha256 of this receipt's values, prev included>"

    [[receipt.holds]]               # one per device, in device order
    device = "tab-north-3fa9c1"
    seq = 57
    entry_hash = "<the hash of entry tab-north-3fa9c1.57>"
    file = "2026-03-06_tab-north-3fa9c1.toml"

The hash is the journal's own canonical hash (:func:`fieldlog.journal.chain.entry_hash`) over
the receipt's values with ``holds`` always present (an empty list when nothing is held), so a
changed value breaks the receipt's hash, and a removed, reordered or rewritten receipt breaks
the next one's ``prev`` and the numbering.
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from dataclasses import dataclass
from datetime import datetime
from typing import Any

import tomli_w

from fieldlog.bounds import MAX_COUNTER
from fieldlog.errors import JournalError, OutOfBounds, UnreadableToml
from fieldlog.guarded_read import loads
from fieldlog.journal.chain import entry_hash
from fieldlog.journal.names import parse_file_name, valid_device

RECEIPTS_DIR = "receipts"
MAX_NUMBER = MAX_COUNTER

HEADER = (
    "# fieldlog office receipts: written only by fieldlog sync, by appending. Do not edit:\n"
    "# 'fieldlog verify' detects a changed, removed or reordered receipt.\n"
)

_HEX64 = re.compile(r"^[0-9a-f]{64}$")
_RECEIPT_KEYS = {"number", "synced_by", "written", "known", "holds", "prev", "hash"}
_HOLD_KEYS = {"device", "seq", "entry_hash", "file"}


@dataclass(frozen=True)
class Holding:
    """One device's highest entry held by both folders at a sync."""

    device: str
    seq: int
    entry_hash: str
    file: str
    """The journal file (in ``log/``) that holds the entry."""

    @property
    def entry_id(self) -> str:
        """``<device>.<seq>``, as the journal names entries."""
        return f"{self.device}.{self.seq}"

    def content(self) -> dict[str, Any]:
        """The values as stored and hashed."""
        return {
            "device": self.device,
            "seq": self.seq,
            "entry_hash": self.entry_hash,
            "file": self.file,
        }


@dataclass(frozen=True)
class Receipt:
    """One sync's receipt."""

    number: int
    synced_by: str
    written: datetime | None
    holds: tuple[Holding, ...]
    prev: str
    hash: str
    known: tuple[str, ...] = ()
    """Devices that had synced with the office themselves (each has its own chain there) at
    this sync, sorted. A device key in a site that no receipt knows came from somewhere else.
    Left out of the stored values (and the hash) when empty."""

    def content(self) -> dict[str, Any]:
        """The values the hash covers (everything but the hash)."""
        out: dict[str, Any] = {"number": self.number, "synced_by": self.synced_by}
        if self.written is not None:
            out["written"] = self.written
        if self.known:
            out["known"] = list(self.known)
        out["holds"] = [h.content() for h in self.holds]
        out["prev"] = self.prev
        return out

    def same_facts(self, holds: tuple[Holding, ...], known: tuple[str, ...]) -> bool:
        """True when this receipt already says ``holds`` and ``known`` (no new one needed)."""
        return self.holds == tuple(sorted(holds, key=lambda h: h.device)) and self.known == tuple(
            sorted(set(known))
        )


def new_receipt(
    previous: Receipt | None,
    synced_by: str,
    written: datetime | None,
    holds: tuple[Holding, ...],
    known: tuple[str, ...] = (),
) -> Receipt:
    """The receipt that follows ``previous`` (None: the first of a file)."""
    number = previous.number + 1 if previous else 1
    prev = previous.hash if previous else ""
    draft = Receipt(
        number,
        synced_by,
        written,
        tuple(sorted(holds, key=lambda h: h.device)),
        prev,
        "",
        tuple(sorted(set(known))),
    )
    return Receipt(
        draft.number,
        draft.synced_by,
        draft.written,
        draft.holds,
        prev,
        entry_hash(draft.content()),
        draft.known,
    )


def receipt_text(receipt: Receipt) -> str:
    """The TOML text appended for ``receipt`` (starting with a blank line)."""
    head: dict[str, Any] = {"number": receipt.number, "synced_by": receipt.synced_by}
    if receipt.written is not None:
        head["written"] = receipt.written
    if receipt.known:
        head["known"] = list(receipt.known)
    head["prev"] = receipt.prev
    head["hash"] = receipt.hash
    parts = ["\n[[receipt]]\n", tomli_w.dumps(head)]
    for h in receipt.holds:
        parts += ["\n[[receipt.holds]]\n", tomli_w.dumps(h.content())]
    return "".join(parts)


@dataclass(frozen=True)
class ReceiptsFile:
    """A receipts file as read: the receipts that could be read, and what is wrong with it."""

    label: str
    """Where it is, for messages (``receipts/tab-north-3fa9c1.toml`` or a full path)."""
    receipts: tuple[Receipt, ...]
    problems: tuple[str, ...]
    data: bytes

    @property
    def chain(self) -> str:
        """The chain's name: the first 12 hex digits of its first receipt's hash."""
        return self.receipts[0].hash[:12] if self.receipts else ""

    @property
    def latest(self) -> Receipt | None:
        """The last receipt, or None for an empty file."""
        return self.receipts[-1] if self.receipts else None

    def hashes(self) -> tuple[str, ...]:
        """Every receipt's hash, in order (for comparing two copies of one chain)."""
        return tuple(r.hash for r in self.receipts)


def parse_receipts(label: str, data: bytes) -> ReceiptsFile:
    """Read a receipts file and check its chain; never raises for bad content.

    Args:
        label: where the file is, used in every problem.
        data: its bytes.
    """
    try:
        doc = loads(data, "receipts", label)
    except UnreadableToml as exc:
        return _broken(
            label, data, "is not TOML: " + exc.problem + (f" (line {exc.line})" if exc.line else "")
        )
    except OutOfBounds as exc:
        return _broken(label, data, exc.problem)
    rows = doc.get("receipt", [])
    if set(doc) - {"receipt"} or not isinstance(rows, list):
        return _broken(label, data, "holds something other than [[receipt]] tables")
    receipts: list[Receipt] = []
    problems: list[str] = []
    for position, row in enumerate(rows, 1):
        receipt, problem = _receipt(row)
        if receipt is None:
            problems.append(
                f"{label}: receipt {position}: {problem}; "
                "the file was not written this way by fieldlog"
            )
            continue
        problems += _chain_problems(label, position, receipt, receipts[-1] if receipts else None)
        receipts.append(receipt)
    return ReceiptsFile(label, tuple(receipts), tuple(problems), data)


def _broken(label: str, data: bytes, problem: str) -> ReceiptsFile:
    return ReceiptsFile(label, (), (f"{label}: {problem}",), data)


def _chain_problems(label: str, position: int, r: Receipt, before: Receipt | None) -> list[str]:
    """What is wrong with receipt ``r`` at ``position`` given the receipt read before it."""
    out = []
    if entry_hash(r.content()) != r.hash:
        out.append(f"{label}: receipt {r.number}: edited: its values no longer match its hash")
    if r.number != position:
        out.append(
            f"{label}: receipt {r.number}: removed or reordered: it is receipt "
            f"{position} of the file"
        )
    expected = before.hash if before else ""
    if r.prev != expected:
        out.append(
            f"{label}: receipt {r.number}: removed or rewritten: it is not chained to "
            + (
                f"receipt {before.number} before it"
                if before
                else "nothing (the receipts before it are gone)"
            )
        )
    return out


def _receipt(row: Any) -> tuple[Receipt | None, str]:
    """Build a receipt from a stored table, or say why it is malformed."""
    if not isinstance(row, dict):
        return None, "is not a table"
    unknown = set(row) - _RECEIPT_KEYS
    if unknown:
        return None, f"has unknown key '{sorted(unknown)[0]}'"
    number, by, written = row.get("number"), row.get("synced_by"), row.get("written")
    prev, digest, holds_raw = row.get("prev"), row.get("hash"), row.get("holds", [])
    if not isinstance(number, int) or not _whole(number, 1):
        return None, f"number {_shown(number)} is not a whole number from 1"
    if not isinstance(by, str) or not valid_device(by):
        return None, f"synced_by {_shown(by)} is not a device id"
    if written is not None and (not isinstance(written, datetime) or written.utcoffset() is None):
        return None, "written is not a time with its UTC offset"
    if not isinstance(prev, str) or not (prev == "" or _HEX64.match(prev)):
        return None, "prev is not a hash"
    if not isinstance(digest, str) or not _HEX64.match(digest):
        return None, "hash is not a SHA-256 hex digest"
    known = row.get("known", [])
    if (
        not isinstance(known, list)
        or any(not isinstance(d, str) or not valid_device(d) for d in known)
        or known != sorted(set(known))
    ):
        return None, "known is not a sorted list of device ids"
    if not isinstance(holds_raw, list):
        return None, "holds is not a list of tables"
    holds = []
    for raw in holds_raw:
        hold, problem = _holding(raw)
        if hold is None:
            return None, problem
        holds.append(hold)
    if len({h.device for h in holds}) != len(holds):
        return None, "names one device twice"
    return Receipt(number, by, written, tuple(holds), prev, digest, tuple(known)), ""


def _holding(raw: Any) -> tuple[Holding | None, str]:
    if not isinstance(raw, Mapping) or set(raw) != _HOLD_KEYS:
        return None, f"a holds table needs exactly {', '.join(sorted(_HOLD_KEYS))}"
    device, seq, digest, file = raw["device"], raw["seq"], raw["entry_hash"], raw["file"]
    if not isinstance(device, str) or not valid_device(device):
        return None, f"device {_shown(device)} is not a device id"
    if not isinstance(seq, int) or not _whole(seq, 1):
        return None, f"seq {_shown(seq)} is not a whole number from 1"
    if not isinstance(digest, str) or not _HEX64.match(digest):
        return None, "entry_hash is not a SHA-256 hex digest"
    if not isinstance(file, str) or not _files_for(file, device):
        return None, f"file {_shown(file)} is not a journal file of device {device}"
    return Holding(device, seq, digest, file), ""


def _files_for(name: str, device: str) -> bool:
    try:
        return parse_file_name(name)[1] == device
    except JournalError:
        return False


def _whole(value: Any, low: int) -> bool:
    return isinstance(value, int) and not isinstance(value, bool) and low <= value <= MAX_NUMBER


def _shown(value: Any) -> str:
    text = repr(value) if not isinstance(value, list | dict) else f"a {type(value).__name__}"
    return text if len(text) <= 40 else text[:37] + "..."
