"""Reading a file someone else may have made: capped in size, checked for nesting, never hung.

Every TOML file fieldlog reads (site.toml, schedule.toml from the office, journal day files
from another laptop, its own settings) goes through here, because one hostile file must not
stop a site:

* **size first**: the size is taken from the open file (``fstat``) and refused over the cap
  in :data:`fieldlog.bounds.FILE_CAPS` before a byte is read, and at most cap + 1 bytes are
  ever read (a file that grows while read is refused too). A 100 MB file costs nothing.
* **plain files only**: a FIFO or a device under a ``.toml`` name would block ``read`` for
  ever; the file is opened non-blocking and anything but a regular file is refused.
  Callers that must not follow links (inside ``log/``) pass ``follow_links=False``: then a
  link is refused by the operating system itself (``O_NOFOLLOW``) where it has that flag.
* **nesting before parsing**: tomllib parses nested arrays and inline tables recursively, so
  100,000 ``[`` make it recurse until Python gives up. A cheap pre-scan (strings and comments
  blanked by one regex, then the brackets counted by C-level ``accumulate``) refuses anything
  nested deeper than :data:`fieldlog.bounds.MAX_NESTING`, and dotted keys of that many parts.
* **a faster reader for big files**: a large schedule is read by rtoml when it is installed
  (:mod:`fieldlog.fast_toml`); tomllib stays the judge, so a bad file's error is unchanged.
* **one error for any parse failure**: invalid UTF-8, a NUL byte, a syntax error, a number
  too long to convert, a RecursionError: each is one :class:`~fieldlog.errors.UnreadableToml`
  with the line when tomllib gives one.
"""

from __future__ import annotations

import errno
import os
import re
import stat
import tomllib
from itertools import accumulate
from pathlib import Path
from typing import Any

from fieldlog.bounds import (
    FILE_CAPS,
    KEY_COUNTED,
    KEY_SLACK,
    MAX_NESTING,
    MAX_TABLE_KEYS,
    check_size,
)
from fieldlog.errors import OutOfBounds, UnreadableToml
from fieldlog.fast_toml import fast_loads

_STRINGS_AND_COMMENTS = re.compile(
    r'"""[\s\S]*?"""|\'\'\'[\s\S]*?\'\'\'|"(?:[^"\\\n]++|\\.)*+"|\'[^\'\n]*+\'|#[^\n]*+'
)
"""TOML strings (all four kinds) and comments: what may hold brackets that are not nesting."""
_DOTTED_KEY = re.compile(r"\.(?:[ \t]*+[\w-]*+[ \t]*+\.){" + str(MAX_NESTING - 1) + "}")
"""A key of more than MAX_NESTING dotted parts (``a.b.c...``): MAX_NESTING dots with only key
characters between them (a float has one dot; the commas of an array break the run). It
starts with a literal dot, so the regex engine skips ahead to the dots."""
_BRACKETS = b"[]{}"
_NOT_BRACKETS = bytes(b for b in range(256) if b not in _BRACKETS)
_STEP = {ord("["): 1, ord("{"): 1, ord("]"): -1, ord("}"): -1}
_HEADER = re.compile(r"^[ \t]*+\[", re.MULTILINE)
"""A table header's first bracket (``[name]`` or ``[[name]]``), strings and comments blanked."""
_AT_LINE = re.compile(r"\(at line (\d+), column (\d+)\)")


def read_capped(path: Path, kind: str, *, follow_links: bool = True) -> bytes:
    """The bytes of the regular file ``path``, refused when larger than the cap for ``kind``.

    Raises:
        OutOfBounds: not a plain file (a folder, FIFO, device, or a link when
            ``follow_links`` is False), or larger than the cap.
        OSError: the file cannot be opened or read (missing, permissions); callers word it.
    """
    flags = os.O_RDONLY | getattr(os, "O_BINARY", 0) | getattr(os, "O_NONBLOCK", 0)
    if not follow_links:
        flags |= getattr(os, "O_NOFOLLOW", 0)
        if path.is_symlink():  # systems without O_NOFOLLOW (Windows) still refuse it
            raise _link(path)
    try:
        fd = os.open(path, flags)
    except OSError as exc:
        if exc.errno == errno.ELOOP and not follow_links:
            raise _link(path) from None
        raise
    try:
        info = os.fstat(fd)
        if not stat.S_ISREG(info.st_mode):
            raise OutOfBounds(
                f"{path.name} is not a plain file", fix="replace it with the file itself"
            )
        check_size(info.st_size, kind, path.name)
        cap = FILE_CAPS[kind]
        chunks, total = [], 0
        while total <= cap:
            chunk = os.read(fd, min(1 << 20, cap + 1 - total))
            if not chunk:
                break
            chunks.append(chunk)
            total += len(chunk)
        check_size(total, kind, path.name)
        return b"".join(chunks)
    finally:
        os.close(fd)


def _link(path: Path) -> OutOfBounds:
    return OutOfBounds(
        f"{path.name} is a link; fieldlog never follows links here",
        fix="replace the link with the file itself",
    )


def loads(raw: bytes | str, kind: str, what: str, *, bom: bool = False) -> dict[str, Any]:
    """Parse TOML ``raw`` (bytes are decoded as UTF-8; ``bom`` allows a leading BOM).

    Raises:
        OutOfBounds: larger than the cap for ``kind``.
        UnreadableToml: not UTF-8, nested too deep, or not valid TOML (line when known).
    """
    if isinstance(raw, bytes):
        check_size(len(raw), kind, what)
        text = decode(raw, bom=bom)
    else:
        check_size(len(raw), kind, what)
        text = raw
    code = check_nesting(text)
    if kind in KEY_COUNTED:
        check_key_count(code, what)
    fast = fast_loads(text, code)
    if fast is not None:
        return fast
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        msg, line = str(exc), None
        m = _AT_LINE.search(msg)
        if m:
            line = int(m[1])
            msg = msg[: m.start()].strip()
        raise UnreadableToml(msg, line=line) from exc
    except (ValueError, RecursionError) as exc:  # e.g. an integer of 5,000 digits
        raise UnreadableToml(f"a value cannot be read ({_first_words(exc)})") from exc


def decode(raw: bytes, *, bom: bool = False) -> str:
    """``raw`` as UTF-8 text (``bom``: a leading byte-order mark, as Notepad writes, is dropped).

    Raises:
        UnreadableToml: not UTF-8 (the byte offset is named).
    """
    try:
        return raw.decode("utf-8-sig" if bom else "utf-8")
    except UnicodeDecodeError as exc:
        raise UnreadableToml(f"not UTF-8 text (byte {exc.start})") from exc


def check_nesting(text: str) -> str:
    """Refuse TOML nested deeper than MAX_NESTING, without parsing (linear, C-level loops).

    Returns the text with strings and comments blanked, which the fast reader scans too.

    Raises:
        UnreadableToml: too deep; the line of the first dotted key too long is named.
    """
    code = _STRINGS_AND_COMMENTS.sub('""', text)
    deep = _DOTTED_KEY.search(code)
    if deep:
        at = text.find(deep[0][:40])
        raise UnreadableToml(
            f"a key has more than {MAX_NESTING} dotted parts",
            line=text.count("\n", 0, at) + 1 if at >= 0 else None,
            fix="this is not a file fieldlog wrote or expects",
        )
    brackets = code.encode("utf-8").translate(None, _NOT_BRACKETS)
    if (
        len(brackets) > MAX_NESTING
        and max(accumulate(map(_STEP.__getitem__, brackets))) > MAX_NESTING
    ):
        raise UnreadableToml(
            f"arrays or tables are nested more than {MAX_NESTING} deep",
            fix="this is not a file fieldlog wrote or expects",
        )
    return code


def check_key_count(code: str, what: str) -> None:
    """Refuse a site file with far more keys than its tables can hold, before parsing.

    Found by attack: a schedule.toml of a million top-level keys took 6 s and over 500 MB to
    be refused as "unknown key" after the full parse. Every ``=`` of ``code`` (strings and
    comments blanked) is a key; more than :data:`~fieldlog.bounds.MAX_TABLE_KEYS` a table
    on average, past :data:`~fieldlog.bounds.KEY_SLACK`, is no file fieldlog reads. Two
    C-level counts on the usual layout (headers at the start of a line); indented headers
    are counted by a regex only before a file is refused.

    Raises:
        OutOfBounds: too many keys for the number of tables.
    """
    keys = code.count("=")
    if keys <= KEY_SLACK or keys <= (code.count("\n[") + 2) * MAX_TABLE_KEYS + KEY_SLACK:
        return  # a header at the start of a line: the usual layout, counted in C
    tables = len(_HEADER.findall(code)) + 1  # indented headers too, before refusing
    if keys > tables * MAX_TABLE_KEYS + KEY_SLACK:
        raise OutOfBounds(
            f"{what} has {keys:,} keys in {tables:,} table(s), more than "
            f"{MAX_TABLE_KEYS} a table on average",
            fix="this is not a file fieldlog wrote or expects; check where it came from",
        )


def _first_words(exc: BaseException) -> str:
    text = str(exc) or type(exc).__name__
    return text if len(text) <= 80 else text[:77] + "..."
