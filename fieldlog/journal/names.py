"""Journal file names: one file per day per device, legal on Windows, FAT and exFAT sticks.

A journal file is called ``YYYY-MM-DD_<device>.toml``: the day its entries describe, an
underscore, the device id (6-24 characters of ``a-z``, ``0-9`` and ``-``, starting and ending
with a letter or digit). Such a name has no character Windows or FAT refuses, no trailing dot
or space, is never a reserved device name (it starts with a digit), is lower case so it cannot
collide with another on a case-insensitive stick, and is at most 40 characters long.

Files in ``log/`` whose names start with ``.`` are fieldlog's working files (``.~*.tmp``
temporary files of a write in progress or interrupted, ``.*.lock`` lock files) and are never
part of the journal.
"""

from __future__ import annotations

import re
from datetime import date

from fieldlog.errors import JournalError

LOG_DIR = "log"
SUFFIX = ".toml"
DEVICE_RE = re.compile(r"^[a-z0-9][a-z0-9-]{4,22}[a-z0-9]$")
_NAME_RE = re.compile(r"^(\d{4}-\d{2}-\d{2})_([a-z0-9][a-z0-9-]{4,22}[a-z0-9])\.toml$")
TEMP_PREFIX = ".~"
TEMP_SUFFIX = ".tmp"


def valid_device(device: str) -> bool:
    """True when ``device`` can be a device id."""
    return bool(DEVICE_RE.match(device))


def file_name(day: date, device: str) -> str:
    """The journal file name for entries of ``day`` written on ``device``."""
    if not valid_device(device):
        raise JournalError(
            f"device id '{device}' is not valid", fix="use 6-24 characters of a-z, 0-9 and '-'"
        )
    return f"{day.isoformat()}_{device}{SUFFIX}"


def parse_file_name(name: str) -> tuple[date, str]:
    """The day and device a journal file name stands for.

    Raises:
        JournalError: the name is not ``YYYY-MM-DD_<device>.toml`` with a real date.
    """
    m = _NAME_RE.match(name)
    if not m:
        raise JournalError(
            f"'{name}' is not a journal file name",
            fix="journal files are named YYYY-MM-DD_<device>.toml and written only by fieldlog",
        )
    try:
        day = date.fromisoformat(m[1])
    except ValueError:
        raise JournalError(
            f"'{name}' names a day that does not exist",
            fix="journal files are written only by fieldlog",
        ) from None
    return day, m[2]


def is_working_file(name: str) -> bool:
    """True for fieldlog's own temporary and lock files (names starting with a dot)."""
    return name.startswith(".")


def temp_prefix(target: str) -> str:
    """Prefix of temporary files written while replacing ``target``."""
    return f"{TEMP_PREFIX}{target}."


def lock_name(device: str) -> str:
    """The lock file that serialises writers of one device in one log folder."""
    return f".{device}.lock"
