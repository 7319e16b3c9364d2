"""Writing journal files so that a crash, a full disk or a second writer can never damage them.

Every write replaces the whole day file atomically: the new bytes (old bytes + the new entry)
go to a temporary file in the same folder, are flushed and fsynced, and only then renamed over
the old file (``os.replace``), and the folder itself is fsynced. A reader sees either the old
file or the new one, never half of one. Killing the process at any moment leaves at most a
``.~*.tmp`` file behind, which readers ignore and the next write of that device removes.

Writers of one device in one site folder take a lock first (``log/.<device>.lock``; ``flock``
on POSIX, ``msvcrt.locking`` on Windows), so two fieldlog processes on one laptop append one
after the other and both land. Different devices never write the same file, so they need no
lock between them, which matters on network shares and cloud folders where locks do not
travel.

On Windows a virus scanner, indexer or cloud client can hold the target open for a moment;
the rename is retried a few times before giving up (see the library notes on ``os.replace``).
"""

from __future__ import annotations

import contextlib
import errno
import os
import sys
import time
from collections.abc import Iterator
from pathlib import Path

from fieldlog.durable import (
    NOFOLLOW,
    flush_to_disk,
    fsync_folder,
    make_temp,
    refuse_links,
    replace_with_retry,
    share_like_new_file,
    write_all,
)
from fieldlog.errors import JournalError, OutOfBounds
from fieldlog.guarded_read import read_capped
from fieldlog.journal.names import TEMP_SUFFIX, lock_name, temp_prefix

LOCK_TIMEOUT = 15.0
"""Seconds to wait for another fieldlog process writing the same log."""


_REASONS = {
    errno.ENOSPC: "the disk is full",
    errno.EDQUOT: "the disk quota is used up",
    errno.EROFS: "the folder is on a read-only disk",
    errno.EACCES: "no permission to write there",
    errno.EPERM: "no permission to write there",
    errno.EIO: "the disk reported an input/output error",
    errno.ELOOP: "it is a link, and fieldlog never writes through a link",
}


def write_error(path: Path, exc: OSError, what: str = "write") -> JournalError:
    """A :class:`JournalError` saying plainly why ``path`` could not be written."""
    reason = _REASONS.get(exc.errno or 0, exc.strerror or str(exc))
    fix = {
        errno.ENOSPC: "free some space on the disk, then record the entry again",
        errno.EROFS: "check the stick or share is not write-protected, then try again",
        errno.EACCES: "check the folder's permissions, then try again",
        errno.EPERM: "check the folder's permissions, then try again",
        errno.ELOOP: "replace the link with the real folder or file (it may have been planted "
        "to make fieldlog write elsewhere)",
    }.get(exc.errno or 0, "check the disk, then record the entry again")
    return JournalError(f"cannot {what}: {reason}; the log was left as it was", file=path, fix=fix)


@contextlib.contextmanager
def device_lock(log_dir: Path, device: str, timeout: float = LOCK_TIMEOUT) -> Iterator[None]:
    """Hold the lock that serialises writers of ``device`` in ``log_dir``.

    Raises:
        JournalError: the lock file cannot be created, or another writer held it too long.
    """
    path = log_dir / lock_name(device)
    try:
        refuse_links(log_dir)
        fd = os.open(path, os.O_RDWR | os.O_CREAT | NOFOLLOW, 0o666)
    except OSError as exc:
        raise write_error(path, exc, "lock the log for writing") from exc
    try:
        deadline = time.monotonic() + timeout
        while not _try_lock(fd):
            if time.monotonic() > deadline:
                raise JournalError(
                    "another fieldlog is still writing this log",
                    file=path,
                    fix="wait for it to finish, then record the entry again",
                )
            time.sleep(0.005)
        try:
            yield
        finally:
            _unlock(fd)
    finally:
        os.close(fd)


def _try_lock(fd: int) -> bool:
    # ``sys.platform`` rather than ``os.name``: the same test on CPython, and the one mypy
    # understands, so the Windows-only msvcrt calls are not checked on other platforms.
    if sys.platform == "win32":
        import msvcrt

        try:
            msvcrt.locking(fd, msvcrt.LK_NBLCK, 1)
        except OSError:
            return False
        return True
    import fcntl

    try:
        fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except BlockingIOError:
        return False
    return True


def _unlock(fd: int) -> None:
    if sys.platform == "win32":
        import msvcrt

        os.lseek(fd, 0, os.SEEK_SET)
        msvcrt.locking(fd, msvcrt.LK_UNLCK, 1)
    else:
        import fcntl

        fcntl.flock(fd, fcntl.LOCK_UN)


def remove_stale_temps(log_dir: Path, target: str) -> None:
    """Delete temporary files an interrupted write of ``target`` left behind.

    Call only while holding the device lock: then no other write of ``target`` is running.
    """
    prefix = temp_prefix(target)
    with os.scandir(log_dir) as it:  # names only: no Path made for each of a thousand files
        stale = [e.path for e in it if e.name.startswith(prefix) and e.name.endswith(TEMP_SUFFIX)]
    for path in stale:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(path)


def atomic_write(path: Path, data: bytes) -> None:
    """Replace ``path`` by ``data`` so that a reader only ever sees the old or new bytes.

    Raises:
        JournalError: the disk is full or read-only, or the file stayed locked; ``path`` is
            then exactly as it was.
    """
    folder = path.parent
    try:
        refuse_links(folder, path)
        fd, tmp = make_temp(folder, temp_prefix(path.name), TEMP_SUFFIX)
    except OSError as exc:
        raise write_error(path, exc) from exc
    try:
        try:
            share_like_new_file(fd)
            write_all(fd, data)
            flush_to_disk(fd)
        finally:
            os.close(fd)
        replace_with_retry(tmp, path)
    except BaseException as exc:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(tmp)
        if isinstance(exc, OSError):
            raise write_error(path, exc) from exc
        raise
    try:
        fsync_folder(folder)
    except OSError as exc:
        raise write_error(folder, exc, "make the write durable") from exc


def read_bytes(path: Path, kind: str = "journal") -> bytes:
    """The bytes of ``path``, or ``b""`` when it does not exist yet.

    A link is refused, never followed, and the file may be no larger than the cap for
    ``kind`` (see :data:`fieldlog.bounds.FILE_CAPS`).

    Raises:
        JournalError: the file is a link, too large, or cannot be read.
    """
    try:
        return read_capped(path, kind, follow_links=False)
    except FileNotFoundError:
        return b""
    except OutOfBounds as exc:
        raise JournalError(exc.problem, file=path, fix=exc.fix) from None
    except OSError as exc:
        raise JournalError(f"cannot read the log file: {exc.strerror}", file=path) from exc
