"""Replay: fold the journal into what it says as of the end of a status date.

The rules, in the order they apply:

1. Entries describing a day after the status date are ignored, so any past day can be looked
   at as it stood then.
2. Replay order is the day described, then the device id, then the place in the file. A later
   day wins over an earlier one; within a day the entry written later in the file wins, and
   devices are taken in id order so every machine gets the same answer. Wall-clock times are
   never used: device clocks disagree.
3. A correction takes the place of the entry it supersedes (see
   :mod:`fieldlog.journal.corrections`).
4. Contradictions are never dropped: finish before start, two different actual starts or
   finishes, remaining days or percent on a finished activity, progress on an activity with no
   start, anything naming an activity or calendar the schedule no longer has, a readiness item
   cleared twice or never opened. Each becomes a :class:`Problem` naming the entries involved;
   the later entry is the one applied (rule 2).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from datetime import date

from fieldlog.engine.progress import Progress
from fieldlog.engine.readiness import OpenItem
from fieldlog.journal.context import ActivityEntries
from fieldlog.journal.corrections import correction_base, resolve_corrections
from fieldlog.journal.entries import Entry
from fieldlog.journal.filecheck import Finding
from fieldlog.journal.reader import Journal
from fieldlog.site.model import Site


@dataclass(frozen=True)
class Problem:
    """A contradiction found while replaying (never dropped: both entries are named)."""

    message: str
    entry_ids: tuple[str, ...] = ()
    integrity: bool = False
    """True when it comes from a damaged log file rather than from what the entries say."""


@dataclass(frozen=True)
class Replay:
    """Everything the journal says as of the end of a status date."""

    progress: Mapping[str, Progress] = field(default_factory=dict)
    lost_days: Mapping[str, frozenset[date]] = field(default_factory=dict)
    """Per calendar name, days lost on site (non-working days for that calendar)."""
    readiness: tuple[OpenItem, ...] = ()
    problems: tuple[Problem, ...] = ()
    effective: tuple[Entry, ...] = ()
    """The entries that count, corrections applied, in replay order (a corrected entry
    carries the correction's id and the corrected entry's kind)."""
    superseded: Mapping[str, Entry] = field(default_factory=dict)
    """Entry id -> the correction that replaced or withdrew it."""
    cleared: Mapping[str, Entry] = field(default_factory=dict)
    """Readiness item (the id of its effective ``need`` entry) -> the entry that cleared it."""
    evidence: Mapping[str, ActivityEntries] = field(default_factory=dict)
    """Per activity, the entries its progress comes from."""
    current: Mapping[str, str] = field(default_factory=dict)
    """A corrected entry's id -> the id of the entry that now stands for it."""


@dataclass
class _Activity:
    """Running state of one activity during the fold, with the entries that set it."""

    start: Entry | None = None
    finish: Entry | None = None
    remaining: Entry | None = None
    percent: Entry | None = None


def replay(site: Site, journal: Journal | Sequence[Entry], status_date: date) -> Replay:
    """Fold entries dated on or before ``status_date`` into progress and lost days.

    Give the :class:`~fieldlog.journal.reader.Journal` itself: its findings (a damaged file)
    become problems with ``integrity=True``. A plain sequence of entries (tests, a log with
    one entry left out to check a correction) has no file findings.
    """
    if isinstance(journal, Journal):
        entries: Sequence[Entry] = journal.entries
        findings: Sequence[Finding] = journal.findings
    else:
        entries, findings = journal, ()
    problems = [
        Problem(f"log file damaged: {f}", (f.entry_id,) if f.entry_id else (), True)
        for f in findings
    ]
    resolved = resolve_corrections(entries, status_date)
    problems += [Problem(message, ids) for message, ids in resolved.problems]
    fold = Fold(site, problems)
    for e in resolved.entries:
        fold.apply(e)
    fold.close()
    return Replay(
        progress=fold.progress(),
        lost_days=fold.lost_days(),
        readiness=fold.open_items(resolved.alias),
        problems=tuple(problems),
        effective=tuple(resolved.entries),
        superseded=resolved.superseded,
        cleared=dict(fold.cleared),
        evidence={
            aid: ActivityEntries(a.start, a.finish, a.remaining, a.percent)
            for aid, a in fold.acts.items()
        },
        current={k: v.id for k, v in resolved.alias.items() if v is not None},
    )


class Fold:
    """Applies effective entries one by one, collecting contradictions as it goes.

    Public for :mod:`fieldlog.history.days`, which keeps one fold running from day to day
    instead of replaying every day from scratch: :meth:`apply` each entry in replay order,
    then read :meth:`progress`, :meth:`lost_days`, and :attr:`needs` / :attr:`clears` for
    the readiness items.
    """

    def __init__(self, site: Site, problems: list[Problem]) -> None:
        self.site = site
        self.problems = problems
        self.acts: dict[str, _Activity] = {}
        self.lost: dict[str, set[date]] = {}
        self.needs: dict[str, Entry] = {}
        """Readiness items opened so far, by the id of their ``need`` entry."""
        self.cleared: dict[str, Entry] = {}
        self.clears: list[Entry] = []
        """Every ``cleared`` entry applied so far, in replay order."""

    def apply(self, e: Entry) -> None:
        """Apply one effective entry (corrections already resolved), in replay order."""
        missing = [a for a in e.activities() if not self.site.has_activity(a)]
        for a in missing:
            self.problems.append(
                Problem(
                    f"entry {e.id} ({e.kind}, {e.day}) names activity '{a}', which schedule "
                    f"revision {self.site.revision} no longer has",
                    (e.id,),
                )
            )
        handler = getattr(self, "_" + e.kind.replace("-", "_"), None)
        if handler is None:
            return
        if e.kind in ("started", "finished", "remaining", "percent", "need") and missing:
            return
        handler(e)

    # -- progress -------------------------------------------------------------------------

    def _started(self, e: Entry) -> None:
        a = self.acts.setdefault(e.fields["activity"], _Activity())
        if a.start is not None and a.start.day != e.day:
            self._two(e, a.start, "actual starts")
        if a.finish is not None and a.finish.day < e.day:
            self._order(e, a.finish)
        a.start = e

    def _finished(self, e: Entry) -> None:
        a = self.acts.setdefault(e.fields["activity"], _Activity())
        if a.finish is not None and a.finish.day != e.day:
            self._two(e, a.finish, "actual finishes")
        if a.start is not None and e.day < a.start.day:
            self._order(a.start, e)
        a.finish = e

    def _remaining(self, e: Entry) -> None:
        self._measure(e, "remaining", f"{e.fields['days']} days remaining")

    def _percent(self, e: Entry) -> None:
        self._measure(e, "percent", f"{e.fields['percent']:g}% complete")

    def _measure(self, e: Entry, slot: str, what: str) -> None:
        aid = e.fields["activity"]
        a = self.acts.setdefault(aid, _Activity())
        if a.finish is not None and a.finish.day <= e.day:
            if slot == "percent" and e.fields["percent"] == 100:
                setattr(a, slot, e)
                return
            self.problems.append(
                Problem(
                    f"{aid}: {what} recorded for {e.day} (entry {e.id}), but it finished on "
                    f"{a.finish.day} (entry {a.finish.id}); not applied",
                    (a.finish.id, e.id),
                )
            )
            return
        setattr(a, slot, e)

    def close(self) -> None:
        """Checks that need the whole fold: progress measured before the (final) start."""
        for aid, a in self.acts.items():
            for e, what in ((a.remaining, "remaining days"), (a.percent, "percent complete")):
                if e is not None and (a.start is None or a.start.day > e.day):
                    self.problems.append(
                        Problem(
                            f"{aid}: {what} recorded for {e.day} (entry {e.id}) with no actual "
                            "start on or before that day",
                            (e.id,) + ((a.start.id,) if a.start else ()),
                        )
                    )

    def _two(self, e: Entry, before: Entry, what: str) -> None:
        aid = e.fields["activity"]
        self.problems.append(
            Problem(
                f"{aid}: two different {what}: {before.day} (entry {before.id}, {before.device}) "
                f"and {e.day} (entry {e.id}, {e.device}); {e.day} is used",
                (before.id, e.id),
            )
        )

    def _order(self, start: Entry, finish: Entry) -> None:
        aid = start.fields["activity"]
        self.problems.append(
            Problem(
                f"{aid}: finish {finish.day} (entry {finish.id}) is before start {start.day} "
                f"(entry {start.id})",
                (finish.id, start.id),
            )
        )

    def progress(self) -> dict[str, Progress]:
        """Per activity, the progress the entries applied so far give."""
        out = {}
        for aid, a in self.acts.items():
            out[aid] = Progress(
                actual_start=a.start.day if a.start else None,
                actual_finish=a.finish.day if a.finish else None,
                remaining=a.remaining.fields["days"] if a.remaining else None,
                remaining_as_of=a.remaining.day if a.remaining else None,
                percent=a.percent.fields["percent"] if a.percent else None,
            )
        return out

    # -- calendars ------------------------------------------------------------------------

    def _lost_time(self, e: Entry) -> None:
        if not e.fields.get("whole_day"):
            return
        names = e.fields.get("calendars") or list(self.site.calendars)
        for name in names:
            if name not in self.site.calendars:
                self.problems.append(
                    Problem(
                        f"entry {e.id} ({e.day}) marks calendar '{name}' lost, which the site no "
                        "longer has",
                        (e.id,),
                    )
                )
                continue
            self.lost.setdefault(name, set()).add(e.day)

    def lost_days(self) -> dict[str, frozenset[date]]:
        """Per calendar name, the whole days lost so far."""
        return {name: frozenset(days) for name, days in sorted(self.lost.items())}

    # -- readiness ------------------------------------------------------------------------

    def _need(self, e: Entry) -> None:
        self.needs[e.id] = e

    def _cleared(self, e: Entry) -> None:
        self.clears.append(e)

    def open_items(self, alias: Mapping[str, Entry | None]) -> tuple[OpenItem, ...]:
        """The readiness items still open; a clear of an unknown item or a second clear of
        one is a problem (call once, at the end)."""
        for c in self.clears:
            item_id = c.fields["item"]
            need = alias.get(item_id, self.needs.get(item_id))
            if need is None or need.id not in self.needs:
                self.problems.append(
                    Problem(
                        f"entry {c.id} ({c.day}) clears {item_id}, which is not an open readiness "
                        "item in the log",
                        (c.id,),
                    )
                )
                continue
            if need.id in self.cleared:
                first = self.cleared[need.id]
                self.problems.append(
                    Problem(
                        f"readiness item {need.id} is cleared twice: entries {first.id} and {c.id}",
                        (first.id, c.id),
                    )
                )
                continue
            self.cleared[need.id] = c
        return tuple(
            OpenItem(
                activity=n.fields["activity"],
                what=n.fields["what"],
                kind=n.fields["category"],
                expected=n.fields.get("expected"),
                opened=n.day,
                entry_id=n.id,
            )
            for n in self.needs.values()
            if n.id not in self.cleared
        )


__all__ = ["ActivityEntries", "Fold", "Problem", "Replay", "correction_base", "replay"]
