"""Adding one entry to the journal: the single way the command line and the app both write.

:func:`record_entry` checks the entry completely (field shapes, then the schedule and the log)
*before* anything touches the disk, then appends it under the device lock with an atomic
replace. So a refused entry leaves no trace, and an accepted one is either wholly there or not
at all, whatever happens to the process or the disk.
"""

from __future__ import annotations

import re
import tomllib
from collections.abc import Callable, Mapping
from dataclasses import replace
from datetime import UTC, date, datetime
from functools import partial
from pathlib import Path
from types import MappingProxyType
from typing import TYPE_CHECKING, Any

import tomli_w

from fieldlog.bounds import MAX_COUNTER
from fieldlog.durable import make_folder
from fieldlog.errors import EntryRefused, JournalError
from fieldlog.home import fieldlog_home
from fieldlog.journal.chain import entry_hash
from fieldlog.journal.context import EntryContext
from fieldlog.journal.device import device_id
from fieldlog.journal.entries import CORRECTION_OWN, KINDS, Entry, FieldProblem
from fieldlog.journal.filecheck import FileCheck
from fieldlog.journal.key_seal import seal as seal_key_file
from fieldlog.journal.keys import add_warning, check_author, device_key, public_hex, saved_author
from fieldlog.journal.own_memory import remember_entry

if TYPE_CHECKING:  # the key's type only; cryptography is imported where keys are used
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey
from fieldlog.journal.names import SUFFIX, file_name
from fieldlog.journal.reader import Journal, checked, log_folder, read_journal, remember
from fieldlog.journal.record_rules import recordable
from fieldlog.journal.registry import DeviceRecord, register
from fieldlog.journal.rules import check_day, check_entry, check_hidden, refuse
from fieldlog.journal.signing import sign
from fieldlog.journal.store import (
    atomic_write,
    device_lock,
    read_bytes,
    remove_stale_temps,
    write_error,
)
from fieldlog.journal.tail import TailLink, built
from fieldlog.site.model import Site

Clock = Callable[[], datetime]

FILE_HEADER = (
    b"# fieldlog field journal: written only by fieldlog, by appending. Do not edit:\n"
    b"# 'fieldlog verify SITE' detects any changed, removed or reordered entry.\n"
)
_SEQ_RE = re.compile(rb"(?m)^seq = (\d+)\r?$")
_FAR_FUTURE = date.max


def utc_now() -> datetime:
    """The wall clock, in UTC: the one place the journal reads it (the ``written`` stamp)."""
    return datetime.now(UTC)


def record_entry(
    folder: Path | str,
    site: Site,
    kind: str,
    day: date | None,
    fields: Mapping[str, Any],
    *,
    today: date,
    author: str | None = None,
    device: str | None = None,
    clock: Clock = utc_now,
    home: Path | None = None,
    site_name: str | None = None,
    key: Ed25519PrivateKey | None = None,
    tail: TailLink | None = None,
) -> Entry:
    """Check an entry against the schedule and the log, then append it to the journal.

    Args:
        folder: the site folder (its ``log/`` is created when missing).
        site: the site as loaded from ``folder`` (its schedule is what ids are checked against).
        kind: one of :data:`fieldlog.journal.entries.KINDS`.
        day: the day the entry describes (for ``started``/``finished``: the actual date).
            None means ``today``; for a correction, the day of the entry corrected.
        fields: the kind's fields; text from a command line is parsed (``"3"``, ``"A,B"``).
            A correction takes ``supersedes``, ``reason``, optionally ``withdraw=True``, and
            any fields of the corrected kind as replacement values.
        today: the real date, read once by the caller; later days are refused.
        author: who records it (default: the name kept for this device, see
            :func:`fieldlog.journal.keys.save_author`; never the login name).
        device: device id (default: this machine's, see :mod:`fieldlog.journal.device`).
        clock: gives the ``written`` time; tests and the sample generator pass a fixed one.
        home: fieldlog's data folder (default ``$FIELDLOG_HOME`` or the user data folder).
        site_name: how the user named the site folder, for the fixes in error messages.
        key: the device's signing key (default: this machine's, made on first use; the
            sample generator passes keys derived from a fixed seed).
        tail: the log folder's kept record (:mod:`fieldlog.journal.tail`) when ``site`` came
            from :meth:`TailLink.open`: if the log's files are exactly those it was built
            from, the log is not read again; either way it is brought up to date.

    Returns:
        The entry as written, with its id.

    Raises:
        EntryRefused: the entry is wrong, or no author name is known; nothing was written.
        JournalError: the log cannot be written (full or read-only disk, a damaged day file,
            another writer holding the lock too long, another key registered for this
            device); the log is as it was.
    """
    folder = Path(folder)
    site_name = site_name or str(folder)
    if kind not in KINDS:
        raise refuse(f"unknown entry kind '{kind}'", fix=f"use one of: {', '.join(KINDS)}")
    fields = {
        k: v
        for k, v in fields.items()
        if v is not None and not (isinstance(v, list | tuple) and not v)
    }
    if kind != "correction":
        day = day or today
        check_day(day, today, site.start)
        clean = _shape(kind, fields)
    device = device or device_id(home)
    author = check_author(author) if author is not None else _kept_author(home)
    key = key or device_key(home).private
    log = log_folder(folder)
    try:
        make_folder(log)
    except OSError as exc:
        raise write_error(log, exc, "create the log folder") from exc
    with device_lock(log, device):
        use = tail if tail is not None and tail.site is site and kind != "correction" else None
        kept, files = use.current() if use is not None else (None, None)
        base = kept
        if kept is not None:  # the log is byte for byte what the kept record was built from
            assert day is not None  # set to ``day or today`` above for every other kind
            check_entry(site, kept.context, kind, day, clean, site_name)
            next_seq = partial(_checked_seq, log, device, kept.highest.get(device, 0))
        else:
            from fieldlog.journal.replay import replay  # the full way only: 30 ms of imports

            journal = read_journal(folder)
            if kind == "correction":
                day, clean = _correction(site, journal, day, fields, today, site_name)
            else:
                assert day is not None  # set to ``day or today`` above for every other kind
                context = EntryContext.of(replay(site, journal, _FAR_FUTURE))
                check_entry(site, context, kind, day, clean, site_name)
                base = built(use, files, journal, context) if use is not None else None
            next_seq = partial(_next_seq, log, journal, device)
        entry, data = _append(
            log,
            next_seq,
            device,
            kind,
            day,
            clean,
            author,
            clock,
            _Signer(key, folder, today),
            kept.known if kept is not None else None,
        )
        if use is not None and base is not None:
            use.store(base.after(entry, entry.file, data, folder))
        _remember(home, folder, entry)
        return entry


def _remember(home: Path | None, folder: Path, entry: Entry) -> None:
    """This device's memory of its last entry (:mod:`.own_memory`); the entry is already in
    the log, so a memory that cannot be written is a warning, never a refusal."""
    try:
        remember_entry(home or fieldlog_home(), folder, entry)
    except JournalError as exc:
        add_warning(f"recorded, but this device could not keep its memory of it: {exc}")


def _shape(kind: str, fields: Mapping[str, Any]) -> dict[str, Any]:
    """The fields by the reader's rules and the record-time ones (:mod:`.record_rules`)."""
    try:
        return recordable(kind, fields)
    except FieldProblem as exc:
        raise refuse(f"{kind}: {exc}") from None


def _kept_author(home: Path | None) -> str:
    found = saved_author(home)
    if found is None:
        raise EntryRefused(
            "no author name is set for this device",
            fix="give your name once with --author NAME (it is kept for this "
            "device); the app asks for it when it first opens",
        )
    return found


class _Signer:
    """Registers the device's key in the site (once) and signs each entry's hash."""

    def __init__(self, key: Ed25519PrivateKey, folder: Path, today: date) -> None:
        self.key, self.folder, self.today = key, folder, today

    def register(self, device: str, author: str, seq: int) -> None:
        """Write ``devices/<device>.toml`` unless it is there with this key already."""
        record = DeviceRecord(device, public_hex(self.key.public_key()), author, self.today, seq)
        register(self.folder, replace(record, seal=seal_key_file(self.key, record)))

    def sign(self, entry_hash: str) -> str:
        """The signature of an entry whose hash is ``entry_hash``."""
        return sign(self.key, entry_hash)


def _correction(
    site: Site,
    journal: Journal,
    day: date | None,
    fields: Mapping[str, Any],
    today: date,
    site_name: str,
) -> tuple[date, dict[str, Any]]:
    """Check a correction and the entry it would leave; returns its day and fields."""
    from fieldlog.journal.replay import correction_base, replay  # see record_entry

    target_id = str(fields.get("supersedes", ""))
    target = journal.by_id(target_id)
    if target is None:
        raise refuse(
            f"there is no entry {target_id or '(none given)'} in the log",
            fix="give the id printed when the entry was recorded (see the daily report)",
        )
    view = replay(site, journal, _FAR_FUTURE)
    if target.id in view.superseded:
        later = view.superseded[target.id]
        raise refuse(
            f"entry {target.id} was already corrected by {later.id}",
            fix=f"correct {later.id} instead",
        )
    base, chain = correction_base(journal.entries, target)
    changes = {k: v for k, v in fields.items() if k not in CORRECTION_OWN}
    withdraw = bool(fields.get("withdraw"))
    if withdraw and (changes or (day is not None and day != target.day)):
        raise refuse(
            "a withdrawal carries no new values", fix="leave out --withdraw, or the new values"
        )
    day = day or target.day
    check_day(day, today, site.start)
    if not withdraw and not changes and day == target.day:
        raise refuse(
            "nothing to correct",
            fix="give the right day (--on DATE), new values (--set FIELD=VALUE) or "
            "--withdraw if the entry was recorded in error",
        )
    clean = _shape("correction", {**fields, "corrects": base.kind})
    check_hidden("correction", clean)
    if not withdraw:
        merged = {**base.fields, **{k: v for k, v in clean.items() if k not in CORRECTION_OWN}}
        rest = [e for e in journal.entries if e.id not in chain]
        check_entry(site, replay(site, rest, _FAR_FUTURE), base.kind, day, merged, site_name)
    return day, clean


def _next_seq(log: Path, journal: Journal, device: str) -> int:
    """One more than the highest entry number this device has written in ``log``.

    Taken from the entries read, and from the raw text of any of the device's files that
    could not be read as entries, so a damaged file still counts.
    """
    highest = max((e.seq for e in journal.entries if e.device == device), default=0)
    damaged = {f.file for f in journal.findings if f.problem in ("not TOML", "bad entry")}
    for name in damaged:
        if name.endswith(f"_{device}{SUFFIX}"):
            for m in _SEQ_RE.finditer(read_bytes(log / name)):
                # A number longer than any allowed one counts as past the bound (and is
                # never converted: Python refuses to convert 5,000-digit text anyway).
                seq = int(m[1]) if len(m[1]) <= 10 else MAX_COUNTER + 1
                highest = max(highest, seq)
    return _checked_seq(log, device, highest)


def _checked_seq(log: Path, device: str, highest: int) -> int:
    """``highest + 1``, refused past the bound of entry numbers."""
    if highest >= MAX_COUNTER:
        raise JournalError(
            f"device {device} has used every entry number up to {highest:,}",
            file=log,
            fix="run 'fieldlog verify'; an entry numbered this high was not written by fieldlog",
        )
    return highest + 1


def _append(
    log: Path,
    next_seq: Callable[[], int],
    device: str,
    kind: str,
    day: date,
    fields: dict[str, Any],
    author: str,
    clock: Clock,
    signer: _Signer,
    known: Callable[[str, bytes], tuple[int, str] | None] | None = None,
) -> tuple[Entry, bytes]:
    """Append the entry to its day file; returns it as written, and the file's new bytes.

    ``known`` gives, from the kept record of the log, a file's entry count and last hash
    when its bytes are exactly those the record vouches for: the file is not parsed again.
    """
    name = file_name(day, device)
    path = log / name
    remove_stale_temps(log, name)
    old = read_bytes(path)
    prev, count = "", 0
    check: FileCheck | None = FileCheck(name)
    tip = known(name, old) if known is not None and old else None
    if tip is not None:
        count, prev = tip
        check = None  # sound and unchanged since the last entry went in; not parsed here
    elif old:
        check = checked(name, old)  # already parsed by read_journal: a cache hit
        broken = [f for f in check.findings if f.problem in ("not TOML", "bad name", "bad entry")]
        if broken:
            raise JournalError(
                f"the day file is damaged ({broken[0]}); nothing was written",
                file=path,
                fix="run 'fieldlog verify'; move the damaged file out of log/ to record that "
                "day again",
            )
        count = len(check.entries)
        if check.entries:
            prev = max(check.entries, key=lambda e: e.seq).hash
    seq = next_seq()
    signer.register(device, author, seq)  # before the device's first signed entry lands
    written = clock().astimezone(UTC).replace(microsecond=0)
    entry = Entry(
        id=f"{device}.{seq}",
        seq=seq,
        kind=kind,
        day=day,
        written=written,
        author=author,
        device=device,
        fields=MappingProxyType(dict(fields)),
        prev=prev,
    )
    body = entry.stored()
    body["hash"] = entry_hash(body)
    body["sig"] = signer.sign(body["hash"])
    block = b"[[entry]]\n" + tomli_w.dumps(body).encode("utf-8")
    # A new file opens with a warning comment; entries are kept one blank line apart.
    sep = FILE_HEADER + b"\n" if not old else (b"\n" if old.endswith(b"\n") else b"\n\n")
    # The old bytes are a sound journal file and end with a newline (added by `sep` if not),
    # so appending a self-contained [[entry]] table cannot change how they parse: reading the
    # new block back on its own proves the whole new file reads back as intended.
    rows = tomllib.loads(block.decode("utf-8"))["entry"]
    if len(rows) != 1 or rows[0] != body or entry_hash(rows[0]) != body["hash"]:
        raise JournalError(
            "the new entry did not read back as written; nothing was written",
            file=path,
            fix="report this as a fieldlog bug, with the entry",
        )
    new = old + sep + block
    atomic_write(path, new)
    written_entry = replace(entry, hash=body["hash"], sig=body["sig"], file=name, position=count)
    if check is not None:
        remember(name, new, FileCheck(name, (*check.entries, written_entry), check.findings))
    return written_entry, new
