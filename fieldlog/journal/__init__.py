"""The field journal: the append-only, tamper-evident daily log in a site's ``log/`` folder.

A daily log is a legal record: when a delay is disputed months later, what the foreman wrote
that evening is the evidence. So the journal never loses an entry, is never rewritten, and can
show what was known on any past day.

Storage (:mod:`~fieldlog.journal.names`, :mod:`~fieldlog.journal.store`)
    One TOML file per day per device, ``log/YYYY-MM-DD_<device>.toml``, holding ``[[entry]]``
    tables for the entries describing that day. Written only by fieldlog, only by appending,
    each write atomic (temp file in the same folder, fsync, replace) under a per-device lock.

Entries (:mod:`~fieldlog.journal.entries`, :mod:`~fieldlog.journal.fields`)
    Every entry has ``id`` (``<device>.<seq>``), ``seq`` (the device's running number),
    ``kind``, ``day`` (the day it describes), ``written`` (UTC), ``author``, ``device``, its
    kind's fields, and ``prev``/``hash`` (:mod:`~fieldlog.journal.chain`).

Integrity (:mod:`~fieldlog.journal.filecheck`, :mod:`~fieldlog.journal.verify`)
    :func:`verify` lists every edited, removed, reordered or misfiled entry and every stray
    file; :func:`check_journal_bytes` refuses a single file (for sync, before it lands).

Signatures (:mod:`~fieldlog.journal.keys`, :mod:`~fieldlog.journal.registry`,
:mod:`~fieldlog.journal.signing`)
    Every entry is signed (``sig``) with its device's Ed25519 key; the public keys are
    registered in the site's ``devices/`` folder. A forged entry (no key, wrong key, bad
    signature, changed content, unsigned where the device signs) is a finding and is left out
    of :attr:`Journal.entries`, so nothing downstream ever uses it.

Replay (:mod:`~fieldlog.journal.replay`, :mod:`~fieldlog.journal.corrections`)
    :func:`replay` folds the entries up to a status date into per-activity progress, lost days
    per calendar, open readiness items and problems (contradictions, never dropped; a problem
    with ``integrity=True`` comes from a damaged file). ``Replay.effective`` lists the entries
    that count once corrections are applied, ``Replay.current`` maps a corrected entry's id to
    the entry standing for it now, ``Replay.evidence`` gives the entries behind each
    activity's progress.

Device (:mod:`~fieldlog.journal.device`)
    :func:`device_id` is this machine's id, kept in ``$FIELDLOG_HOME`` or the user data folder,
    with the author's name (:func:`~fieldlog.journal.keys.save_author`, asked once).

Recording (:mod:`~fieldlog.journal.record`): how the app adds an entry
    Call :func:`record_entry`; it is exactly what ``fieldlog record`` does::

        from fieldlog.journal import record_entry, EntryRefused

        try:
            entry = record_entry(folder, site, "remaining", day, {"activity": "FND-020",
                                 "days": 3}, today=today)   # the kept author
        except EntryRefused as exc:      # bad input: show exc.message; nothing was written
            ...
        except JournalError as exc:      # disk full, read-only stick: show exc.message
            ...

    ``kind`` and its fields are listed in :data:`KINDS` (each :class:`FieldSpec` has a name,
    type, whether it is required, choices and a help line, enough to build a form). The day
    defaults to ``today``; pass ``today`` as the real date read once at the top of the app.
    A correction is ``record_entry(folder, site, "correction", None, {"supersedes": ID,
    "reason": "...", "days": 4})`` (replacement values) or ``{"supersedes": ID, "reason":
    "...", "withdraw": True}``; pass a ``day`` to move the corrected entry to another day.
"""

from __future__ import annotations

import sys
from importlib import import_module
from types import ModuleType
from typing import TYPE_CHECKING, Any

from fieldlog.errors import EntryRefused, JournalError

if TYPE_CHECKING:
    from fieldlog.journal.context import ActivityEntries
    from fieldlog.journal.device import device_id
    from fieldlog.journal.entries import (
        INSPECTION_RESULTS,
        INSTRUCTION_FORMS,
        KINDS,
        LOST_TIME_CAUSES,
        Entry,
        FieldSpec,
    )
    from fieldlog.journal.filecheck import Finding, check_journal_bytes
    from fieldlog.journal.reader import Journal, read_journal
    from fieldlog.journal.record import record_entry
    from fieldlog.journal.replay import Problem, Replay, replay
    from fieldlog.journal.verify import verify

_HOMES = {
    "device_id": "device",
    **dict.fromkeys(
        (
            "INSPECTION_RESULTS",
            "INSTRUCTION_FORMS",
            "KINDS",
            "LOST_TIME_CAUSES",
            "Entry",
            "FieldSpec",
        ),
        "entries",
    ),
    "Finding": "filecheck",
    "check_journal_bytes": "filecheck",
    "Journal": "reader",
    "read_journal": "reader",
    "record_entry": "record",
    **dict.fromkeys(("Problem", "Replay", "replay"), "replay"),
    "ActivityEntries": "context",
    "verify": "verify",
}
"""Where each name above lives. They are imported on first use (PEP 562), so that reading a
journal does not load the code that records entries, verifies a log or names this device:
``fieldlog schedule`` starts faster (tests/test_start_up.py)."""


def __getattr__(name: str) -> Any:
    home = _HOMES.get(name)
    if home is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(import_module(f"{__name__}.{home}"), name)
    globals()[name] = value
    return value


_FUNCTIONS = frozenset({"replay", "verify"})
"""Names that are both a function (the package's) and a submodule (where it lives)."""


class _Package(ModuleType):
    """The package, keeping its functions ``replay`` and ``verify`` bound over the submodules.

    Importing a submodule binds its name on the package (``setattr(package, "replay",
    module)``), which would hide the lazily found function of the same name. That one binding
    is not made: ``fieldlog.journal.replay`` stays the function, as when it was imported
    eagerly, and the submodule is still in ``sys.modules`` for ``from fieldlog.journal.replay
    import ...``. Both are imported only when first used, so ``fieldlog record`` never loads
    replay (tests/test_start_up.py).
    """

    def __setattr__(self, name: str, value: Any) -> None:
        if name in _FUNCTIONS and isinstance(value, ModuleType):
            return
        super().__setattr__(name, value)


sys.modules[__name__].__class__ = _Package


__all__ = [
    "INSPECTION_RESULTS",
    "INSTRUCTION_FORMS",
    "KINDS",
    "LOST_TIME_CAUSES",
    "ActivityEntries",
    "Entry",
    "EntryRefused",
    "FieldSpec",
    "Finding",
    "Journal",
    "JournalError",
    "Problem",
    "Replay",
    "check_journal_bytes",
    "device_id",
    "read_journal",
    "record_entry",
    "replay",
    "verify",
]
