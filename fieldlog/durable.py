"""Durable file writes, shared by the journal and sync: the bytes reach the device, the rename
is retried while another program holds the file, and the rename itself is made durable.

These raise plain ``OSError``; the journal and sync turn it into their own error with the
file and the fix, because what to tell the user differs (a log entry vs. a copy to a stick).

Links inside a site folder are never written through: a ``log/`` that is a link to another
folder, or a day file that is a link to some file of the machine, would let one planted link
make fieldlog write anywhere. :func:`refuse_links` and :func:`make_folder` refuse them
(``ELOOP``), and files are opened with ``O_NOFOLLOW`` where the system has it.
"""

from __future__ import annotations

import errno
import os
import sys
import time
from pathlib import Path

RETRY_REPLACE = sys.platform == "win32"
"""Retry a rename refused because another program has the file open (Windows: virus
scanners, search indexers and sync clients do this for a moment)."""
REPLACE_TRIES = 10

NOFOLLOW = getattr(os, "O_NOFOLLOW", 0)
"""Open flag that makes the open fail on a link (0 where the system has no such flag)."""

PERMISSION_UNSUPPORTED = frozenset({errno.EPERM, errno.ENOTSUP, errno.ENOSYS, errno.EINVAL})
"""What a chmod gives on file systems without Unix permissions (FAT through FUSE, some network
shares): the file is written all the same, so these are tolerated."""

FOLDER_FSYNC_REFUSALS = frozenset({errno.EINVAL, errno.ENOTSUP, errno.EBADF})
"""Errors some file systems (certain FUSE and network mounts) give for fsync on a folder; the
file itself is already on disk then, so only these are tolerated."""


def flush_to_disk(fd: int) -> None:
    """Flush ``fd`` to the device; on macOS ``fsync`` stops at the drive cache, F_FULLFSYNC
    does not (it is refused by some file systems, which then get the plain fsync)."""
    if sys.platform == "darwin":
        import fcntl

        try:
            fcntl.fcntl(fd, fcntl.F_FULLFSYNC)
            return
        except OSError:
            pass  # F_FULLFSYNC not supported here: the plain fsync below is what there is
    os.fsync(fd)


def write_all(fd: int, data: bytes) -> None:
    """``os.write`` until every byte is written (a write may be partial)."""
    view = memoryview(data)
    while view:
        n = os.write(fd, view)
        view = view[n:]


def replace_with_retry(tmp: str | Path, dest: Path) -> None:
    """``os.replace(tmp, dest)``, retried with a growing pause when a rename is refused with
    PermissionError on Windows; any other error, or the last refusal, is raised."""
    delay = 0.01
    for attempt in range(REPLACE_TRIES):
        try:
            os.replace(tmp, dest)
            return
        except PermissionError:
            if not RETRY_REPLACE or attempt == REPLACE_TRIES - 1:
                raise
            time.sleep(delay)
            delay = min(delay * 2, 1.0)


def fsync_folder(folder: Path) -> None:
    """Make renames in ``folder`` durable (POSIX; Windows cannot open a folder this way)."""
    if os.name == "nt":
        return
    fd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    try:
        os.fsync(fd)
    except OSError as exc:
        if exc.errno not in FOLDER_FSYNC_REFUSALS:
            raise
    finally:
        os.close(fd)


def refuse_links(*paths: Path) -> None:
    """Raise ``OSError(ELOOP)`` naming the first of ``paths`` that is a symbolic link."""
    for path in paths:
        if path.is_symlink():
            raise OSError(errno.ELOOP, "is a link; fieldlog never writes through a link", str(path))


def make_folder(folder: Path) -> None:
    """Create ``folder`` (one level) unless it exists; a link there is refused, not followed.

    A folder made here is made durable in its parent, so a power cut cannot lose the folder
    of an entry already reported written.
    """
    refuse_links(folder)
    if folder.is_dir():
        return
    folder.mkdir(exist_ok=True)
    fsync_folder(folder.parent)


_TEMP_FLAGS = os.O_RDWR | os.O_CREAT | os.O_EXCL | NOFOLLOW | getattr(os, "O_BINARY", 0)
_TEMP_TRIES = 100


def make_temp(folder: Path, prefix: str, suffix: str) -> tuple[int, str]:
    """A new, empty file in ``folder`` named ``prefix`` + 12 random hex digits + ``suffix``,
    open for writing and readable by the user only; its descriptor and path.

    What ``tempfile.mkstemp`` does (created with ``O_EXCL``, never through a link, another
    name tried when one is taken), without importing ``tempfile``: that module brings
    ``random``, ``shutil``, ``bz2`` and ``lzma`` with it, about 3 ms of every command's start.
    The name comes from the OS's random source, as ``secrets`` uses.

    Raises:
        OSError: the folder cannot be written (or every name tried was taken).
    """
    for _ in range(_TEMP_TRIES):
        path = os.path.join(folder, f"{prefix}{os.urandom(6).hex()}{suffix}")
        try:
            return os.open(path, _TEMP_FLAGS, 0o600), path
        except FileExistsError:
            continue
        except PermissionError:
            # Windows says "access denied" for a name a folder or a file being deleted has
            # (tempfile tries the next name then too); anywhere else it is the real answer.
            if sys.platform == "win32" and os.path.isdir(folder) and os.access(folder, os.W_OK):
                continue
            raise
    raise FileExistsError(errno.EEXIST, "no free temporary file name", str(folder))


def share_like_new_file(fd: int) -> None:
    """Give a temp file the permissions a newly created file gets (mkstemp makes it private),
    so a log on a shared folder stays readable by the office; file systems without Unix
    permissions refuse the chmod, which is tolerated (see PERMISSION_UNSUPPORTED)."""
    if not hasattr(os, "fchmod"):
        return
    mask = os.umask(0o022)
    os.umask(mask)
    try:
        os.fchmod(fd, 0o666 & ~mask)
    except OSError as exc:
        if exc.errno not in PERMISSION_UNSUPPORTED:
            raise
