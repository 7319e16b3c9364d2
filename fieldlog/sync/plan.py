"""Decide, from two listings, what each side lacks: the whole sync policy in one pure function.

Journal files only ever grow by appending, so two copies of one file are either identical, one
is an exact byte prefix of the other (the longer one has later entries: it replaces the shorter),
or they disagree. Disagreement is never resolved here: both versions are kept and the person
who knows the site decides. Names that differ only in case are one file on Windows and FAT, so
they are a conflict too, never two files.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass
from enum import StrEnum

from fieldlog.sync.names import case_clashes, fold
from fieldlog.sync.scan import LogFile


class Direction(StrEnum):
    """Which way a file travels."""

    SEND = "send"
    """From the site to the target (the office)."""
    RECEIVE = "receive"
    """From the target into the site."""


@dataclass(frozen=True)
class Copy:
    """One file to copy: new at the destination, or a grown version of a shorter copy."""

    name: str
    direction: Direction
    source: LogFile
    replaces: LogFile | None
    """The destination's shorter copy (an exact prefix of ``source``), or None when new."""

    @property
    def grown(self) -> bool:
        """True when this copy replaces a shorter version of the same file."""
        return self.replaces is not None


@dataclass(frozen=True)
class Conflict:
    """Two versions that cannot both be right without a person deciding."""

    name: str
    reason: str
    site: LogFile | None = None
    target: LogFile | None = None
    case_only: bool = False
    """True for names that differ only in case (nothing is saved aside for these)."""


@dataclass(frozen=True)
class LogPlan:
    """What to copy each way, what disagrees, and how many files already match."""

    copies: tuple[Copy, ...]
    conflicts: tuple[Conflict, ...]
    unchanged: int


PrefixCheck = Callable[[LogFile, LogFile], bool]
"""``is_prefix(shorter, longer)``: True when ``shorter``'s bytes begin ``longer``."""


def plan_logs(
    site: Mapping[str, LogFile], target: Mapping[str, LogFile], is_prefix: PrefixCheck
) -> LogPlan:
    """Compare two sides' journal files by content and say what each side lacks.

    Args:
        site: the site's journal files by name.
        target: the target's journal files by name.
        is_prefix: reads the files to tell whether one is an exact byte prefix of the other;
            only asked for pairs whose hashes differ.

    Returns:
        The plan, in name order so runs and reports are reproducible.
    """
    copies: list[Copy] = []
    conflicts: list[Conflict] = []
    unchanged = 0
    clashes = case_clashes([*site, *target])
    for _key, spellings in sorted(clashes.items()):
        on_site = ", ".join(n for n in spellings if n in site) or "none"
        on_target = ", ".join(n for n in spellings if n in target) or "none"
        conflicts.append(
            Conflict(
                name=spellings[0],
                reason=(
                    "names differ only in case, which Windows and USB sticks treat as one file "
                    f"(site: {on_site}; target: {on_target})"
                ),
                case_only=True,
            )
        )
    for name in sorted({*site, *target}):
        if fold(name) in clashes:
            continue
        here, there = site.get(name), target.get(name)
        if there is None and here is not None:
            copies.append(Copy(name, Direction.SEND, here, None))
        elif here is None and there is not None:
            copies.append(Copy(name, Direction.RECEIVE, there, None))
        elif here is not None and there is not None:
            if here.sha256 == there.sha256:
                unchanged += 1
                continue
            copy = _grown(name, here, there, is_prefix)
            if copy is not None:
                copies.append(copy)
            else:
                conflicts.append(
                    Conflict(
                        name=name,
                        reason="the site's and the target's copies differ and neither is the start "
                        "of the other (an entry was changed or lost on one side)",
                        site=here,
                        target=there,
                    )
                )
    return LogPlan(tuple(copies), tuple(conflicts), unchanged)


def _grown(name: str, here: LogFile, there: LogFile, is_prefix: PrefixCheck) -> Copy | None:
    """The copy that brings the shorter side up to date, or None when they truly differ."""
    if here.size == there.size:
        return None
    if here.size < there.size:
        return Copy(name, Direction.RECEIVE, there, here) if is_prefix(here, there) else None
    return Copy(name, Direction.SEND, here, there) if is_prefix(there, here) else None
