"""A parsed TOML file that remembers its text, so errors can name the line.

tomllib gives a line only for syntax errors; for everything else (a duplicate id, an unknown
key, a bad date) the line is found in the text, and only when an error is raised, so a valid
10,000-activity file is never searched line by line.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass
from functools import cached_property
from pathlib import Path
from typing import Any

from fieldlog.bounds import check_size
from fieldlog.errors import OutOfBounds, SiteError, UnreadableToml
from fieldlog.guarded_read import decode, loads, read_capped

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

    def error(
        self,
        problem: str,
        *,
        line: Line = None,
        activity: str | None = None,
        fix: str | None = None,
    ) -> SiteError:
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
    """The bytes of a site file; missing, unreadable or oversized is a :class:`SiteError`.

    The size cap (site.toml 1 MB, schedule.toml 64 MB, see :mod:`fieldlog.bounds`) is
    checked before anything is read.
    """
    try:
        return read_capped(path, _kind(path))
    except FileNotFoundError:
        raise SiteError(
            f"{path.name} is missing",
            file=path,
            fix=f"a site folder needs {SITE_FILE} and {SCHEDULE_FILE}; check the folder name",
        ) from None
    except OutOfBounds as exc:
        raise SiteError(exc.problem, file=path, fix=exc.fix) from None
    except OSError as exc:
        raise SiteError(f"cannot read {path.name}: {exc.strerror}", file=path) from exc


def _kind(path: Path) -> str:
    """Which size cap applies: site.toml's, or schedule.toml's (also for office copies)."""
    return SITE_FILE if path.name == SITE_FILE else SCHEDULE_FILE


def parse_toml(path: Path, raw: bytes) -> TomlFile:
    """Parse the bytes ``raw`` read from ``path`` (see :func:`read_toml`).

    Raises:
        SiteError: too large, not UTF-8, nested too deep or not valid TOML (with its line).
    """
    try:
        text_and_data = _parse(path, raw)
    except OutOfBounds as exc:
        raise SiteError(exc.problem, file=path, fix=exc.fix) from None
    except UnreadableToml as exc:
        if exc.problem.startswith("not UTF-8"):
            raise SiteError(exc.problem, file=path, fix="save the file as UTF-8") from None
        raise SiteError(
            f"TOML syntax error: {exc.problem}",
            file=path,
            line=exc.line,
            fix=exc.fix or "correct the line (quotes, brackets, '=' between key and value)",
        ) from None
    return TomlFile(path, *text_and_data)


def _parse(path: Path, raw: bytes) -> tuple[str, dict[str, Any]]:
    check_size(len(raw), _kind(path), path.name)
    text = decode(raw, bom=True)
    return text, loads(text, _kind(path), path.name)
