"""The file handling both caches share (validated sites, checked journal files).

A cache file is written to a temp file in the cache folder and moved into place with
``os.replace``, so a reader sees a whole file or none; no fsync, because a file cut short by
a power cut fails its own digest and is only a miss (a cache need not survive, only never be
wrong). At most a given number of files of one kind are kept, the least recently used (by
modification time, which a reader touches) going first, and temp files a killed process
left behind are removed after an hour.
"""

from __future__ import annotations

import gc
import hashlib
import hmac
import io
import os
import pickle
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

from fieldlog.durable import make_temp

TEMP_SUFFIX = ".tmp"
SECRET_NAME = "journal-cache.secret"
"""The user's random secret that seals the journal's caches (in the cache folder)."""
STALE_TEMP_SECONDS = 3600.0

Warn = Callable[[str], None]

UNREADABLE = (pickle.UnpicklingError, EOFError, AttributeError, ImportError)
"""What makes a cache payload unreadable once its digest matched: a stream pickle refuses,
or a class it names that is no longer there. Anything else is a real error and is raised."""


def pickled(value: object, dispatch: dict[type, Any]) -> bytes:
    """``value`` pickled with the reducers in ``dispatch`` (``copyreg``'s table plus a cache's
    own, for values pickle cannot name, such as ``mappingproxy``)."""
    buf = io.BytesIO()
    pickler = pickle.Pickler(buf, protocol=pickle.HIGHEST_PROTOCOL)
    pickler.dispatch_table = dispatch
    pickler.dump(value)
    return buf.getvalue()


def unpickle(payload: bytes) -> object | None:
    """The value pickled in ``payload``, or None when it does not read back (:data:`UNREADABLE`).

    Unpickling tens of thousands of small immutable values creates no reference cycles, but
    every allocation counts towards the cycle collector, which then runs again and again
    over the growing tree (about 4x the unpickling time itself); it is paused meanwhile.
    """
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        return pickle.loads(payload)
    except UNREADABLE:
        return None
    finally:
        if was_enabled:
            gc.enable()


def sealed(header: bytes, secret: bytes, payload: bytes) -> bytes:
    """A sealed cache file: ``header``, an HMAC-SHA256 of header and payload under
    ``secret``, the payload's sha256, the payload."""
    mac = hmac.new(secret, header + payload, "sha256").digest()
    return b"".join((header, mac, hashlib.sha256(payload).digest(), payload))


def unseal(data: bytes, header: bytes, secret: bytes) -> bytes | None:
    """The payload of a :func:`sealed` file, or None when it is cut short, damaged, has
    another header, or was not sealed with ``secret`` (then it must never be unpickled)."""
    start = len(header) + 64
    if not data.startswith(header) or len(data) < start:
        return None
    mac, digest = data[len(header) : len(header) + 32], data[start - 32 : start]
    payload = data[start:]
    if hashlib.sha256(payload).digest() != digest:
        return None  # truncated or damaged
    if not hmac.compare_digest(mac, hmac.new(secret, header + payload, "sha256").digest()):
        return None  # not written by this user's fieldlog
    return payload


def user_secret(path: Path, warn: Warn) -> bytes | None:
    """The random 32-byte secret at ``path``, made on first use, readable by the user alone;
    None when it was cut short (removed: the next run makes a new one).

    Raises:
        OSError: the folder cannot be made or the secret cannot be written or read.
    """
    path.parent.mkdir(parents=True, exist_ok=True)
    try:
        fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
    except FileExistsError:
        pass
    else:
        with os.fdopen(fd, "wb") as out:
            out.write(os.urandom(32))  # the OS's CSPRNG, as secrets uses
    found = path.read_bytes()
    if len(found) != 32:
        remove(path, warn)  # a crash while it was made
        return None
    return found


def replace_file(path: Path, data: bytes, prefix: str) -> None:
    """Put ``data`` at ``path`` atomically (temp name ``.<prefix>*.tmp`` beside it).

    Raises:
        OSError: the folder cannot be made or written; no temp file is left.
    """
    folder = path.parent
    folder.mkdir(parents=True, exist_ok=True)
    fd, name = make_temp(folder, f".{prefix}", TEMP_SUFFIX)
    temp: Path | None = Path(name)
    try:
        with os.fdopen(fd, "wb") as out:
            out.write(data)
        os.replace(name, path)
        temp = None
    finally:
        if temp is not None:
            temp.unlink(missing_ok=True)


def prune(folder: Path, prefix: str, suffix: str, count: int, keep: Path, warn: Warn) -> None:
    """Delete all but the ``count`` most recently used ``<prefix>*<suffix>`` files in
    ``folder`` (``keep``, just written, always stays) and stale temp files."""
    found: list[tuple[float, Path]] = []
    now = time.time()
    try:
        with os.scandir(folder) as it:
            for item in it:
                if item.name.startswith(prefix) and item.name.endswith(suffix):
                    found.append((item.stat().st_mtime, Path(item.path)))
                elif (
                    item.name.startswith(f".{prefix}")
                    and item.name.endswith(TEMP_SUFFIX)
                    and now - item.stat().st_mtime > STALE_TEMP_SECONDS
                ):
                    remove(Path(item.path), warn)  # left by a process killed mid-write
    except FileNotFoundError:
        return  # a file vanished while listing: another process is pruning
    except OSError as exc:
        warn(f"cannot tidy the cache in {folder}: {exc.strerror}")
        return
    found.sort(key=lambda e: (e[1] != keep, -e[0]))  # the new file stays, then newest
    for _, old in found[count:]:
        remove(old, warn)


def remove(path: Path, warn: Warn) -> None:
    """Delete ``path`` if it is there; a failure is a warning, never an error."""
    try:
        path.unlink(missing_ok=True)
    except OSError as exc:
        warn(f"cannot delete {path}: {exc.strerror}")
