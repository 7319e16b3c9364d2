"""Corrections: which entries count once every correction is applied.

A correction takes the place of the entry it supersedes. With replacement values it is that
entry with those values changed (and, when it names another day, moved to that day, where it
sits in the order the correction was written); with ``withdraw`` it removes the entry, and
withdrawing a correction brings back what that correction had replaced. A correction of a
correction refines it (its values are laid over the first correction's). When two
corrections supersede one entry, the later one in replay order counts and both are reported.
Corrections dated after the status date are not applied yet.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace
from datetime import date

from fieldlog.journal.entries import CORRECTION_OWN, REPLAY_ORDER, Entry


@dataclass(frozen=True)
class Resolved:
    """Entries after corrections: what counts, in replay order."""

    entries: list[Entry]
    problems: list[tuple[str, tuple[str, ...]]]
    """Contradictions found: (message, entry ids)."""
    superseded: dict[str, Entry]
    alias: dict[str, Entry | None]
    """Every id in a correction chain -> the entry that now stands for it (None: withdrawn)."""


def resolve_corrections(entries: Sequence[Entry], status_date: date) -> Resolved:
    """Apply the corrections dated on or before ``status_date`` (see the module docstring)."""
    problems: list[tuple[str, tuple[str, ...]]] = []
    by_id: dict[str, Entry] = {}
    for e in entries:
        if e.id in by_id:
            problems.append((f"entry id {e.id} is used twice", (e.id,)))
        by_id.setdefault(e.id, e)
    active = [e for e in sorted(entries, key=REPLAY_ORDER) if e.day <= status_date]
    superseded: dict[str, Entry] = {}
    for c in active:
        if c.kind != "correction":
            continue
        target = by_id.get(c.fields["supersedes"])
        if target is None:
            problems.append(
                (
                    f"correction {c.id} supersedes {c.fields['supersedes']}, "
                    "which is not in the log",
                    (c.id,),
                )
            )
            continue
        if _root(target, by_id).kind != c.fields["corrects"]:
            problems.append(
                (
                    f"correction {c.id} says it corrects a "
                    f"{c.fields['corrects']} entry, but {target.id} is not one",
                    (c.id, target.id),
                )
            )
            continue
        earlier = superseded.get(target.id)
        if earlier is not None:
            problems.append(
                (
                    f"entry {target.id} is corrected twice, by {earlier.id} and "
                    f"by {c.id}; the later one counts",
                    (earlier.id, c.id),
                )
            )
        superseded[target.id] = c

    keyed: list[tuple[tuple, Entry]] = []
    alias: dict[str, Entry | None] = {}
    applied = {c.id for c in superseded.values()}
    placed: set[str] = set()
    for e in active:
        if e.id in superseded:
            continue
        if e.kind != "correction":
            eff: Entry | None = e
        elif e.id in applied:
            eff = _content(e, by_id, set())
            for link in _chain(e, by_id):
                alias[link.id] = eff
        else:
            continue  # refused above, and reported there
        if eff is not None and eff.id not in placed:
            placed.add(eff.id)
            # An entry standing for itself keeps its own place (what _place gives it too,
            # without walking a correction chain: most entries of a long log).
            place = REPLAY_ORDER(eff) if by_id.get(eff.id) is eff else _place(eff, by_id)
            keyed.append((place, eff))
    keyed.sort(key=lambda pair: pair[0])
    return Resolved([e for _, e in keyed], problems, superseded, alias)


def _root(e: Entry, by_id: Mapping[str, Entry]) -> Entry:
    """The original (non-correction) entry at the bottom of a correction chain."""
    seen = set()
    while e.kind == "correction" and e.fields["supersedes"] in by_id and e.id not in seen:
        seen.add(e.id)
        e = by_id[e.fields["supersedes"]]
    return e


def _chain(e: Entry, by_id: Mapping[str, Entry]) -> list[Entry]:
    out, seen = [e], {e.id}
    while e.kind == "correction" and e.fields["supersedes"] in by_id:
        e = by_id[e.fields["supersedes"]]
        if e.id in seen:
            break
        out.append(e)
        seen.add(e.id)
    return out


def _content(e: Entry, by_id: Mapping[str, Entry], seen: set[str]) -> Entry | None:
    """What ``e`` stands for: itself, a corrected copy of what it replaces, or None."""
    if e.kind != "correction":
        return e
    if e.id in seen:
        return None  # a loop of corrections: only a hand-edited log can have one
    seen = seen | {e.id}
    target = by_id[e.fields["supersedes"]]
    if e.fields.get("withdraw"):
        if target.kind == "correction":
            return (
                _content(by_id[target.fields["supersedes"]], by_id, seen)
                if target.fields["supersedes"] in by_id
                else None
            )
        return None
    base = _base(target, by_id, seen)
    changes = {k: v for k, v in e.fields.items() if k not in CORRECTION_OWN}
    return replace(e, kind=base.kind, fields={**base.fields, **changes})


def _base(target: Entry, by_id: Mapping[str, Entry], seen: set[str]) -> Entry:
    """The entry a correction of ``target`` changes: what ``target`` stands for, or, when
    ``target`` withdrew something, what it withdrew."""
    base = _content(target, by_id, seen)
    while base is None and target.kind == "correction" and target.fields["supersedes"] in by_id:
        target = by_id[target.fields["supersedes"]]
        base = _content(target, by_id, seen)
    return base if base is not None else target


def correction_base(entries: Sequence[Entry], target: Entry) -> tuple[Entry, tuple[str, ...]]:
    """For a new correction of ``target``: the entry it would change, and the ids of
    ``target``'s correction chain (which the new values replace)."""
    by_id = {e.id: e for e in entries}
    return _base(target, by_id, set()), tuple(e.id for e in _chain(target, by_id))


def _place(eff: Entry, by_id: Mapping[str, Entry]) -> tuple:
    """Replay position of a corrected entry: the corrected entry's own place when the day is
    unchanged, else the correction's place on its day."""
    root = _root(by_id.get(eff.id, eff), by_id)
    if root.day == eff.day:
        return (eff.day, root.device, root.position)
    return eff.sort_key()
