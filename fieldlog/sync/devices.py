"""Carry the site's device key files (``devices/``) both ways, never replacing one.

A device's key file is what lets the office check that device's signatures, so it must travel
with the log. The rules are stricter than for journal files, because a key file never grows:

* a key file only one side has is copied to the other (after checking it is a key file
  fieldlog would write, sealed by its own key: an edited author, registration day or first
  signed entry does not travel);
* the same file on both sides is fine;
* two different files for one device are a **conflict**: reported, both left exactly as they
  are. One of them is not that device's real key, and only a person can say which (the
  office's receipts tell; see DEVELOPERS.md, "Signed entries").
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from functools import partial
from pathlib import Path

from fieldlog.errors import JournalError
from fieldlog.journal.key_seal import seal_problem
from fieldlog.journal.registry import DEVICES_DIR, MAX_KEY_FILE_BYTES, parse_key_file
from fieldlog.sync.names import is_ignored, portable_name_problem
from fieldlog.sync.scan import Refusal
from fieldlog.sync.transfer import LinkedFolder, SourceChanged, copy_verified, sha256_file


@dataclass(frozen=True)
class DeviceSync:
    """What happened to the key files in one sync."""

    sent: tuple[str, ...] = ()
    received: tuple[str, ...] = ()
    conflicts: tuple[str, ...] = ()
    """Lines naming each key file that differs between the sides (nothing was changed)."""
    refused: tuple[Refusal, ...] = ()
    skipped: tuple[str, ...] = ()

    @property
    def has_problems(self) -> bool:
        """True when a person should look."""
        return bool(self.conflicts or self.refused or self.skipped)


def _listing(side_folder: Path, side: str) -> tuple[dict[str, tuple[Path, str]], list[Refusal]]:
    """``name -> (path, sha256)`` of one side's key files, and what cannot take part."""
    folder = side_folder / DEVICES_DIR
    files: dict[str, tuple[Path, str]] = {}
    refused: list[Refusal] = []
    if os.path.islink(folder):
        return files, [Refusal(side, DEVICES_DIR, "the folder is a link; links are not followed")]
    if not folder.is_dir():
        return files, refused
    with os.scandir(folder) as entries:
        for entry in sorted(entries, key=lambda e: e.name):
            if is_ignored(entry.name):
                continue
            rel = f"{DEVICES_DIR}/{entry.name}"
            problem = portable_name_problem(entry.name)
            if problem:
                refused.append(Refusal(side, rel, f"the name {problem}"))
            elif entry.is_symlink() or not entry.is_file(follow_symlinks=False):
                refused.append(Refusal(side, rel, "is not a plain file"))
            elif entry.stat(follow_symlinks=False).st_size > MAX_KEY_FILE_BYTES:
                refused.append(Refusal(side, rel, "is too big for a device key file"))
            else:
                files[entry.name] = (Path(entry.path), sha256_file(Path(entry.path)))
    return files, refused


def sync_devices(site_folder: Path, target: Path) -> DeviceSync:
    """Copy each key file the other side lacks; report differing ones, replace none.

    Raises:
        SyncError: a copy could not be written (run sync again; nothing is half-written).
    """
    ours, refused = _listing(site_folder, "site")
    theirs, refused_there = _listing(target, "target")
    refused += refused_there
    sent: list[str] = []
    received: list[str] = []
    conflicts: list[str] = []
    skipped: list[str] = []
    for name in sorted({*ours, *theirs}):
        here, there = ours.get(name), theirs.get(name)
        rel = f"{DEVICES_DIR}/{name}"
        if here is not None and there is not None:
            if here[1] != there[1]:
                conflicts.append(
                    f"{rel}: the site's and the target's key files for this "
                    "device differ; both kept as they are (one is not the "
                    "device's real key: check against the office's receipts)"
                )
            continue
        if here is not None:
            (src, digest), dest_side, from_side, done = here, target, "site", sent
        else:
            assert there is not None  # the name came from one of the two listings
            (src, digest), dest_side, from_side, done = there, site_folder, "target", received
        try:
            copy_verified(
                src,
                dest_side / DEVICES_DIR / name,
                digest,
                replaces_sha256=None,
                validate=partial(_check, name),
                make_folder=True,
            )
        except JournalError as exc:
            refused.append(
                Refusal(from_side, rel, f"is not a valid device key file: {exc.problem}")
            )
        except SourceChanged:
            skipped.append(rel)
        except LinkedFolder:
            refused.append(
                Refusal(
                    "target" if done is sent else "site",
                    DEVICES_DIR,
                    "the folder is a link; links are not followed",
                )
            )
        else:
            done.append(name)
    return DeviceSync(
        tuple(sent), tuple(received), tuple(conflicts), tuple(refused), tuple(skipped)
    )


def _check(name: str, data: bytes) -> None:
    problem = seal_problem(parse_key_file(name, data))
    if problem is not None:
        raise JournalError(problem, file=f"{DEVICES_DIR}/{name}")
