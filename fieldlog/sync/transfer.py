"""Copy one file so that the destination is either the old file or the whole new one, never half.

Every copy goes to a temporary name in the destination folder (same folder, so the rename never
crosses file systems), is flushed to the device, read back and checked against the sha256 the
plan expects, and only then renamed over the real name. A stick pulled out mid-copy leaves at
worst a hidden ``.fieldlog-sync-<host>-<pid>-<tag>.tmp`` file, which every reader ignores and
a later sync on the same machine removes once it is clearly stale (see
:func:`clean_stale_temps`).

Read-back caveat: the read-back goes through the operating system's cache, so it proves the
bytes were handed to the device intact, not that the device stored them; the next sync compares
hashes again and repairs a file that went missing.
"""

from __future__ import annotations

import contextlib
import errno
import hashlib
import os
import re
import socket
import sys
from collections.abc import Callable
from pathlib import Path
from typing import BinaryIO

from fieldlog import durable
from fieldlog.durable import flush_to_disk, replace_with_retry
from fieldlog.errors import SyncError

TEMP_PREFIX = ".fieldlog-sync-"
TEMP_SUFFIX = ".tmp"
STALE_AFTER_S = 86400.0
"""A temporary file is removed only when older than a day by its time stamp, and only when
its name says this machine wrote it from a process that is no longer running.

Clocks on a shared office folder disagree (a laptop set to the wrong day, a file server in
another time zone), so age alone never decides: another device may be copying now.
"""
THIS_HOST = re.sub(r"[^a-z0-9]+", "-", socket.gethostname().lower()).strip("-")[:24] or "host"
"""This machine's name as it appears in temporary file names."""
_TEMP_NAME = re.compile(
    r"^\.fieldlog-sync-(?P<host>[a-z0-9-]+)-(?P<pid>\d{1,10})-[0-9a-f]{8}"
    r"\.tmp$"
)

_CHUNK = 1 << 20


class LinkedFolder(Exception):
    """The destination folder is a link: nothing is ever written through one.

    Not an error for the user to fix in the middle of a sync: the copy is refused and reported.
    """


class SourceChanged(Exception):
    """The source or destination changed between planning and copying (someone is writing).

    Not an error for the user: the file is skipped and the next sync picks it up.
    """


def sha256_bytes(data: bytes) -> str:
    """Hex sha256 of ``data``."""
    return hashlib.sha256(data).hexdigest()


def sha256_file(path: Path, limit: int | None = None) -> str:
    """Hex sha256 of the file at ``path``, or of its first ``limit`` bytes."""
    digest = hashlib.sha256()
    remaining = limit
    with path.open("rb") as f:
        while remaining is None or remaining > 0:
            chunk = f.read(_CHUNK if remaining is None else min(_CHUNK, remaining))
            if not chunk:
                break
            digest.update(chunk)
            if remaining is not None:
                remaining -= len(chunk)
    return digest.hexdigest()


def copy_verified(
    src: Path,
    dest: Path,
    expected_sha256: str,
    *,
    replaces_sha256: str | None,
    validate: Callable[[bytes], None] | None = None,
    make_folder: bool = False,
) -> int:
    """Copy ``src`` to ``dest`` through a checked temporary file; returns the bytes copied.

    Args:
        src: the file to copy.
        dest: where it lands (its folder must exist).
        expected_sha256: the hash the plan saw; a source that no longer matches is skipped.
        replaces_sha256: the hash ``dest`` must still have (a grown file replaces its exact
            prefix), or None when ``dest`` must not exist yet.
        validate: called with the bytes before anything is written; raises to refuse them.
        make_folder: create ``dest``'s folder (after validation, so a refusal writes nothing).

    Raises:
        SourceChanged: ``src`` or ``dest`` changed since the plan was made.
        LinkedFolder: ``dest``'s folder is a link (it could point anywhere).
        SyncError: the destination could not be written or did not read back identically.
    """
    data = read_plain_file(src)
    if sha256_bytes(data) != expected_sha256:
        raise SourceChanged(f"{src} changed while syncing")
    if validate is not None:
        validate(data)
    if dest.parent.is_symlink():
        raise LinkedFolder(f"{dest.parent} is a link")
    if make_folder:
        _make_folder(dest.parent)
    tmp = write_temp(dest.parent, data, expected_sha256)
    try:
        _check_destination(dest, replaces_sha256)
        replace(tmp, dest)
    except BaseException:
        remove_quietly(tmp)
        raise
    return len(data)


def read_plain_file(path: Path) -> bytes:
    """The bytes of ``path``, refusing to follow a link put there after it was listed.

    Raises:
        SourceChanged: the file is gone or has become a link since the plan was made.
        SyncError: it cannot be read (permissions, a failing device).
    """
    flags = os.O_RDONLY | getattr(os, "O_BINARY", 0) | getattr(os, "O_NOFOLLOW", 0)
    try:
        fd = os.open(path, flags)
    except FileNotFoundError:
        raise SourceChanged(f"{path} was removed while syncing") from None
    except OSError as exc:
        if exc.errno == errno.ELOOP:
            raise SourceChanged(f"{path} became a link while syncing") from None
        raise SyncError(
            f"cannot read: {exc.strerror or exc}",
            file=path,
            fix="check the file's permissions and the device, then run sync again",
        ) from exc
    with os.fdopen(fd, "rb") as f:
        return f.read()


def write_atomic(dest: Path, data: bytes) -> None:
    """Write ``data`` as ``dest`` (replacing it) via a checked temporary file in its folder.

    Raises:
        SyncError: the folder could not be written or the bytes did not read back identically.
    """
    if dest.is_symlink() or dest.parent.is_symlink():
        raise SyncError(
            "this or its folder is a link; fieldlog never writes through one",
            file=dest,
            fix="replace the link with the real file or folder",
        )
    tmp = write_temp(dest.parent, data, sha256_bytes(data))
    try:
        replace(tmp, dest)
    except BaseException:
        remove_quietly(tmp)
        raise


def write_temp(folder: Path, data: bytes, expected_sha256: str) -> Path:
    """Write ``data`` to a new hidden temporary file in ``folder``, fsync it, verify it.

    Returns:
        The temporary file's path; the caller renames it into place.

    Raises:
        SyncError: writing failed (full, read-only, removed device) or the read-back differs.
    """
    tmp = folder / f"{TEMP_PREFIX}{THIS_HOST}-{os.getpid()}-{os.urandom(4).hex()}{TEMP_SUFFIX}"
    try:
        with tmp.open("xb") as f:
            _write_all(f, data)
            f.flush()
            flush_to_disk(f.fileno())
        if sha256_file(tmp) != expected_sha256:
            raise SyncError(
                "the copy did not read back identically",
                file=tmp,
                fix="the stick or share may be failing; try another, then run sync again",
            )
    except OSError as exc:
        remove_quietly(tmp)
        raise SyncError(
            f"cannot write into this folder: {exc.strerror or exc}",
            file=folder,
            fix="check the folder is writable, has free space and the stick is still in; "
            "then run sync again (what was already copied is complete)",
        ) from exc
    except BaseException:
        remove_quietly(tmp)
        raise
    return tmp


def _write_all(f: BinaryIO, data: bytes) -> None:
    """Write ``data`` in chunks (one place for tests to simulate a failure mid-file)."""
    view = memoryview(data)
    for start in range(0, len(view), _CHUNK):
        f.write(view[start : start + _CHUNK])


def replace(tmp: Path, dest: Path) -> None:
    """Rename ``tmp`` over ``dest``, retrying briefly on Windows when a scanner holds the file.

    Raises:
        SyncError: the rename failed for good.
    """
    try:
        replace_with_retry(tmp, dest)
    except PermissionError as exc:
        raise SyncError(
            f"cannot rename into place: {exc.strerror}",
            file=dest,
            fix="close programs that have the file open, then run sync again",
        ) from exc
    except OSError as exc:
        raise SyncError(
            f"cannot rename into place: {exc.strerror or exc}",
            file=dest,
            fix="check the folder, then run sync again",
        ) from exc


def fsync_folder(folder: Path) -> None:
    """Make renames in ``folder`` durable where the platform allows it (not on Windows).

    File systems that refuse fsync on a folder leave the renames as durable as they make them;
    the next sync's hash comparison repairs a lost one.

    Raises:
        SyncError: the folder could not be flushed for another reason (a removed stick).
    """
    try:
        durable.fsync_folder(folder)
    except OSError as exc:
        raise SyncError(
            f"cannot flush the folder: {exc.strerror or exc}",
            file=folder,
            fix="check the stick or share is still there, then run sync again",
        ) from exc


def clean_stale_temps(folder: Path, now: float, older_than_s: float = STALE_AFTER_S) -> int:
    """Remove temporary files an interrupted sync on this machine left in ``folder``.

    Only names of the form ``.fieldlog-sync-<host>-<pid>-<tag>.tmp`` are touched, and only when
    ``host`` is this machine, process ``pid`` is not running here, and the file is older than
    ``older_than_s``. Another machine's temp file is never removed (its writer may be alive
    and our clock may be wrong); it is hidden and every reader ignores it.

    Returns:
        How many files were removed.
    """
    removed = 0
    if not folder.is_dir():
        return 0
    with os.scandir(folder) as entries:
        for entry in entries:
            m = _TEMP_NAME.match(entry.name)
            if m is None or m["host"] != THIS_HOST or not entry.is_file(follow_symlinks=False):
                continue
            if process_alive(int(m["pid"])):
                continue
            if now - entry.stat(follow_symlinks=False).st_mtime >= older_than_s:
                with contextlib.suppress(FileNotFoundError):  # another sync removed it first
                    os.unlink(entry.path)
                    removed += 1
    return removed


def process_alive(pid: int) -> bool:
    """True when process ``pid`` runs on this machine, or when that cannot be told.

    POSIX asks the kernel with signal 0 (nothing is sent). Windows has no such harmless probe
    in the standard library (``os.kill`` there ends the process), so a pid is taken as alive
    and its temporary file stays: hidden, ignored, harmless.
    """
    if sys.platform == "win32" or pid <= 0:
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:  # it exists, owned by someone else
        return True
    except OverflowError:  # a pid no system hands out
        return False
    return True


def _make_folder(folder: Path) -> None:
    """Create ``folder`` (and its parents) when missing.

    Raises:
        SyncError: it cannot be created.
    """
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise SyncError(
            f"cannot create the folder: {exc.strerror or exc}",
            file=folder,
            fix="check the folder is writable, then run sync again",
        ) from exc


def _check_destination(dest: Path, replaces_sha256: str | None) -> None:
    """Refuse to replace a destination that changed since the plan (it may hold new entries)."""
    if replaces_sha256 is None:
        if os.path.lexists(dest):
            raise SourceChanged(f"{dest} appeared while syncing")
    elif not dest.is_file() or sha256_file(dest) != replaces_sha256:
        raise SourceChanged(f"{dest} changed while syncing")


def remove_quietly(tmp: Path) -> None:
    """Remove a temporary file while another error is on its way up.

    A failure here (the stick is gone) must not hide that first error; the leftover is hidden
    and is removed by a later sync.
    """
    with contextlib.suppress(OSError):
        tmp.unlink()
