"""List one side's journal files: name, size and sha256, or why a file cannot take part.

Listing is where hostile content is caught without opening it: a link (it could point anywhere),
a folder, a name Windows or a USB stick cannot hold, or a file larger than any real day's log.
Such files are reported and left exactly where they are; nothing follows a link.
"""

from __future__ import annotations

import os
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType

from fieldlog.bounds import FILE_CAPS
from fieldlog.sync.names import is_ignored, portable_name_problem
from fieldlog.sync.transfer import sha256_file

LOG_DIR = "log"
CONFLICTS_DIR = "conflicts"
"""Beside ``log/`` (not in it: ``log/`` holds journal files only): copies kept aside when two
versions of a journal file disagree."""

MAX_FILE_BYTES = FILE_CAPS["journal"]
"""No real day's journal from one device comes near 5 MB; a bigger file is refused (the one
cap for journal files, in :mod:`fieldlog.bounds`)."""


@dataclass(frozen=True)
class LogFile:
    """One journal file on one side, identified by content, never by modification time."""

    name: str
    path: Path
    size: int
    sha256: str


@dataclass(frozen=True)
class Refusal:
    """A file that was not copied, with the reason, left where it is."""

    side: str
    """``"site"`` or ``"target"``: where the file is."""
    path: str
    """Path relative to that side's folder, e.g. ``log/2026-03-02_tab-01.toml``."""
    reason: str

    def describe(self) -> str:
        """One line for the summary."""
        return f"{self.side} {self.path}: {self.reason}; left where it is"


@dataclass(frozen=True)
class Listing:
    """The journal files of one side, and what was refused while listing them."""

    side: str
    folder: Path
    files: Mapping[str, LogFile]
    refused: tuple[Refusal, ...]


def scan_log(site_folder: Path, side: str, *, max_bytes: int = MAX_FILE_BYTES) -> Listing:
    """List ``site_folder/log`` without following links or opening anything suspicious.

    Args:
        site_folder: the site (or office) folder.
        side: ``"site"`` or ``"target"``, used in refusal messages.
        max_bytes: larger files are refused unread.

    Returns:
        A :class:`Listing`; a missing ``log/`` folder is an empty listing.
    """
    log = site_folder / LOG_DIR
    files: dict[str, LogFile] = {}
    refused: list[Refusal] = []
    if os.path.islink(log):
        refused.append(Refusal(side, LOG_DIR, "the folder is a link; links are not followed"))
        return Listing(side, log, MappingProxyType(files), tuple(refused))
    if not log.exists():
        return Listing(side, log, MappingProxyType(files), ())
    if not log.is_dir():
        refused.append(Refusal(side, LOG_DIR, "is a file, not the log folder"))
        return Listing(side, log, MappingProxyType(files), tuple(refused))
    with os.scandir(log) as entries:
        for entry in sorted(entries, key=lambda e: e.name):
            rel = f"{LOG_DIR}/{entry.name}"
            if is_ignored(entry.name):
                continue
            reason = _entry_problem(entry, max_bytes)
            if reason is None:
                try:
                    size = entry.stat(follow_symlinks=False).st_size
                    digest = sha256_file(Path(entry.path))
                except OSError as exc:
                    reason = f"cannot be read ({exc.strerror or exc})"
                else:
                    files[entry.name] = LogFile(entry.name, Path(entry.path), size, digest)
                    continue
            refused.append(Refusal(side, rel, reason))
    return Listing(side, log, MappingProxyType(files), tuple(refused))


def _entry_problem(entry: os.DirEntry, max_bytes: int) -> str | None:
    """Why this folder entry cannot be synced, judged from its name and metadata only."""
    if entry.is_symlink():
        return "is a link; links are never followed or copied"
    problem = portable_name_problem(entry.name)
    if problem:
        return f"the name {problem}"
    if entry.is_dir(follow_symlinks=False):
        return "is a folder, not a journal file"
    if not entry.is_file(follow_symlinks=False):
        return "is not a plain file"
    size = entry.stat(follow_symlinks=False).st_size
    if size > max_bytes:
        return (
            f"is {size / 1048576:.1f} MB, over the {max_bytes / 1048576:.0f} MB limit "
            "for a journal file"
        )
    return None
