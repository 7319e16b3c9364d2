"""This device's own memory of the last entry it wrote to each site's log.

A hash chain cannot show entries removed from its *end*: delete the newest day file and the
rest of the log still reads "intact". Office receipts catch that after a sync; before the
first sync nothing could. So whenever this device appends an entry it also keeps, in its own
data folder (``$FIELDLOG_HOME/last-entry/<site key>.toml``, never in the site folder, which
travels and can be restored from a backup), the entry's id, number, hash, day file and
``written`` stamp. ``fieldlog verify`` on this device then names the entry when the log no
longer holds it, or holds another entry under its id.

The memory is an aid, never the record: a memory file that is missing says nothing (as on any
other machine); one that is damaged, or of another site, is named in one line and set aside.
It is written after the entry is safely in the log, under the device lock, so it can only lag
behind the log (a crash in between leaves the memory of the entry before), never run ahead.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime
from pathlib import Path
from typing import TYPE_CHECKING, Any

import tomli_w

from fieldlog.durable import make_folder
from fieldlog.errors import JournalError, OutOfBounds, UnreadableToml
from fieldlog.guarded_read import loads, read_capped
from fieldlog.home import LAST_ENTRY_DIR, last_entry_part
from fieldlog.journal.store import atomic_write

if TYPE_CHECKING:
    from fieldlog.journal.entries import Entry

_HEADER = (
    "# fieldlog: the last entry this device wrote to one site's log; 'fieldlog verify' on\n"
    "# this device names it if the log no longer holds it. Written only by fieldlog.\n"
)
_KEYS = ("site", "entry", "seq", "hash", "file", "written")


@dataclass(frozen=True)
class Memory:
    """What this device remembers of its last entry in one site's log."""

    site: str
    entry: str
    seq: int
    hash: str
    file: str
    written: datetime


def remember_entry(home: Path, site: Path, entry: Entry) -> None:
    """Keep ``entry`` (just appended to ``site``'s log) as this device's last one there.

    Raises:
        JournalError: the data folder cannot be written (the entry itself is in the log).
    """
    path = home / last_entry_part(site)
    body = {
        "site": str(site.resolve()),
        "entry": entry.id,
        "seq": entry.seq,
        "hash": entry.hash,
        "file": entry.file,
        "written": entry.written,
    }
    try:
        make_folder(path.parent)
    except OSError as exc:
        problem = f"cannot create {LAST_ENTRY_DIR}/: {exc.strerror}"
        raise JournalError(problem, file=path.parent) from exc
    atomic_write(path, (_HEADER + tomli_w.dumps(body)).encode("utf-8"))


def recall(home: Path, site: Path) -> tuple[Memory | None, str | None]:
    """This device's memory for ``site``: (memory, None), (None, why it is set aside), or
    (None, None) when there is none."""
    path = home / last_entry_part(site)
    try:
        raw = read_capped(path, "settings", follow_links=False)
    except FileNotFoundError:
        return None, None
    except (OSError, OutOfBounds) as exc:  # a link, a folder, too big, unreadable
        return None, _aside(path, f"cannot be read ({_why(exc)})")
    try:
        data = loads(raw, "settings", str(path))  # nesting checked: a hostile file
        memory = _memory(data)
    except (UnreadableToml, TypeError, KeyError) as exc:
        return None, _aside(path, f"is damaged ({_why(exc)})")
    if memory.site != str(site.resolve()):
        return None, _aside(path, f"is of another site folder ({memory.site})")
    return memory, None


def missing_or_changed(memory: Memory, entries: dict[str, Entry]) -> str | None:
    """The one-line finding when the log no longer holds the remembered entry as written."""
    found = entries.get(memory.entry)
    when = f"{memory.written:%Y-%m-%d %H:%M} UTC"
    if found is None:
        return (
            f"{memory.file}: entry {memory.entry}, written {when} by this device (its last "
            "entry here), is missing from the log: the log was cut back or its newest day "
            "file removed; restore the file from a backup or the office copy"
        )
    if found.hash != memory.hash:
        return (
            f"{found.file}: entry {memory.entry}, written {when} by this device (its last "
            "entry here), is different in the log from what this device wrote; restore the "
            "file from a backup or the office copy"
        )
    return None


def _memory(data: dict[str, Any]) -> Memory:
    if set(data) != set(_KEYS):
        raise KeyError(f"keys {', '.join(sorted(data))}, not {', '.join(_KEYS)}")
    types = {"site": str, "entry": str, "seq": int, "hash": str, "file": str}
    for key, kind in types.items():
        if type(data[key]) is not kind:
            raise TypeError(f"{key} is not {kind.__name__}")
    if not isinstance(data["written"], datetime) or data["written"].tzinfo is None:
        raise TypeError("written is not a date and time with its zone")
    return Memory(**{k: data[k] for k in _KEYS})


def _aside(path: Path, problem: str) -> str:
    return (
        f"note: this device's memory of its last entry here, {path}, {problem}; set aside "
        "(the log is checked without it; the next entry recorded here writes it anew)"
    )


def _why(exc: BaseException) -> str:
    return str(getattr(exc, "problem", None) or getattr(exc, "strerror", None) or exc)[:120]
