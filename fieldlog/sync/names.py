"""File-name rules every copy must pass: legal on Windows, FAT/exFAT sticks and SMB shares.

A name the field laptop accepts can still be impossible on the office share or the USB stick in
between, and a name such as ``..\\x.toml`` is harmless on Linux but walks out of the folder on
Windows. So every name is checked here before anything is copied, and names are compared the way
Windows and FAT compare them: without regard to case (``Log.toml`` and ``LOG.TOML`` are one
file there, so two such names are a conflict, never two files).
"""

from __future__ import annotations

import re
import unicodedata
from collections import defaultdict
from collections.abc import Iterable

_RESERVED = {
    "CON",
    "PRN",
    "AUX",
    "NUL",
    "CONIN$",
    "CONOUT$",
    *(f"COM{i}" for i in "123456789¹²³"),
    *(f"LPT{i}" for i in "123456789¹²³"),
}
"""Device names Windows reserves whatever the extension (``con.toml`` is reserved too)."""

_FORBIDDEN = re.compile(r'[<>:"/\\|?*\x00-\x1f]')
"""Characters Windows, FAT and exFAT refuse in a name (``/`` and ``\\`` also leave the folder)."""

MAX_NAME_UNITS = 255
"""Longest name component on Windows/FAT/exFAT, in UTF-16 code units."""

IGNORED_NAMES = frozenset({"desktop.ini", "thumbs.db"})
"""Litter that file managers leave in shared folders; never synced, never reported."""


def portable_name_problem(name: str) -> str | None:
    """Why ``name`` cannot be used on every file system the office and the field use.

    Args:
        name: one file-name component as listed in a folder.

    Returns:
        A short reason in plain words, or None when the name is fine.

    Examples:
        >>> portable_name_problem("2026-03-02_tab-01.toml") is None
        True
        >>> portable_name_problem("..\\\\..\\\\x.toml")
        "has a character Windows or a USB stick refuses ('\\\\')"
    """
    if not name or name in (".", ".."):
        return "is empty or a dot name"
    if name.startswith(".."):
        return "starts with '..' (tries to leave the folder)"
    bad = _FORBIDDEN.search(name)
    if bad:
        return f"has a character Windows or a USB stick refuses ({bad.group()!r})"
    if name[-1] in " .":
        return "ends with a space or a dot (Windows drops it)"
    if name.split(".")[0].rstrip(" ").upper() in _RESERVED:
        return "is a name Windows reserves for a device"
    if len(name.encode("utf-16-le")) // 2 > MAX_NAME_UNITS:
        return f"is longer than {MAX_NAME_UNITS} characters"
    if unicodedata.normalize("NFC", name) != name:
        return "is not in composed Unicode form (NFC); macOS and Windows would disagree on it"
    return None


def is_ignored(name: str) -> bool:
    """True for names sync leaves alone without a word: hidden files and file-manager litter.

    Hidden names (leading dot) cover temporary files of an unfinished write, ours and the
    journal's, and folders such as ``.fieldlog``. A name ending in ``.tmp`` is a write in progress.
    """
    if name.startswith(".."):
        return False  # not hidden: a name that tries to leave the folder is refused, loudly
    return name.startswith(".") or name.lower() in IGNORED_NAMES or name.endswith(".tmp")


def fold(name: str) -> str:
    """The key two names share when Windows or FAT would treat them as the same file."""
    return unicodedata.normalize("NFC", name).casefold()


def case_clashes(names: Iterable[str]) -> dict[str, tuple[str, ...]]:
    """Groups of distinct names that differ only in case (or Unicode form).

    Returns:
        Folded key -> the clashing spellings, sorted; only groups with two or more spellings.
    """
    groups: dict[str, set[str]] = defaultdict(set)
    for name in names:
        groups[fold(name)].add(name)
    return {
        key: tuple(sorted(spellings)) for key, spellings in groups.items() if len(spellings) > 1
    }
