"""This machine's device id: which laptop or tablet wrote an entry.

The id is made once and kept outside every site folder, in fieldlog's own data folder
(``$FIELDLOG_HOME`` when set, otherwise the user data folder of the platform: ``%LOCALAPPDATA%``
on Windows, ``~/Library/Application Support`` on macOS, ``$XDG_DATA_HOME`` or
``~/.local/share`` elsewhere). Keeping it there means copying a site folder to another machine
never makes two machines write under one id, and each device only ever writes files named with
its own id, so devices never contend for a file.

The id is the machine's host name made safe (``a-z``, ``0-9``, ``-``), cut short, plus six
random hex digits so that two laptops both called "site-office" still differ. It is stored in
``device.toml`` next to the ``author`` (see :mod:`fieldlog.journal.keys`).
"""

from __future__ import annotations

import os
import re
from pathlib import Path

import tomli_w

from fieldlog.errors import JournalError, OutOfBounds, UnreadableToml
from fieldlog.guarded_read import loads
from fieldlog.home import HOME_ENV, fieldlog_home
from fieldlog.journal.names import valid_device
from fieldlog.journal.store import atomic_write, device_lock, read_bytes

DEVICE_FILE = "device.toml"


def read_settings(home: Path) -> dict:
    """device.toml as a table (empty when it does not exist yet)."""
    raw = read_bytes(home / DEVICE_FILE, "settings")
    if not raw:
        return {}
    try:
        return loads(raw, "settings", DEVICE_FILE, bom=True)
    except (OutOfBounds, UnreadableToml) as exc:
        raise JournalError(
            f"cannot read the device settings: {exc.problem}",
            file=home / DEVICE_FILE,
            line=exc.line,
            fix="delete the file; a new device id will be made",
        ) from None


def device_id(home: Path | None = None) -> str:
    """This machine's device id, made and saved on first use.

    Raises:
        JournalError: the data folder cannot be written, or holds an invalid id.
    """
    home = home or fieldlog_home()
    found = read_settings(home).get("device")
    if found is not None:
        return _checked(found, home)
    try:
        home.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise JournalError(
            f"cannot create fieldlog's data folder: {exc.strerror}",
            file=home,
            fix=f"set {HOME_ENV} to a folder you can write",
        ) from exc
    try:
        with device_lock(home, "device-settings"):
            settings = read_settings(home)  # another process may have made it meanwhile
            if "device" not in settings:
                import socket  # only to name a new device

                settings["device"] = new_device_id(socket.gethostname())
                atomic_write(home / DEVICE_FILE, tomli_w.dumps(settings).encode("utf-8"))
    except JournalError as exc:
        if not isinstance(exc.__cause__, OSError):
            raise
        reason = exc.__cause__.strerror or str(exc.__cause__)
        raise JournalError(
            f"cannot write fieldlog's data folder ({reason})",
            file=home,
            fix=f"set {HOME_ENV} to a folder you can write",
        ) from exc
    return _checked(settings["device"], home)


def _checked(device: object, home: Path) -> str:
    if not isinstance(device, str) or not valid_device(device):
        raise JournalError(
            f"device id {device!r} is not valid",
            file=home / DEVICE_FILE,
            fix="use 6-24 characters of a-z, 0-9 and '-', or delete the line",
        )
    return device


def new_device_id(hostname: str) -> str:
    """A fresh id from a host name: ``"Site Office #2"`` -> ``"site-office-2-3fa9c1"``."""
    slug = re.sub(r"[^a-z0-9]+", "-", hostname.lower()).strip("-")[:17].strip("-")
    return f"{slug or 'device'}-{os.urandom(3).hex()}"
