"""What a new entry is checked against: the few facts of the replayed log that the checks read.

:func:`fieldlog.journal.rules.check_entry` needs, of the whole log replayed over every day,
only the entries that set each activity's start, finish, remaining days and percent, the
readiness items (opened, cleared, and which corrected id now stands for which), and nothing
else. :class:`EntryContext` is exactly that, taken from a :class:`~fieldlog.journal.replay.Replay`
so the checks read the same values whether the log was replayed just now or the context was
kept from the last command (:mod:`fieldlog.journal.tail`).

:func:`after_append` carries a context over one entry just appended, for the cases where the
result is provably what a full replay would give; in every other case it returns None and the
next command replays the log again.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING

from fieldlog.journal.entries import Entry

if TYPE_CHECKING:  # replay is not imported when the context was kept (fieldlog record)
    from fieldlog.journal.replay import Replay

PROGRESS_SLOTS = {"started": "start", "finished": "finish", "remaining": "remaining"}
PROGRESS_SLOTS["percent"] = "percent"
"""Entry kind -> the :class:`ActivityEntries` slot it sets."""

INERT = frozenset(
    {
        "weather",
        "crew",
        "lost-time",
        "plant",
        "delivery",
        "inspection",
        "visitor",
        "instruction",
        "incident",
        "safety",
        "note",
    }
)
"""Kinds that no check of a later entry reads: appending one leaves the context as it was."""


@dataclass(frozen=True)
class ActivityEntries:
    """The entries that set an activity's actual start, finish, remaining days and percent.

    Defined here, with the context that keeps them, so that a kept context is read back
    without importing replay (which builds them, and names them too).
    """

    start: Entry | None = None
    finish: Entry | None = None
    remaining: Entry | None = None
    percent: Entry | None = None


@dataclass(frozen=True)
class EntryContext:
    """The replayed log as the entry checks see it (see the module docstring)."""

    evidence: Mapping[str, ActivityEntries] = field(default_factory=dict)
    """Per activity, the entries its progress comes from."""
    needs: Mapping[str, Entry] = field(default_factory=dict)
    """The effective ``need`` entries by id (opened readiness items, cleared or not)."""
    current: Mapping[str, str] = field(default_factory=dict)
    """A corrected entry's id -> the id of the entry that now stands for it."""
    open_items: tuple[str, ...] = ()
    """Ids of the readiness items still open, in replay order (named in a refusal)."""
    cleared: Mapping[str, Entry] = field(default_factory=dict)
    """Readiness item id -> the entry that cleared it."""

    @classmethod
    def of(cls, view: Replay) -> EntryContext:
        """The context of a replay over every day."""
        return cls(
            evidence=dict(view.evidence),
            needs={e.id: e for e in view.effective if e.kind == "need"},
            current=dict(view.current),
            open_items=tuple(i.entry_id for i in view.readiness),
            cleared=dict(view.cleared),
        )


def after_append(ctx: EntryContext, new: Entry) -> EntryContext | None:
    """The context once ``new`` (checked against ``ctx``, just appended) is in the log.

    Only for a plain entry that nothing in the log refers to (the caller checks that no
    correction or clear names its id) and that changes nobody's signing rules. None when a
    full replay could give something else (for instance a finish on a day that already has
    remaining days recorded, which replay may then refuse to apply).
    """
    if new.kind in INERT:
        return ctx
    if new.kind in PROGRESS_SLOTS:
        return _progress(ctx, new)
    if new.kind == "need":
        if any(n.day >= new.day for n in (ctx.needs[i] for i in ctx.open_items)):
            return None  # its place among the open items would need the full order
        return replace(ctx, needs={**ctx.needs, new.id: new}, open_items=(*ctx.open_items, new.id))
    if new.kind == "cleared":
        item = ctx.current.get(new.fields["item"], new.fields["item"])
        need = ctx.needs.get(item)
        if need is None or need.id in ctx.cleared or need.id not in ctx.open_items:
            return None
        return replace(
            ctx,
            cleared={**ctx.cleared, need.id: new},
            open_items=tuple(i for i in ctx.open_items if i != need.id),
        )
    return None


def _progress(ctx: EntryContext, new: Entry) -> EntryContext | None:
    """A start, finish, remaining or percent entry folded in as replay would fold it.

    The checks passed, so a start or finish is the activity's first; remaining days and
    percent apply when no finish exists at all and every earlier one of the same slot is
    from an earlier day (replay takes the last in order). A finish leaves the measures as
    they were only when each was recorded for an earlier day.
    """
    aid = new.fields["activity"]
    ev = ctx.evidence.get(aid, ActivityEntries())
    slot = PROGRESS_SLOTS[new.kind]
    if getattr(ev, slot) is not None:
        if slot in ("start", "finish"):
            return None
        if getattr(ev, slot).day >= new.day:
            return None
    if slot in ("remaining", "percent") and ev.finish is not None:
        return None
    if slot == "finish":
        for measure in (ev.remaining, ev.percent):
            if measure is not None and measure.day >= new.day:
                return None
    return replace(ctx, evidence={**ctx.evidence, aid: replace(ev, **{slot: new})})
