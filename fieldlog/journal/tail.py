"""What one more entry needs from the log, kept sealed between commands (the "tail").

``fieldlog record`` appends one entry; checking it needs, of the whole log, only the highest
entry number of each device, the facts the entry checks read (an
:class:`~fieldlog.journal.context.EntryContext`) and the site. Reading, verifying and
replaying a two-year log for that costs most of a second; this record of those facts costs
a few milliseconds to read.

It is kept for the exact bytes it was built from: the sha256 of every file in ``log/`` and
``devices/`` (by name) and the cache key of ``site.toml`` and ``schedule.toml``. Before it is
used, every one of those files is read and hashed again under the device lock; any file
added, removed, edited, truncated or replaced (or a link or folder where a file belongs)
means it is not used and the log is read, checked and replayed the full way, which then
writes a new one. It is only ever built from a log without damaged files, so the next entry
number is what the full read gives; the entry's own checks (fields, bounds, ids, dates,
chain, signature) are the same code either way.

After an append the record is carried over to the new bytes only when the new entry
provably changes nothing else (:func:`~fieldlog.journal.context.after_append`; no correction
or clear names its id; the device's key was registered already, and the entry's day is not
before the first registration unless every usable entry is signed, so no signing rule reads
differently); otherwise the next command takes the full way once.

Where and how: one file per log folder in fieldlog's cache folder, never the site, sealed
like the checked-file packs (:mod:`fieldlog.journal.check_cache`: HMAC-SHA256 under the
user's cache secret, checked before anything is unpickled), atomic writes, at most
:data:`KEEP` kept.
"""

from __future__ import annotations

import hashlib
import os
import stat
from collections.abc import Mapping
from dataclasses import dataclass, replace
from datetime import date
from pathlib import Path

from fieldlog import __version__
from fieldlog.bounds import FILE_CAPS
from fieldlog.cache_files import prune, replace_file, sealed, unpickle, unseal
from fieldlog.journal import check_cache
from fieldlog.journal.context import EntryContext, after_append
from fieldlog.journal.entries import Entry
from fieldlog.journal.names import LOG_DIR, is_working_file
from fieldlog.journal.reader import Journal
from fieldlog.site.cache import cache_folder, cache_key, pickled_with_sites
from fieldlog.site.files import load_site_bytes, read_site_bytes
from fieldlog.site.model import Site

KEEP = 16
FORMAT = 1
_MAGIC = b"fieldlog-journal-tail\n"
_PREFIX, _SUFFIX = "tail-", ".pack"
_DEVICES_DIR = "devices"
_MODULES = ("tail.py", "context.py", "rules.py", "replay.py", "corrections.py", "record.py")
"""Journal modules (besides the checked-file cache's) whose code decides what is kept."""

_CAP = FILE_CAPS["journal"]
_READ_FLAGS = (
    os.O_RDONLY
    | getattr(os, "O_BINARY", 0)
    | getattr(os, "O_NONBLOCK", 0)
    | getattr(os, "O_NOFOLLOW", 0)
)

_DIR_FLAGS = os.O_RDONLY | getattr(os, "O_DIRECTORY", 0) | getattr(os, "O_NOFOLLOW", 0)
_AT = os.open in os.supports_dir_fd and os.scandir in os.supports_fd
"""Files opened relative to their open folder (POSIX); elsewhere by path."""

Digests = Mapping[str, str]
"""File name -> sha256 (hex) of its bytes."""


@dataclass(frozen=True)
class Tail:
    """What the log said when it was last read or appended to (see the module docstring)."""

    site_key: str
    site: Site
    files: Digests
    """Every file of ``log/`` (fieldlog's working files excepted)."""
    devices: Digests
    """Every key file of ``devices/``."""
    highest: Mapping[str, int]
    """Per device, the highest entry number among the usable entries."""
    context: EntryContext
    referenced: frozenset[str]
    """Entry ids a correction supersedes or a clear names (present in the log or not)."""
    signing_from: date | None
    """The earliest day a device key was registered (None: no keys)."""
    unsigned: int
    """Usable entries without a signature (a new signed entry for a day before
    :attr:`signing_from` could make some of them forged)."""
    tip: tuple[str, int, str] | None = None
    """The file the last entry was appended to: its name, how many entries it holds and the
    hash of its highest-numbered one (the next entry's ``prev``). It was sound: it was
    checked before that entry was appended, and the entry read back as written."""

    def known(self, name: str, data: bytes) -> tuple[int, str] | None:
        """How many entries ``name`` holds and its last hash, when :attr:`tip` is that file
        and ``data`` are exactly its bytes then (so it need not be parsed again)."""
        if self.tip is None or self.tip[0] != name or name not in self.files:
            return None
        if hashlib.sha256(data).hexdigest() != self.files[name]:
            return None
        return self.tip[1], self.tip[2]

    def after(self, new: Entry, name: str, data: bytes, folder: Path) -> Tail | None:
        """This record once ``new`` was appended to ``name``, now holding ``data``.

        None when the next command must read the log the full way (see the module
        docstring).
        """
        devices = snapshot(folder, _DEVICES_DIR)
        if devices != self.devices or new.id in self.referenced or new.kind == "correction":
            return None
        if self.signing_from is None or (self.unsigned and new.day < self.signing_from):
            return None
        context = after_append(self.context, new)
        if context is None:
            return None
        named = {new.fields["item"]} if new.kind == "cleared" else set()
        return replace(
            self,
            files={**self.files, name: hashlib.sha256(data).hexdigest()},
            highest={**self.highest, new.device: new.seq},
            context=context,
            referenced=self.referenced | named,
            tip=(name, new.position + 1, new.hash),
        )


def built(
    link: TailLink, files: Digests | None, journal: Journal, ctx: EntryContext
) -> Tail | None:
    """The record of a log just read the full way (``files``: ``log/`` as hashed before the
    read); None when it must not be kept: a damaged file (its entry numbers count only
    through the full read), or a file that changed while the log was read."""
    if files is None or link.site_key is None or link.path is None:
        return None
    if any(f.problem in ("not TOML", "bad entry") for f in journal.findings):
        return None
    devices = snapshot(link.folder, _DEVICES_DIR)
    if devices is None or snapshot(link.folder) != files:
        return None
    highest: dict[str, int] = {}
    referenced: set[str] = set()
    for e in journal.entries:
        highest[e.device] = max(highest.get(e.device, 0), e.seq)
        if e.kind == "correction":
            referenced.add(e.fields["supersedes"])
        elif e.kind == "cleared":
            referenced.add(e.fields["item"])
    registered = [r.registered for r in journal.devices.values()]
    return Tail(
        link.site_key,
        link.site,
        files,
        devices,
        highest,
        ctx,
        frozenset(referenced),
        min(registered, default=None),
        journal.unsigned,
    )


def snapshot(folder: Path, sub: str = LOG_DIR) -> Digests | None:
    """The sha256 of every file in ``folder/sub`` (``log`` or ``devices``) by name.

    None when something there is not a plain file within the journal's size cap (a link, a
    folder, a huge file) or cannot be read: the full read then reports it. Plain ``os``
    calls on names (a thousand files per command): no link is followed, nothing but a
    regular file is opened for reading. Where the system allows it, the folder is opened
    once (not through a link) and each file is opened relative to it, so no path is joined
    or looked up again per file.
    """
    where = folder / sub
    if where.is_symlink():
        return None
    if not where.is_dir():
        return {} if not where.exists() else None
    try:
        at = os.open(where, _DIR_FLAGS) if _AT else None
        try:
            return _digests(where, sub, at)
        finally:
            if at is not None:
                os.close(at)
    except OSError:
        return None


def _digests(where: Path, sub: str, at: int | None) -> Digests | None:
    """:func:`snapshot` of the open folder ``at`` (None: by path, ``where``)."""
    with os.scandir(where if at is None else at) as it:
        names = sorted(item.name for item in it)
    out: dict[str, str] = {}
    for name in names:
        if (sub == LOG_DIR and is_working_file(name)) or (
            sub == _DEVICES_DIR and name.startswith(".")
        ):
            continue
        data = _plain_file(name, at) if at is not None else _plain_file(str(where / name))
        if data is None:
            return None
        out[name] = hashlib.sha256(data).hexdigest()
    return out


def _plain_file(path: str, at: int | None = None) -> bytes | None:
    """The bytes of a regular file within the journal's cap; None for anything else.

    ``at``: the open folder ``path`` is relative to (None: ``path`` is a full path).

    Raises:
        OSError: it cannot be opened or read (a link: O_NOFOLLOW refuses it).
    """
    fd = os.open(path, _READ_FLAGS, dir_fd=at)
    try:
        info = os.fstat(fd)
        if not stat.S_ISREG(info.st_mode) or info.st_size > _CAP:
            return None
        # One read of its size and a byte more (not a buffer of the cap a thousand times):
        # all of it when the file is as fstat said; otherwise (it grew, it shrank, a short
        # read) read on to its end, wherever that is, or past the cap.
        size = info.st_size
        data = os.read(fd, size + 1)
        while len(data) != size and len(data) <= _CAP:
            more = os.read(fd, _CAP + 1 - len(data))
            if not more:
                break
            data += more
        return data if len(data) <= _CAP else None
    finally:
        os.close(fd)


@dataclass
class TailLink:
    """One command's use of its log folder's tail: the site and the record read.

    Mutable: the command keeps it from loading the site to writing the record back.
    """

    folder: Path
    path: Path | None
    """The record's file; None when caching is off."""
    key: str
    secret: bytes
    site_key: str | None
    site: Site
    kept: Tail | None

    @classmethod
    def open(cls, folder: Path | str) -> TailLink:
        """Load the site of ``folder`` (from the record when its files are unchanged).

        Raises:
            SiteError: the site files are missing or wrong (as :func:`load_site`).
        """
        folder = Path(folder)
        site_raw, schedule_raw = read_site_bytes(folder)
        site_key = cache_key(site_raw, schedule_raw)
        path, key, secret, kept = _read(folder)
        if kept is not None and (site_key is None or kept.site_key != site_key):
            kept = None
        site = kept.site if kept is not None else load_site_bytes(folder, site_raw, schedule_raw)
        return cls(folder, path, key, secret, site_key, site, kept)

    def current(self) -> tuple[Tail | None, Digests | None]:
        """The record when ``log/`` and ``devices/`` are exactly as it was built from, and
        the log's digests as they are now (call under the device lock)."""
        files = snapshot(self.folder)
        kept = self.kept
        if (
            kept is None
            or files != kept.files
            or snapshot(self.folder, _DEVICES_DIR) != kept.devices
        ):
            return None, files
        return kept, files

    def store(self, tail: Tail | None) -> None:
        """Write ``tail`` back (None: nothing to keep, the next command reads the log)."""
        if tail is None or self.path is None:
            return
        data = sealed(_header(self.key), self.secret, pickled_with_sites(tail))
        try:
            replace_file(self.path, data, _PREFIX)
        except OSError as exc:
            check_cache.warn(
                f"cannot write the journal cache in {self.path.parent}: {exc.strerror}"
            )
            return
        prune(self.path.parent, _PREFIX, _SUFFIX, KEEP, self.path, check_cache.warn)


def _read(folder: Path) -> tuple[Path | None, str, bytes, Tail | None]:
    """Where the record of ``folder`` lives, its key and secret, and the record if usable."""
    code = check_cache.code_fingerprint()
    secret = check_cache.cache_secret() if code is not None else None
    if code is None or secret is None:
        return None, "", b"", None
    h = hashlib.sha256(f"{FORMAT}|{__version__}|{code}".encode())
    here = Path(__file__).resolve().parent
    try:
        for name in _MODULES:
            h.update((here / name).read_bytes())
    except OSError:
        return None, "", b"", None
    where = str((folder / LOG_DIR).resolve()).encode("utf-8", "surrogateescape")
    key = hashlib.sha256(h.digest() + where).hexdigest()
    path = cache_folder() / f"{_PREFIX}{hashlib.sha256(where).hexdigest()[:32]}{_SUFFIX}"
    try:
        data = path.read_bytes()
    except OSError:
        return path, key, secret, None  # not kept yet, or unreadable: the full way
    payload = unseal(data, _header(key), secret)
    found = unpickle(payload) if payload is not None else None
    return path, key, secret, found if type(found) is Tail else None


def _header(key: str) -> bytes:
    return _MAGIC + key.encode("ascii") + b"\n"
