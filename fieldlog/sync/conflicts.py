"""Conflict copies: a second version of a journal file, kept aside instead of being dropped.

When two copies of one journal file disagree, the file in ``log/`` stays as it is and the other
version is saved as ``conflicts/<name>.<first 8 hex of its sha256>.toml`` in the site folder
(beside ``log/``, which holds journal files only, so the journal never reads a conflict copy
as an entry). Nothing is merged or thrown away; ``verify`` and the app list these copies
(:func:`list_conflicts`) until a person decides which version is the record and deletes the
other copy.
"""

from __future__ import annotations

import os
import re
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from fieldlog.sync.scan import CONFLICTS_DIR, LOG_DIR, LogFile
from fieldlog.sync.transfer import SourceChanged, copy_verified, sha256_file

_COPY_NAME = re.compile(r"^(?P<stem>.+)\.(?P<hash>[0-9a-f]{8}|[0-9a-f]{64})\.toml$")


@dataclass(frozen=True)
class ConflictCopy:
    """A version of a journal file kept aside because it disagrees with the one in ``log/``."""

    path: Path
    original: str
    """The journal file it is a version of, e.g. ``2026-03-02_tab-01.toml``."""
    short_hash: str

    def describe(self) -> str:
        """One line for ``verify``, ``sites`` and the app."""
        return (
            f"{CONFLICTS_DIR}/{self.path.name}: another version of "
            f"{LOG_DIR}/{self.original}; decide which is the record, then delete the other"
        )


def conflicts_folder(site_folder: Path) -> Path:
    """``<site>/conflicts``."""
    return site_folder / CONFLICTS_DIR


def list_conflicts(site_folder: Path | str) -> tuple[ConflictCopy, ...]:
    """Every open conflict copy in a site folder, in name order (empty when there are none)."""
    folder = conflicts_folder(Path(site_folder))
    if not folder.is_dir() or folder.is_symlink():
        return ()
    out = []
    with os.scandir(folder) as entries:
        for entry in entries:
            m = _COPY_NAME.match(entry.name)
            if m and entry.is_file(follow_symlinks=False):
                out.append(ConflictCopy(Path(entry.path), f"{m['stem']}.toml", m["hash"]))
    return tuple(sorted(out, key=lambda c: c.path.name))


def copy_name(original: str, sha256: str, *, long: bool = False) -> str:
    """Name of the conflict copy of ``original`` whose content hash is ``sha256``."""
    stem = original[:-5] if original.endswith(".toml") else original
    return f"{stem}.{sha256 if long else sha256[:8]}.toml"


def keep_aside(
    version: LogFile,
    dest_site: Path,
    check: Callable[[bytes], None],
    kept_in: str = CONFLICTS_DIR,
) -> tuple[str, bool]:
    """Save ``version`` as a conflict copy in ``dest_site``; returns (relative path, written).

    Args:
        version: the other side's copy of the file.
        dest_site: the site folder that keeps it aside.
        kept_in: the folder of ``dest_site`` it goes to (``conflicts``, or ``quarantine`` for
            a file with forged entries).
        check: called with the bytes before they land (raises to refuse them).

    Raises:
        JournalError: the version is not a valid journal (the caller reports it as refused).
        SourceChanged: the version changed while syncing.
        LinkedFolder: the conflicts folder is a link.
        SyncError: the copy could not be written.
    """
    folder = dest_site / kept_in
    for long in (False, True):
        name = copy_name(version.name, version.sha256, long=long)
        dest = folder / name
        rel = f"{kept_in}/{name}"
        if not os.path.lexists(dest):
            copy_verified(
                version.path,
                dest,
                version.sha256,
                replaces_sha256=None,
                validate=check,
                make_folder=True,
            )
            return rel, True
        if dest.is_file() and not dest.is_symlink() and sha256_file(dest) == version.sha256:
            return rel, False
    raise SourceChanged(f"{folder} holds a different file under the conflict copy's name")
