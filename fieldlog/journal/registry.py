"""The site's register of device keys: ``devices/<device>.toml``, one small file per device.

A device's file is written once, by fieldlog, the first time that device records on the site;
sync carries it to the office with the log. It says which public key signs the device's
entries, whose name the device records under, the day it was registered, and ``signed_from``:
the first of the device's entry numbers that is signed (entries before it were written by a
fieldlog that did not sign yet, and are accepted as "unsigned" but said to be so)::

    # fieldlog device key: ...
    device = "site-laptop-1"
    public_key = "3d4017c3e8...f12af4660c"      # raw Ed25519 public key, 64 hex digits
    author = "R. Okafor"
    registered = 2026-09-07
    signed_from = 1
    seal = "9a1c...07"                           # the device key's signature of the above

``seal`` is the device's own signature of the five values above (:mod:`fieldlog.journal.key_seal`),
so an edited author, registration day or first signed entry is found by ``verify``.

A key file is never replaced: a second, different key for the same device is refused when
recording, and a conflict when syncing. What a key file cannot prove on its own is that the
office ever saw it: someone who plants a key file *and* entries signed with it is caught only
against the office's receipts (see DEVELOPERS.md, "Signed entries").
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from dataclasses import dataclass, field
from datetime import date, datetime
from pathlib import Path
from types import MappingProxyType

import tomli_w

from fieldlog.durable import make_folder
from fieldlog.errors import JournalError, UnreadableToml
from fieldlog.guarded_read import loads
from fieldlog.journal.filecheck import Finding
from fieldlog.journal.keys import check_author
from fieldlog.journal.names import DEVICE_RE
from fieldlog.journal.store import atomic_write, read_bytes

DEVICES_DIR = "devices"
MAX_KEY_FILE_BYTES = 4096
_HEX32 = re.compile(r"^[0-9a-f]{64}$")
_HEX64 = re.compile(r"^[0-9a-f]{128}$")
_FILE_RE = re.compile(r"^([a-z0-9][a-z0-9-]{4,22}[a-z0-9])\.toml$")
_KEYS = ("device", "public_key", "author", "registered", "signed_from")
_SEALED_KEYS = (*_KEYS, "seal")
HEADER = (
    b"# fieldlog device key: the public half of the key that signs this device's journal\n"
    b"# entries. Written once by fieldlog; never edit or replace it.\n"
)


@dataclass(frozen=True)
class DeviceRecord:
    """One device's registered key, as read from ``devices/<device>.toml``."""

    device: str
    public_key: str
    """Raw Ed25519 public key, 64 lower-case hex digits."""
    author: str
    registered: date
    signed_from: int
    """The device's first signed entry number; lower numbers may be unsigned (older fieldlog)."""
    seal: str = ""
    """The device key's signature of the values above, 128 hex digits (``""``: none)."""


@dataclass(frozen=True)
class Registry:
    """Every readable device key of a site, and what is wrong with the others."""

    devices: Mapping[str, DeviceRecord] = field(default_factory=lambda: MappingProxyType({}))
    findings: tuple[Finding, ...] = ()

    @property
    def in_use(self) -> bool:
        """True once any device of the site has a key file (the site signs its entries)."""
        return bool(self.devices) or bool(self.findings)


def devices_folder(site_folder: Path | str) -> Path:
    """``<site>/devices``."""
    return Path(site_folder) / DEVICES_DIR


def key_file_name(device: str) -> str:
    """``<device>.toml``."""
    return f"{device}.toml"


def key_file_bytes(record: DeviceRecord) -> bytes:
    """The bytes fieldlog writes for ``record``."""
    body = {
        "device": record.device,
        "public_key": record.public_key,
        "author": record.author,
        "registered": record.registered,
        "signed_from": record.signed_from,
    }
    if record.seal:
        body["seal"] = record.seal
    return HEADER + tomli_w.dumps(body).encode("utf-8")


def parse_key_file(name: str, data: bytes) -> DeviceRecord:
    """Read one key file, refusing anything fieldlog would not have written.

    Raises:
        JournalError: bad name, too big, not TOML, a missing or bad value, or a device id
            that is not the file's. The message names the file.
    """
    where = f"{DEVICES_DIR}/{name}"
    m = _FILE_RE.match(name)
    if not m:
        raise JournalError(
            "not a device key file name",
            file=where,
            fix="key files are named <device>.toml and written only by fieldlog",
        )
    if len(data) > MAX_KEY_FILE_BYTES:
        raise JournalError(
            f"is {len(data)} bytes; a key file is a few lines",
            file=where,
            fix="move it out of devices/",
        )
    try:
        doc = loads(data, "settings", where)  # nesting checked: a hostile file
    except UnreadableToml as exc:
        at = f" (line {exc.line})" if exc.line else ""
        raise JournalError(
            f"not TOML: {exc.problem}{at}",
            file=where,
            fix="restore fieldlog's copy (the office has one after a sync)",
        ) from exc
    problem = _problem(doc, m[1])
    if problem:
        raise JournalError(
            problem,
            file=where,
            fix="restore fieldlog's copy (the office has one after a sync); never edit a key file",
        )
    return DeviceRecord(
        doc["device"],
        doc["public_key"],
        check_author(doc["author"]),
        doc["registered"],
        doc["signed_from"],
        doc.get("seal", ""),
    )


def _problem(doc: dict, device: str) -> str | None:
    if set(doc) not in (set(_KEYS), set(_SEALED_KEYS)):
        return f"a key file holds exactly {', '.join(_SEALED_KEYS)}"
    if doc["device"] != device or not DEVICE_RE.match(str(doc["device"])):
        return f"device {doc['device']!r} is not the file's ({device})"
    if not isinstance(doc["public_key"], str) or not _HEX32.match(doc["public_key"]):
        return "public_key is not 64 hex digits"
    author = doc["author"]
    if (
        not isinstance(author, str)
        or not author.strip()
        or len(author.strip()) > 80
        or not author.strip().isprintable()
    ):
        return "author is not a usable name"
    registered = doc["registered"]
    if not isinstance(registered, date) or isinstance(registered, datetime):
        return "registered is not a date"
    seq = doc["signed_from"]
    if not isinstance(seq, int) or isinstance(seq, bool) or not 1 <= seq <= 999_999_999:
        return "signed_from is not an entry number"
    if "seal" in doc and (not isinstance(doc["seal"], str) or not _HEX64.match(doc["seal"])):
        return "seal is not 128 hex digits"
    return None


def read_registry(site_folder: Path | str) -> Registry:
    """Every key file of the site; damaged ones are findings (their devices then have no key).

    Raises:
        JournalError: the devices folder cannot be read at all (permissions).
    """
    folder = devices_folder(site_folder)
    if folder.is_symlink():  # keys from wherever a link points are no keys at all
        return Registry(
            findings=(
                Finding(
                    "",
                    "",
                    "bad key file",
                    "the devices folder is a link; links are never followed",
                    folder=DEVICES_DIR,
                ),
            )
        )
    if not folder.is_dir():
        return Registry()
    records: dict[str, DeviceRecord] = {}
    findings: list[Finding] = []
    try:
        paths = sorted(folder.iterdir(), key=lambda p: p.name)
    except OSError as exc:
        raise JournalError(f"cannot read the devices folder: {exc.strerror}", file=folder) from exc
    for path in paths:
        if path.name.startswith("."):
            continue  # fieldlog's temporary files
        if path.is_symlink() or not path.is_file():
            findings.append(
                Finding(path.name, "", "bad key file", "not a plain file", folder=DEVICES_DIR)
            )
            continue
        try:
            record = parse_key_file(path.name, read_bytes(path))
        except JournalError as exc:
            findings.append(Finding(path.name, "", "bad key file", exc.problem, folder=DEVICES_DIR))
            continue
        records[record.device] = record
    return Registry(MappingProxyType(records), tuple(findings))


def register(site_folder: Path, record: DeviceRecord) -> DeviceRecord:
    """Write ``record``'s key file unless the device has one; returns the record in force.

    Call while holding the device's journal lock.

    Raises:
        JournalError: the site already holds a different key for this device (never
            replaced), its key file is damaged, or the file cannot be written.
    """
    folder = devices_folder(site_folder)
    name = key_file_name(record.device)
    path = folder / name
    old = read_bytes(path) if path.is_file() else b""
    if old:
        found = parse_key_file(name, old)
        if found.public_key != record.public_key:
            raise JournalError(
                f"the site already holds another key for device {record.device}; nothing was "
                "written",
                file=path,
                fix="this device id was copied from another machine: give this machine its "
                "own data folder (FIELDLOG_HOME) so it gets a new id and key",
            )
        return found
    try:
        make_folder(folder)
    except OSError as exc:
        raise JournalError(
            f"cannot create the devices folder: {exc.strerror}", file=folder
        ) from exc
    atomic_write(path, key_file_bytes(record))
    return record
