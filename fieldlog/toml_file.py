"""A parsed TOML file that remembers its text, so errors can name the line.

tomllib gives a line only for syntax errors; for everything else (a duplicate id, an unknown
key, a bad date) the line is found in the text, and only when an error is raised, so a valid
10,000-activity file is never searched line by line.
"""

from __future__ import annotations

import re
import tomllib
from collections.abc import Callable
from dataclasses import dataclass
from functools import cached_property
from pathlib import Path
from typing import Any

from fieldlog.errors import SiteError

SITE_FILE = "site.toml"
SCHEDULE_FILE = "schedule.toml"

_ID_LINE = re.compile(r"""^\s*id\s*=\s*["']([^"']*)["']""")

Line = int | Callable[[], int | None] | None
"""A line number, or a callable that finds it: lines are looked up only when an error is
raised, so a valid 10,000-activity file is never searched line by line."""


@dataclass(frozen=True)
class TomlFile:
    """A parsed TOML file with its text kept for finding line numbers."""

    path: Path
    text: str
    data: dict[str, Any]

    def line_of(self, pattern: str, nth: int = 0) -> int | None:
        """Line number (1-based) of the ``nth`` line matching the regex ``pattern``."""
        rx = re.compile(pattern)
        hits = [i for i, line in enumerate(self.text.splitlines(), 1) if rx.search(line)]
        return hits[nth] if nth < len(hits) else None

    def line_of_id(self, activity_id: str, nth: int = 0) -> int | None:
        """Line of the ``nth`` ``id = "<activity_id>"`` in the file."""
        hits = self._id_lines.get(activity_id, ())
        return hits[nth] if nth < len(hits) else None

    def key_line(self, key: str, near: Line) -> int | None:
        """Line of ``key = ...`` in the table that holds line ``near`` (else ``near`` itself).

        Used for errors inside one ``[[activity]]`` or ``[[link]]``: the same key appears in
        many tables, and the one that is wrong is the one near that table's first line.
        """
        start = near() if callable(near) else near
        if start is None:
            return None
        lines = self.text.splitlines()
        rx = re.compile(rf"^\s*{re.escape(key)}\s*=")
        header = min(start, len(lines)) - 1
        while header > 0 and not lines[header].lstrip().startswith("["):
            header -= 1  # back to the table's header
        for k in range(header + 1, len(lines)):
            if lines[k].lstrip().startswith("["):
                break  # the next table
            if rx.match(lines[k]):
                return k + 1
        return start

    @cached_property
    def _id_lines(self) -> dict[str, list[int]]:
        """Every ``id = "..."`` line, by id: one pass over the text, at the first question."""
        out: dict[str, list[int]] = {}
        for number, line in enumerate(self.text.splitlines(), 1):
            m = _ID_LINE.match(line)
            if m:
                out.setdefault(m[1], []).append(number)
        return out

    def error(self, problem: str, *, line: Line = None, activity: str | None = None,
              fix: str | None = None) -> SiteError:
        """A :class:`SiteError` located in this file (``line`` may be a finder, see Line)."""
        if callable(line):
            line = line()
        return SiteError(problem, file=self.path, line=line, activity=activity, fix=fix)


def read_toml(path: Path) -> TomlFile:
    """Parse a TOML file, accepting what Windows Notepad saves (UTF-8 with BOM, CRLF).

    Raises:
        SiteError: the file is missing, not UTF-8, or not valid TOML (with its line).
    """
    return parse_toml(path, read_file_bytes(path))


def read_file_bytes(path: Path) -> bytes:
    """The bytes of a site file; a missing or unreadable file is a :class:`SiteError`."""
    try:
        return path.read_bytes()
    except FileNotFoundError:
        raise SiteError(
            f"{path.name} is missing", file=path,
            fix=f"a site folder needs {SITE_FILE} and {SCHEDULE_FILE}; check the folder name",
        ) from None
    except OSError as exc:
        raise SiteError(f"cannot read {path.name}: {exc.strerror}", file=path) from exc


def parse_toml(path: Path, raw: bytes) -> TomlFile:
    """Parse the bytes ``raw`` read from ``path`` (see :func:`read_toml`)."""
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise SiteError(
            f"not UTF-8 text (byte {exc.start})", file=path, fix="save the file as UTF-8"
        ) from exc
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        line = None
        msg = str(exc)
        m = re.search(r"\(at line (\d+), column (\d+)\)", msg)
        if m:
            line = int(m[1])
            msg = msg[: m.start()].strip()
        raise SiteError(
            f"TOML syntax error: {msg}", file=path, line=line,
            fix="correct the line (quotes, brackets, '=' between key and value)",
        ) from exc
    return TomlFile(path, text, data)


