"""Where receipts files live and how they are read and written, links never followed.

* The office folder keeps ``receipts/<device>.toml``: one chain per device, appended only by
  that device's syncs (so two laptops syncing into one share never write the same file).
* The device keeps byte-for-byte copies of its chain, named ``<device>.<chain>.toml`` (the
  chain is the first 12 hex digits of its first receipt's hash, so copies of two office
  folders never mix): one in the site folder's ``receipts/`` (it travels with the folder) and
  one in fieldlog's own data folder under ``receipts/<site key>/`` (it survives a site folder
  that is wiped or restored from an old backup).
"""

from __future__ import annotations

import hashlib
import os
import re
from dataclasses import dataclass
from pathlib import Path

from fieldlog.errors import OutOfBounds
from fieldlog.guarded_read import read_capped
from fieldlog.journal.names import valid_device
from fieldlog.sync.names import is_ignored
from fieldlog.sync.receipts import RECEIPTS_DIR, ReceiptsFile, parse_receipts
from fieldlog.sync.transfer import LinkedFolder, write_atomic

_NAME = re.compile(
    r"^(?P<device>[a-z0-9][a-z0-9-]{4,22}[a-z0-9])(?:\.(?P<chain>[0-9a-f]{12}))?"
    r"\.toml$"
)


def folder_key(folder: Path) -> str:
    """A short key for a folder on this device (its resolved path, hashed)."""
    return hashlib.sha256(str(folder.resolve()).encode("utf-8")).hexdigest()[:16]


def office_path(office: Path, device: str) -> Path:
    """``<office>/receipts/<device>.toml``: the office's chain for ``device``."""
    return office / RECEIPTS_DIR / f"{device}.toml"


def copy_name(device: str, chain: str) -> str:
    """The device copy's name for a chain."""
    return f"{device}.{chain}.toml"


def home_folder(home: Path, site_folder: Path) -> Path:
    """Where this device keeps its copies for ``site_folder``, in its data folder."""
    return home / RECEIPTS_DIR / folder_key(site_folder)


@dataclass(frozen=True)
class FolderReceipts:
    """The receipts files found in one folder, and what could not be read."""

    files: tuple[tuple[str, ReceiptsFile], ...]
    """(device the file is for, the file), in name order."""
    problems: tuple[str, ...]

    def for_device(self, device: str) -> tuple[ReceiptsFile, ...]:
        """The files of ``device``."""
        return tuple(f for d, f in self.files if d == device)


def read_folder(folder: Path, label: str) -> FolderReceipts:
    """Every receipts file in ``folder`` (missing folder: none). Links are reported, unread.

    Args:
        folder: a ``receipts/`` folder.
        label: how messages name the folder (``receipts`` or a full path).
    """
    if os.path.islink(folder):
        return FolderReceipts((), (f"{label}: the folder is a link; links are never followed",))
    if not folder.is_dir():
        return FolderReceipts((), ())
    files: list[tuple[str, ReceiptsFile]] = []
    problems: list[str] = []
    with os.scandir(folder) as entries:
        for entry in sorted(entries, key=lambda e: e.name):
            if is_ignored(entry.name):
                continue
            where = f"{label}/{entry.name}"
            m = _NAME.match(entry.name)
            if m is None or not valid_device(m["device"]):
                problems.append(
                    f"{where}: not a receipts file name; fieldlog names them "
                    "<device>.toml or <device>.<chain>.toml"
                )
                continue
            parsed = read_file(Path(entry.path), where)
            if isinstance(parsed, str):
                problems.append(parsed)
            else:
                files.append((m["device"], parsed))
    return FolderReceipts(tuple(files), tuple(problems))


def read_file(path: Path, label: str) -> ReceiptsFile | str:
    """One receipts file, or the one-line reason it cannot be read (a link, too big, gone)."""
    try:
        data = read_capped(path, "receipts", follow_links=False)
    except OutOfBounds as exc:
        return f"{label}: {exc.problem}"
    except OSError as exc:
        return f"{label}: cannot be read ({exc.strerror or exc})"
    return parse_receipts(label, data)


def device_copies(site_folder: Path, home: Path, device: str) -> tuple[ReceiptsFile, ...]:
    """This device's copies of its chains for ``site_folder`` (site folder and data folder)."""
    found = [
        *read_folder(site_folder / RECEIPTS_DIR, RECEIPTS_DIR).for_device(device),
        *read_folder(
            home_folder(home, site_folder), str(home_folder(home, site_folder))
        ).for_device(device),
    ]
    return tuple(f for f in found if f.receipts)


def write_receipts(folder: Path, name: str, data: bytes) -> None:
    """Write ``data`` as ``folder/name`` atomically; ``folder`` is made, never a link.

    Raises:
        LinkedFolder: ``folder`` (or the file) is a link, or not a folder (a plain file);
            nothing is written.
        SyncError: the file could not be written.
    """
    if os.path.islink(folder) or os.path.islink(folder / name):
        raise LinkedFolder(f"{folder / name} is or is inside a link (links are never followed)")
    if os.path.lexists(folder) and not folder.is_dir():
        raise LinkedFolder(f"{folder} is a file, not a folder")
    if os.path.lexists(folder / name) and not (folder / name).is_file():
        raise LinkedFolder(f"{folder / name} is not a plain file")
    folder.mkdir(parents=True, exist_ok=True)
    write_atomic(folder / name, data)
