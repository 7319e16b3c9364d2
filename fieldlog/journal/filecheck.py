"""Check one journal file: its name, its TOML, every entry's shape, and the hash chain.

Used by the reader (so a damaged file is reported, never silently used), by ``verify``, by
the writer before it appends, and by sync (through :func:`check_journal_bytes`) before a file
lands in another folder.

What a broken chain means, in the words a finding uses:

* **edited**: an entry's values no longer match its own hash;
* **removed**: an entry is chained to one that is no longer there;
* **reordered**: entries are not in the order they were written (their ``seq`` numbers go
  down); the chain is then checked in the order they were written, so a swap of two entries
  names those two and nothing else;
* **misfiled**: an entry's day or device is not the file's;
* **bad entry** / **not TOML** / **bad name**: the file was not written by fieldlog as it is.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from datetime import date, datetime
from types import MappingProxyType
from typing import Any

from fieldlog.bounds import MAX_COUNTER, check_date, check_text, shown
from fieldlog.errors import JournalError, OutOfBounds, UnreadableToml
from fieldlog.guarded_read import decode, loads
from fieldlog.journal.chain import entry_hash
from fieldlog.journal.entries import (
    CHAIN_KEYS,
    HEADER_KEYS,
    KINDS,
    SIG_KEY,
    Entry,
    FieldProblem,
    check_fields,
)
from fieldlog.journal.names import parse_file_name

_HEX64 = re.compile(r"^[0-9a-f]{64}$")
_HEX128 = re.compile(r"^[0-9a-f]{128}$")
CONTENT_EDITED = "its values no longer match its hash"
"""The detail of an ``edited`` finding about an entry's own content (not its chain link)."""


@dataclass(frozen=True)
class Finding:
    """Something wrong with the journal, located: file, entry, what is wrong, and detail."""

    file: str
    """File name inside the site's ``log/`` folder."""
    entry_id: str
    """The entry concerned, or ``""`` for the whole file."""
    problem: str
    """``edited``, ``removed``, ``reordered``, ``misfiled``, ``duplicate id``, ``bad entry``,
    ``not TOML`` or ``bad name``."""
    detail: str
    line: int | None = None
    folder: str = "log"
    """The site sub-folder the file is in: ``log`` or ``devices`` (key files)."""

    def __str__(self) -> str:
        where = f"{self.folder}/{self.file}" if self.file else self.folder
        if self.line is not None:
            where += f", line {self.line}"
        what = f"entry {self.entry_id}: " if self.entry_id else ""
        return f"{where}: {what}{self.problem}: {self.detail}"


@dataclass(frozen=True)
class FileCheck:
    """What one file holds: the entries that could be read, and what is wrong with it."""

    name: str
    entries: tuple[Entry, ...] = ()
    findings: tuple[Finding, ...] = field(default=())


def check_journal_bytes(name: str, data: bytes) -> None:
    """Refuse a journal file that is not exactly as fieldlog writes it.

    For sync: call it on a file's name and bytes before letting it land in another folder.

    Raises:
        JournalError: the name is not a journal file name, the content is not TOML, an entry
            is malformed or misfiled, or the hash chain is broken (edited, removed or
            reordered entries). The message names the file and the entry.
    """
    found = check_bytes(name, data).findings
    if found:
        first = found[0]
        more = f" (and {len(found) - 1} more)" if len(found) > 1 else ""
        raise JournalError(
            str(first) + more, fix="keep the copy that verifies; run 'fieldlog verify' on both"
        )


def check_bytes(name: str, data: bytes) -> FileCheck:
    """Read and check one journal file; never raises for bad content, reports it instead."""
    try:
        day, device = parse_file_name(name)
    except JournalError as exc:
        return FileCheck(name, (), (Finding(name, "", "bad name", exc.problem),))
    try:
        text = decode(data)
        doc = loads(text, "journal", name)
    except (OutOfBounds, UnreadableToml) as exc:
        return FileCheck(name, (), (Finding(name, "", "not TOML", exc.problem, exc.line),))
    rows = doc.get("entry")
    if set(doc) - {"entry"} or not isinstance(rows, list) or not rows:
        return FileCheck(
            name,
            (),
            (
                Finding(
                    name, "", "bad entry", "a journal file holds [[entry]] tables and nothing else"
                ),
            ),
        )
    lines = _id_lines(text)
    findings: list[Finding] = []
    entries: list[Entry] = []
    for position, row in enumerate(rows):
        entry, problem = _entry(name, position, row)
        line = lines.get(str(row.get("id")) if isinstance(row, dict) else "")
        if entry is None:
            findings.append(Finding(name, _row_id(row), "bad entry", problem, line))
            continue
        if entry.day != day or entry.device != device:
            findings.append(
                Finding(
                    name,
                    entry.id,
                    "misfiled",
                    f"it is for {entry.day} on device {entry.device}, "
                    f"the file for {day} on device {device}",
                    line,
                )
            )
        ok = entry_hash(row) == entry.hash
        if not ok:
            findings.append(Finding(name, entry.id, "edited", CONTENT_EDITED, line))
        entries.append(entry)
    findings += _chain(name, entries, lines)
    return FileCheck(name, tuple(entries), tuple(findings))


def _row_id(row: Any) -> str:
    if isinstance(row, dict) and isinstance(row.get("id"), str):
        return row["id"]
    return ""


def _id_lines(text: str) -> dict[str, int]:
    out: dict[str, int] = {}
    for n, line in enumerate(text.splitlines(), 1):
        m = re.match(r'^\s*id\s*=\s*"([^"]*)"', line)
        if m:
            out.setdefault(m[1], n)
    return out


def _entry(name: str, position: int, row: Any) -> tuple[Entry | None, str]:
    """Build an :class:`Entry` from a stored table, or say why it is malformed."""
    if not isinstance(row, dict):
        return None, "not a table"
    for key in (*HEADER_KEYS, *CHAIN_KEYS):
        if key not in row:
            return None, f"has no '{key}'"
    eid, seq, kind, day = row["id"], row["seq"], row["kind"], row["day"]
    written, author, device = row["written"], row["author"], row["device"]
    if not isinstance(seq, int) or isinstance(seq, bool) or not 1 <= seq <= MAX_COUNTER:
        return None, f"seq {shown(seq)} is not a whole number from 1 to {MAX_COUNTER:,}"
    if not isinstance(device, str) or eid != f"{device}.{seq}":
        return None, f"id {shown(eid)} is not <device>.<seq>"
    if not isinstance(kind, str) or kind not in KINDS:
        return None, f"unknown kind {shown(kind)}"
    if not isinstance(day, date) or isinstance(day, datetime):
        return None, f"day {shown(day)} is not a date"
    if not isinstance(written, datetime) or written.utcoffset() is None:
        return None, f"written {shown(written)} is not a time with its UTC offset"
    if not isinstance(author, str) or not author.strip():
        return None, "author is empty"
    try:
        check_date(day, "day")
        check_date(written, "written")
        check_text(author, "author")
    except OutOfBounds as exc:
        return None, exc.problem
    if not isinstance(row["prev"], str) or not (row["prev"] == "" or _HEX64.match(row["prev"])):
        return None, "prev is not a hash"
    if not isinstance(row["hash"], str) or not _HEX64.match(row["hash"]):
        return None, "hash is not a SHA-256 hex digest"
    sig = row.get(SIG_KEY, "")
    if not isinstance(sig, str) or not (sig == "" or _HEX128.match(sig)):
        return None, "sig is not an Ed25519 signature (128 hex digits)"
    raw = {
        k: v
        for k, v in row.items()
        if k not in HEADER_KEYS and k not in CHAIN_KEYS and k != SIG_KEY
    }
    try:
        fields = check_fields(kind, raw)
    except FieldProblem as exc:
        return None, str(exc)
    return Entry(
        id=eid,
        seq=seq,
        kind=kind,
        day=day,
        written=written,
        author=author,
        device=device,
        fields=MappingProxyType(fields),
        prev=row["prev"],
        hash=row["hash"],
        sig=sig,
        file=name,
        position=position,
    ), ""


def _chain(name: str, entries: list[Entry], lines: dict[str, int]) -> list[Finding]:
    """Order and link findings: check the chain in the order the entries were written."""
    out: list[Finding] = []
    seen: dict[str, Entry] = {}
    for e in entries:
        if e.id in seen:
            out.append(
                Finding(name, e.id, "duplicate id", "the same entry appears twice", lines.get(e.id))
            )
        seen[e.id] = e
    written_order = sorted(range(len(entries)), key=lambda i: entries[i].seq)
    for k, i in enumerate(written_order):
        if i != k:
            e = entries[i]
            out.append(
                Finding(
                    name,
                    e.id,
                    "reordered",
                    f"written as entry {k + 1} of the file, now entry {i + 1}",
                    lines.get(e.id),
                )
            )
    by_hash = {e.hash: e for e in entries}
    for k, i in enumerate(written_order):
        e = entries[i]
        before = entries[written_order[k - 1]] if k else None
        expected = before.hash if before else ""
        if e.prev == expected:
            continue
        line = lines.get(e.id)
        if before is None:
            out.append(
                Finding(
                    name,
                    e.id,
                    "removed",
                    "the entries written before it are no longer in the file",
                    line,
                )
            )
        elif e.prev == "":
            out.append(
                Finding(
                    name,
                    e.id,
                    "edited",
                    f"it was the first entry of the file, yet {before.id} is before it",
                    line,
                )
            )
        elif e.prev in by_hash and by_hash[e.prev].seq < before.seq:
            out.append(
                Finding(
                    name,
                    e.id,
                    "removed",
                    f"entries written between {by_hash[e.prev].id} and it are missing",
                    line,
                )
            )
        else:
            out.append(
                Finding(
                    name,
                    e.id,
                    "removed",
                    f"the entry before it ({before.id}) is not the one it was "
                    "chained to: that entry was rewritten, or one between them "
                    "was removed",
                    line,
                )
            )
    return out
