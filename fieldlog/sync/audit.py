"""Check a log against the receipts that vouch for it: ``fieldlog verify`` and sync use this.

Which receipts vouch for which folder:

* a site folder: this device's own copies (in the site folder and in its data folder), and,
  with ``--office``, the office's chain for this device;
* an office folder: every chain in its ``receipts/`` (each device's syncs put entries there).

Besides the log's shortfalls, the receipts themselves are checked: a chain that does not
verify (an edited receipt), and one copy of a chain that holds fewer receipts than another
(receipts removed from its end) are findings too. So is a device key file in ``devices/`` of a
device the office has never heard from itself (no chain of its own there, in no receipt's
``known`` list): a key planted with entries signed by it verifies on its own, only the office
can tell it is foreign.
"""

from __future__ import annotations

import os
import re
from collections.abc import Iterable
from dataclasses import dataclass
from pathlib import Path

from fieldlog.journal.device import DEVICE_FILE, device_id
from fieldlog.journal.registry import DEVICES_DIR
from fieldlog.sync.holdings import Held, Shortfall, shortfalls
from fieldlog.sync.receipt_files import home_folder, office_path, read_file, read_folder
from fieldlog.sync.receipts import RECEIPTS_DIR, ReceiptsFile

_KEY_NAME = re.compile(r"^([a-z0-9][a-z0-9-]{4,22}[a-z0-9])\.toml$")


@dataclass(frozen=True)
class Receipts:
    """The receipts files found for a folder, and what is wrong with them."""

    files: tuple[tuple[str, ReceiptsFile], ...]
    """(device, file)."""
    problems: tuple[str, ...]

    def of(self, device: str | None = None) -> tuple[ReceiptsFile, ...]:
        """Every file, or only those of ``device``."""
        return tuple(f for d, f in self.files if device is None or d == device)


@dataclass(frozen=True)
class Audit:
    """A log checked against receipts."""

    shortfalls: tuple[Shortfall, ...]
    problems: tuple[str, ...]
    unknown: tuple[str, ...] = ()
    """Key files of devices the office does not know."""
    receipts: int = 0
    """How many receipts the log was checked against (0: the site never synced, so nothing
    vouches for entries that could have been removed from the end of a device's log)."""

    def lines(self) -> list[str]:
        """Every finding as one line, receipts problems first."""
        return [*self.problems, *(s.describe() for s in self.shortfalls), *self.unknown]


def own_receipts(folder: Path, home: Path) -> Receipts:
    """The receipts a folder holds itself: its ``receipts/`` and this device's data folder."""
    here = read_folder(folder / RECEIPTS_DIR, RECEIPTS_DIR)
    kept = home_folder(home, folder)
    there = read_folder(kept, str(kept))
    files = (*here.files, *there.files)
    problems = [*here.problems, *there.problems, *_chain_problems(f for _, f in files)]
    problems += _copies_disagree([f for _, f in files])
    return Receipts(files, tuple(problems))


def office_receipts(office: Path, devices: Iterable[str], mine: Receipts) -> Receipts:
    """The office's chains for ``devices``, compared with this device's copies of them."""
    files: list[tuple[str, ReceiptsFile]] = []
    problems: list[str] = []
    for device in sorted(set(devices)):
        path = office_path(office, device)
        label = f"office {RECEIPTS_DIR}/{path.name}"
        copies = mine.of(device)
        if not path.exists() and not path.is_symlink():
            if copies:
                problems.append(
                    f"{label}: missing, yet this device holds "
                    f"{max(len(c.receipts) for c in copies)} receipts of its syncs "
                    "with an office; restore it from the copy in the site folder"
                )
            continue
        found = read_file(path, label)
        if isinstance(found, str):
            problems.append(found)
            continue
        files.append((device, found))
        problems += found.problems
        problems += _copies_disagree([found, *copies], office=found)
    return Receipts(tuple(files), tuple(problems))


def audit(held: Held, receipts: Iterable[Receipts]) -> Audit:
    """Check what a log holds against every receipt in ``receipts``."""
    groups = list(receipts)
    files = [f for g in groups for f in g.of()]
    problems = tuple(p for g in groups for p in g.problems)
    return Audit(shortfalls(held, files), problems, receipts=sum(len(f.receipts) for f in files))


def known_devices(files: Iterable[ReceiptsFile]) -> set[str] | None:
    """Devices the receipts say synced with the office themselves; None when there are no
    receipts at all (a site that never synced: the office has not spoken yet)."""
    chains = [f for f in files if f.receipts]
    if not chains:
        return None
    return {d for f in chains for r in f.receipts for d in (r.synced_by, *r.known)}


def unknown_devices(site: Path, known: set[str] | None, this: str | None) -> list[str]:
    """A line for every key file in ``site/devices/`` of a device the office does not know."""
    folder = site / DEVICES_DIR
    if known is None or os.path.islink(folder) or not folder.is_dir():
        return []
    out = []
    for name in sorted(os.listdir(folder)):
        m = _KEY_NAME.match(name)
        if m and m[1] not in known and m[1] != this:
            out.append(
                f"{DEVICES_DIR}/{name}: device {m[1]} is not known to the office (no "
                "office receipt lists it); its key did not come from the office's own "
                "records: check with the office before trusting its entries"
            )
    return out


def known_device(home: Path) -> str | None:
    """This machine's device id if it has one (verify never makes one)."""
    return device_id(home) if (home / DEVICE_FILE).is_file() else None


def _chain_problems(files: Iterable[ReceiptsFile]) -> list[str]:
    return [p for f in files for p in f.problems]


def _copies_disagree(files: list[ReceiptsFile], office: ReceiptsFile | None = None) -> list[str]:
    """Copies of one chain where one lost receipts at its end, or where they differ.

    With ``office``, only the office's file is compared with each copy (the office being ahead
    of a copy is normal: the copy is refreshed at the next sync).
    """
    out = []
    by_chain: dict[str, list[ReceiptsFile]] = {}
    for f in files:
        if f.receipts:
            by_chain.setdefault(f.chain, []).append(f)
    if office is not None and not office.receipts:
        copies = [f for f in files if f is not office and f.receipts]
        if copies:
            out.append(
                f"{office.label}: holds no receipts, yet this device's copy "
                f"{copies[0].label} holds {len(copies[0].receipts)}"
            )
        return out
    for same in by_chain.values():
        longest = max(same, key=lambda f: len(f.receipts))
        for f in same:
            if f is longest or (office is not None and f is not office):
                continue
            n, m = len(f.receipts), len(longest.receipts)
            if longest.hashes()[:n] != f.hashes():
                out.append(f"{f.label}: differs from {longest.label}; decide which is right")
            elif n < m:
                out.append(
                    f"{f.label}: holds {n} receipts, {longest.label} holds {m}: "
                    f"receipts {n + 1} to {m} were removed from it"
                )
    return out
