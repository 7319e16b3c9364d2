"""Checked journal files kept between commands, so a long log costs only what changed.

Checking a day file (TOML parse, every entry's shape and hash, the chain, each Ed25519
signature) is a pure function of its name, its bytes, the public key its device has
registered, and fieldlog's code. A two-year log holds about 1,000 such files and every
command used to check them all again (about 5 s); a foreman's evening adds one or two.

So each file's :class:`~fieldlog.journal.filecheck.FileCheck` and its signature verdicts are
stored under a key covering exactly those inputs: the sha256 of the file's bytes, its name,
the raw public key registered for its device (or none), and a fingerprint of everything that
decides the answer (the format number, fieldlog's and Python's and cryptography's versions,
and the source of the modules that parse, check and verify). An edited, forged, truncated or
replaced file, a changed or removed key file, or upgraded code therefore never meets an old
answer: it is checked afresh. What runs across files (the chain of numbers, duplicates, which
entries are forged by the signing rules, the office receipts) is never cached; it runs on the
per-file results every time.

Where: one pack per log folder in fieldlog's cache folder (the site cache's, never a site
folder, which travels to the office). Each pack starts with a header holding its key, the
sha256 of its payload and an HMAC-SHA256 of key and payload under a random secret kept in
the cache folder (created once, readable only by the user). A pack that is truncated,
damaged, edited (even with its sha256 recomputed), copied from another machine or written
by other code is a miss: it is ignored, and rebuilt from the files. The payload is unpickled
only after the HMAC matched, so a planted pack never runs code. Writes are atomic
(:mod:`fieldlog.cache_files`); at most :data:`KEEP` packs are kept, least recently used go
first.
"""

from __future__ import annotations

import copyreg
import functools
import hashlib
import os
import pickle
import sys
import warnings
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType
from typing import Any

from fieldlog import __version__
from fieldlog.cache_files import (
    SECRET_NAME,
    pickled,
    prune,
    replace_file,
    sealed,
    unpickle,
    unseal,
    user_secret,
)
from fieldlog.journal.filecheck import FileCheck
from fieldlog.site.cache import cache_folder

KEEP = 16
"""How many log folders' packs are kept; the least recently used go first."""

FORMAT = 1
"""Bump when the layout below changes."""

_MAGIC = b"fieldlog-journal-cache\n"
_PREFIX, _SUFFIX = "journal-", ".pack"
_AS_USUAL = "the log was checked from its files as usual"
_DECIDING_MODULES = (
    "journal/check_cache.py",
    "journal/filecheck.py",
    "journal/entries.py",
    "journal/fields.py",
    "journal/chain.py",
    "journal/names.py",
    "journal/signing.py",
    "journal/registry.py",
    "journal/reader.py",
    "bounds.py",
    "errors.py",
    "guarded_read.py",
)
"""Source files (under ``fieldlog/``) whose code decides a file's check or a verdict."""

Verdicts = tuple[bool | None, ...]
"""Per entry of a file, whether its signature verifies against its device's registered key
(None: not decided here: no signature, no key, or an entry of another device)."""


class JournalCacheWarning(UserWarning):
    """The cache folder cannot be used; the log was checked from its files as usual."""


@dataclass(frozen=True)
class Cached:
    """One file's check as the cache holds it."""

    check: FileCheck
    verdicts: Verdicts


@dataclass
class CheckPack:
    """The cached checks of one log folder, read once and written back when they changed.

    Mutable on purpose: it lives for one read of the log and collects what that read found.
    """

    path: Path | None
    """The pack file; None when caching is off (no fingerprint, no usable folder)."""
    key: str = ""
    secret: bytes = b""
    old: Mapping[str, bytes] = field(default_factory=dict)
    """Record key -> pickled :class:`Cached`, as read from the pack."""
    new: dict[str, bytes] = field(default_factory=dict)
    """The records the current files need: kept from :attr:`old`, or added."""
    changed: bool = False

    @classmethod
    def open(cls, log: Path) -> CheckPack:
        """The pack for the log folder ``log`` (empty when missing or unusable)."""
        code = _fingerprint()
        if code is None:
            return cls(None)
        folder = cache_folder()
        secret = _secret(folder)
        if secret is None:
            return cls(None)
        where = str(log.resolve()).encode("utf-8", "surrogateescape")
        key = hashlib.sha256(f"{FORMAT}|{code}|".encode() + where).hexdigest()
        path = folder / f"{_PREFIX}{hashlib.sha256(where).hexdigest()[:32]}{_SUFFIX}"
        return cls(path, key, secret, _read(path, key, secret))

    def lookup(self, record: str) -> Cached | None:
        """What the pack holds under ``record`` (see :func:`record_key`), if anything."""
        blob = self.old.get(record)
        if blob is None:
            return None
        found = _unpickle(blob)
        if found is None:
            self.changed = True  # a record that does not read back is dropped
            return None
        self.new[record] = blob
        return found

    def keep(self, record: str) -> bool:
        """Keep ``record`` without reading it back; False when the pack does not hold it."""
        blob = self.old.get(record)
        if blob is not None:
            self.new[record] = blob
        return blob is not None

    def store(self, record: str, cached: Cached) -> None:
        """Keep ``cached`` under ``record`` (a file checked afresh)."""
        if self.path is None:
            return
        self.new[record] = _dumps(cached)
        self.changed = True

    def save(self) -> None:
        """Write the pack back when a file was added, changed or removed since it was read."""
        if self.path is None or not (self.changed or set(self.old) - set(self.new)):
            return
        _write(self.path, self.key, self.secret, self.new)


def record_key(name: str, data: bytes, device_key: str) -> str:
    """The key of one file's record: its name, its bytes and its device's registered key."""
    h = hashlib.sha256()
    for part in (name.encode("utf-8", "surrogateescape"), device_key.encode("ascii")):
        h.update(len(part).to_bytes(8, "big"))
        h.update(part)
    h.update(data)
    return h.hexdigest()


# --- the pack file ------------------------------------------------------------------------


def _header(key: str) -> bytes:
    return _MAGIC + key.encode("ascii") + b"\n"


def _read(path: Path, key: str, secret: bytes) -> Mapping[str, bytes]:
    """The records in ``path``, or none when it is missing, damaged or not this key's."""
    try:
        data = path.read_bytes()
    except (FileNotFoundError, NotADirectoryError):
        return {}
    except OSError as exc:
        _warn(f"cannot read the journal cache {path}: {exc.strerror}")
        return {}
    payload = unseal(data, _header(key), secret)
    if payload is None:
        return {}  # truncated, damaged, or not this user's fieldlog's: never unpickled
    records = unpickle(payload)
    if not isinstance(records, dict):
        return {}
    try:
        os.utime(path)  # most recently used: kept longest by prune
    except OSError as exc:
        _warn(f"cannot mark the journal cache {path} as used: {exc.strerror}")
    return records


def _dumps(cached: Cached) -> bytes:
    return pickled(cached, _DISPATCH)


def _unpickle(blob: bytes) -> Cached | None:
    found = unpickle(blob)
    return found if type(found) is Cached else None


def _write(path: Path, key: str, secret: bytes, records: dict[str, bytes]) -> None:
    data = sealed(_header(key), secret, pickle.dumps(records, protocol=pickle.HIGHEST_PROTOCOL))
    try:
        replace_file(path, data, _PREFIX)
    except OSError as exc:
        _warn(f"cannot write the journal cache in {path.parent}: {exc.strerror}; {_AS_USUAL}")
        return
    prune(path.parent, _PREFIX, _SUFFIX, KEEP, path, _warn)


# --- the secret and the fingerprint -------------------------------------------------------


def _secret(folder: Path) -> bytes | None:
    """This user's random cache secret, made on first use; None when it cannot be kept."""
    try:
        return user_secret(folder / SECRET_NAME, _warn)
    except OSError as exc:
        _warn(f"cannot keep the journal cache in {folder}: {exc.strerror}; {_AS_USUAL}")
        return None


@functools.cache
def _fingerprint() -> str | None:
    """Everything besides a file's own inputs that decides its check; None turns caching
    off (the source cannot be read, so no safe fingerprint exists)."""
    from cryptography import __version__ as crypto_version

    here = Path(__file__).resolve().parents[1]
    h = hashlib.sha256(f"{__version__}|{sys.version}|{crypto_version}".encode())
    try:
        for name in _DECIDING_MODULES:
            h.update((here / name).read_bytes())
    except OSError:
        return None
    return h.hexdigest()


def cache_secret() -> bytes | None:
    """This user's journal-cache secret (made on first use); None when it cannot be kept."""
    return _secret(cache_folder())


def code_fingerprint() -> str | None:
    """The fingerprint of the deciding code (None: caching is off)."""
    return _fingerprint()


def warn(message: str) -> None:
    """Report a cache folder that cannot be used (a :class:`JournalCacheWarning`)."""
    warnings.warn(message, JournalCacheWarning, stacklevel=2)


def _warn(message: str) -> None:
    warnings.warn(message, JournalCacheWarning, stacklevel=3)


def frozen_mapping(items: dict[Any, Any] | None = None) -> MappingProxyType[Any, Any]:
    """Rebuild a read-only mapping (pickle cannot name ``mappingproxy`` itself)."""
    return MappingProxyType(items or {})


def _reduce_mapping(m: MappingProxyType[Any, Any]) -> tuple[Any, ...]:
    return (frozen_mapping, (dict(m),))


_DISPATCH = copyreg.dispatch_table.copy()
_DISPATCH[MappingProxyType] = _reduce_mapping
