"""The journal replayed day by day: what the log says as of the end of every logged day.

``fieldlog schedule --as-of D`` replays every entry up to D from scratch. A history asks that
for hundreds of days, so here the fold is kept between days: the entries of day D are applied
on top of the state as of the day before, and only the small per-day summaries are taken.

The answer for every day must be exactly what :func:`fieldlog.journal.replay` gives for that
day (tests/test_history_differential.py compares them on the sample). Two things make a plain
running fold differ from a replay, and both are handled:

* a correction applies from its own day on, and may move or withdraw an entry of an earlier
  day. So the days are cut into *segments* at every day a correction is dated; within one
  segment the set of corrections in force is the same, the resolved entries are a prefix by
  day, and a running fold is exact. A new segment starts a fresh fold (corrections are rare,
  so this costs little);
* a readiness item is cleared by id, whatever the order, so the open items are worked out
  again from all needs and clears each day (cheap: there are few).

Contradictions (:class:`~fieldlog.journal.Problem`) are not collected here; the caller takes
them from one full replay of the last day, so they are reported exactly as elsewhere.
"""

from __future__ import annotations

from bisect import bisect_right
from collections.abc import Iterator, Mapping, Sequence
from dataclasses import dataclass
from datetime import date

from fieldlog.engine.progress import Progress
from fieldlog.engine.readiness import OpenItem
from fieldlog.journal.corrections import Resolved, resolve_corrections
from fieldlog.journal.entries import Entry
from fieldlog.journal.replay import Fold
from fieldlog.site.model import Site


@dataclass(frozen=True)
class DayState:
    """What the log says as of the end of ``day``, and the entries that describe that day."""

    day: date
    progress: Mapping[str, Progress]
    lost_days: Mapping[str, frozenset[date]]
    """Per calendar name, days lost on site (as in :class:`fieldlog.journal.Replay`)."""
    readiness: tuple[OpenItem, ...]
    entries: tuple[Entry, ...]
    """The entries in force (corrections applied) that describe ``day``, in replay order."""


def logged_days(entries: Sequence[Entry]) -> tuple[date, ...]:
    """Every day some entry describes, in order."""
    return tuple(sorted({e.day for e in entries}))


def replay_days(site: Site, entries: Sequence[Entry], days: Sequence[date]) -> Iterator[DayState]:
    """The state as of the end of each of ``days`` (ascending), one by one."""
    cuts = sorted({e.day for e in entries if e.kind == "correction"})
    segment: int | None = None
    fold: Fold | None = None
    resolved: Resolved | None = None
    at = 0
    for day in days:
        here = bisect_right(cuts, day)
        if here != segment or fold is None or resolved is None:
            segment = here
            end = cuts[here] if here < len(cuts) else None
            status = date.fromordinal(end.toordinal() - 1) if end else date.max
            resolved = resolve_corrections(entries, status)
            fold, at = Fold(site, []), 0
        todays: list[Entry] = []
        ordered = resolved.entries
        while at < len(ordered) and ordered[at].day <= day:
            e = ordered[at]
            fold.apply(e)
            if e.day == day:
                todays.append(e)
            at += 1
        fold.problems.clear()  # reported from the full replay instead (module docstring)
        yield DayState(
            day=day,
            progress=fold.progress(),
            lost_days=fold.lost_days(),
            readiness=_open_items(fold, resolved.alias),
            entries=tuple(todays),
        )


def _open_items(fold: Fold, alias: Mapping[str, Entry | None]) -> tuple[OpenItem, ...]:
    """The readiness items still open, by the rules of the replay's own ``open_items``
    (a clear of an unknown item, or a second clear, changes nothing)."""
    cleared: set[str] = set()
    for c in fold.clears:
        item_id = c.fields["item"]
        need = alias.get(item_id, fold.needs.get(item_id))
        if need is not None and need.id in fold.needs:
            cleared.add(need.id)
    return tuple(
        OpenItem(
            activity=n.fields["activity"],
            what=n.fields["what"],
            kind=n.fields["category"],
            expected=n.fields.get("expected"),
            opened=n.day,
            entry_id=n.id,
        )
        for n in fold.needs.values()
        if n.id not in cleared
    )
