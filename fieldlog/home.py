"""fieldlog's own data folder: device id, signing key, receipts copies and the site cache.

It is never a site folder: site folders travel to the office and onto USB sticks, while what
lives here belongs to this machine and its user. ``$FIELDLOG_HOME`` overrides the platform's
place (tests and a portable install on a stick use it).
"""

from __future__ import annotations

import hashlib
import os
import sys
from pathlib import Path

HOME_ENV = "FIELDLOG_HOME"


def fieldlog_home() -> Path:
    """fieldlog's own data folder (not a site folder); created when first needed."""
    env = os.environ.get(HOME_ENV)
    if env:
        return Path(env)
    if sys.platform == "win32":
        base = Path(os.environ.get("LOCALAPPDATA") or Path.home() / "AppData" / "Local")
    elif sys.platform == "darwin":
        base = Path.home() / "Library" / "Application Support"
    else:
        base = Path(os.environ.get("XDG_DATA_HOME") or Path.home() / ".local" / "share")
    return base / "fieldlog"


LAST_ENTRY_DIR = "last-entry"
"""This device's memory of its last entry in each site's log, one file per site (see
:mod:`fieldlog.journal.own_memory`)."""


def last_entry_part(site: Path) -> str:
    """The memory file of ``site`` relative to fieldlog's data folder (kept here, with no
    import beyond hashlib, so verify's kept-report check can name it cheaply)."""
    key = hashlib.sha256(str(site.resolve()).encode("utf-8")).hexdigest()[:16]
    return f"{LAST_ENTRY_DIR}/{key}.toml"
