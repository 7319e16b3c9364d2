"""``fieldlog verify``'s whole report, kept by the exact bytes of everything it reads.

A verify of an unchanged site gives the same report every time: it is a pure function of
the site's ``site.toml``, ``schedule.toml``, ``log/``, ``devices/``, ``conflicts/`` and
``receipts/``, of this device's ``device.toml`` and receipt copies in its data folder, and
of fieldlog's code. The per-file check cache (:mod:`fieldlog.journal.check_cache`) spares
the parsing and the signatures, but a two-year log still costs most of a second to load and
replay; this cache spares that too when nothing changed.

The key covers every one of those inputs: each file's path, kind (file, folder, link) and
the sha256 of its bytes (a link's target text: links are never followed), fieldlog's
version, Python's and cryptography's, and the source of every module of fieldlog. All of it
is read and hashed on every run, before anything is taken from the cache; any difference
(an edited, truncated, added, removed or replaced file anywhere among them) is a miss and
the report is made the full way, then kept. A report made while a file changed under it is
not kept. ``--office`` is never cached (the office folder is not ours to fingerprint).

Kept like the checked-file packs: one file per site in fieldlog's cache folder (never the
site), sealed with an HMAC-SHA256 under the user's cache secret and checked before it is
unpickled, so a planted "log intact" is never shown; atomic writes; at most :data:`KEEP`.
"""

from __future__ import annotations

import functools
import hashlib
import os
import pickle
import stat
import sys
import warnings
from dataclasses import dataclass
from pathlib import Path

from fieldlog import __version__
from fieldlog.bounds import FILE_CAPS
from fieldlog.cache_files import (
    SECRET_NAME,
    prune,
    replace_file,
    sealed,
    unpickle,
    unseal,
    user_secret,
)
from fieldlog.home import last_entry_part
from fieldlog.site.cache import cache_folder

KEEP = 16
FORMAT = 1
_MAGIC = b"fieldlog-verify-cache\n"
_PREFIX, _SUFFIX = "verify-", ".pack"
SITE_PARTS = ("site.toml", "schedule.toml", "log", "devices", "conflicts", "receipts")
"""What verify reads in a site folder."""
HOME_PARTS = ("device.toml", "receipts")
"""What verify reads in fieldlog's data folder, with the site's own-memory file
(:func:`fieldlog.home.last_entry_part`)."""
_BIGGEST = max(FILE_CAPS.values())
"""A file larger than any fieldlog reads is not hashed: nothing is kept for that site."""


@dataclass(frozen=True)
class Report:
    """What verify printed on stdout, line by line, and its exit code."""

    lines: tuple[str, ...]
    code: int


@dataclass(frozen=True)
class ReportCache:
    """The kept report of one site, for its inputs as they were when opened."""

    path: Path
    key: str
    secret: bytes
    site: Path
    home: Path

    @classmethod
    def open(cls, site: Path, home: Path) -> ReportCache | None:
        """The cache for ``site`` as it is now; None when nothing can be kept."""
        code = _code()
        try:
            inputs = _inputs(site, home) if code is not None else None
        except OSError:
            return None  # a folder that cannot be read: the full way says what is wrong
        if code is None or inputs is None:
            return None
        folder = cache_folder()
        try:
            secret = user_secret(folder / SECRET_NAME, _warn)
        except OSError:
            return None  # the journal's cache says so once; verify runs the full way
        if secret is None:
            return None
        where = str(site.resolve()).encode("utf-8", "surrogateescape")
        key = hashlib.sha256(f"{FORMAT}|{code}|{inputs}|".encode() + where).hexdigest()
        path = folder / f"{_PREFIX}{hashlib.sha256(where).hexdigest()[:32]}{_SUFFIX}"
        return cls(path, key, secret, site, home)

    def found(self) -> Report | None:
        """The report kept for exactly these inputs, if any."""
        try:
            data = self.path.read_bytes()
        except OSError:
            return None
        payload = unseal(data, self._header(), self.secret)
        found = unpickle(payload) if payload is not None else None
        return found if type(found) is Report else None

    def keep(self, report: Report) -> None:
        """Keep ``report`` when the inputs are still what they were when this was opened."""
        again = ReportCache.open(self.site, self.home)
        if again is None or again.key != self.key:
            return  # something changed while the report was made: it is not kept
        data = sealed(self._header(), self.secret, pickle.dumps(report))
        try:
            replace_file(self.path, data, _PREFIX)
        except OSError as exc:
            _warn(f"cannot keep verify's report in {self.path.parent}: {exc.strerror}")
            return
        prune(self.path.parent, _PREFIX, _SUFFIX, KEEP, self.path, _warn)

    def _header(self) -> bytes:
        return _MAGIC + self.key.encode("ascii") + b"\n"


def _inputs(site: Path, home: Path) -> str | None:
    """The sha256 over every input of verify (see the module docstring); None: too big."""
    h = hashlib.sha256()
    home_parts = (*HOME_PARTS, last_entry_part(site))
    for base, parts in ((site, SITE_PARTS), (home, home_parts)):
        h.update(b"\0base\0" + os.fsencode(base.resolve()))
        for part in parts:
            if not _walk(base / part, part, h):
                return None
    return h.hexdigest()


def _walk(path: Path, label: str, h: hashlib._Hash) -> bool:
    """Hash ``path`` (a file, a folder's whole tree, a link's target) into ``h``."""
    try:
        info = os.lstat(path)
    except FileNotFoundError:
        h.update(b"\0none\0" + os.fsencode(label))
        return True
    name = os.fsencode(label)
    if stat.S_ISLNK(info.st_mode):
        h.update(b"\0link\0" + name + b"\0" + os.fsencode(os.readlink(path)))
    elif stat.S_ISDIR(info.st_mode):
        h.update(b"\0dir\0" + name)
        for child in sorted(os.listdir(path)):
            if not _walk(path / child, f"{label}/{child}", h):
                return False
    elif stat.S_ISREG(info.st_mode):
        if info.st_size > _BIGGEST:
            return False
        h.update(b"\0file\0" + name + b"\0")
        h.update(hashlib.sha256(_read(path)).digest())
    else:  # a FIFO or device is never read: its kind is what verify sees
        h.update(b"\0other\0" + name)
    return True


def _read(path: Path) -> bytes:
    fd = os.open(path, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_NONBLOCK", 0))
    try:
        chunks = []
        while chunk := os.read(fd, 1 << 20):
            chunks.append(chunk)
        return b"".join(chunks)
    finally:
        os.close(fd)


@functools.cache
def _code() -> str | None:
    """fieldlog's versions and the source of all its modules; None: source not readable."""
    from cryptography import __version__ as crypto_version

    root = Path(__file__).resolve().parents[1]
    h = hashlib.sha256(f"{__version__}|{sys.version}|{crypto_version}".encode())
    try:
        for path in sorted(root.rglob("*.py")):
            h.update(os.fsencode(path.relative_to(root)) + b"\0")
            h.update(path.read_bytes())
    except OSError:
        return None
    return h.hexdigest()


class VerifyCacheWarning(UserWarning):
    """The cache folder cannot be used; verify ran the full way."""


def _warn(message: str) -> None:
    warnings.warn(message, VerifyCacheWarning, stacklevel=3)
