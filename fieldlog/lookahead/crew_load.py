"""Crew load: how many people each crew needs on each day of the window.

Three numbers per crew and day, each the sum of the headcounts (``crew = { carpenters = 4 }``
in schedule.toml) of the activities counted:

* **must**: activities that MUST run that day, the people needed whatever else happens;
* **most**: MUST plus MAY, the most that could be asked for if every activity with float chose
  to run that day (an upper bound, not a plan);
* **early**: every activity on its early dates, the plan if everything starts as soon as it can.

A day is *over* when the number is above the crew's ``available`` headcount in site.toml.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import NamedTuple

from fieldlog.lookahead.classify import Cell
from fieldlog.site.model import Crew


@dataclass(frozen=True)
class CrewLoad:
    """One crew's headcount per window day."""

    crew: str
    available: int
    must: tuple[int, ...]
    most: tuple[int, ...]
    early: tuple[int, ...]
    levelled: tuple[int, ...] | None = None
    """Headcount with the levelling suggestion's moves made, when there is a suggestion."""

    def over(self, values: Sequence[int]) -> tuple[bool, ...]:
        """Per day, whether ``values`` is above what the crew has."""
        return tuple(v > self.available for v in values)

    @property
    def over_early(self) -> bool:
        """Over its headcount on some day if everything starts early."""
        return any(v > self.available for v in self.early)

    @property
    def over_must(self) -> bool:
        """Over its headcount on some day even counting only MUST work."""
        return any(v > self.available for v in self.must)


class CrewWork(NamedTuple):
    """What crew load needs of one activity row."""

    crew: Mapping[str, int]
    cells: Sequence[Cell]
    early_first: int
    """Window index of the early start (may be outside the window)."""
    early_last: int
    """Window index of the early finish (may be outside the window)."""


def crew_loads(
    work: Iterable[CrewWork], crews: Mapping[str, Crew], days: int
) -> tuple[CrewLoad, ...]:
    """Must, most and early headcount per crew over ``days`` window days."""
    must = {c: [0] * days for c in crews}
    most = {c: [0] * days for c in crews}
    early = {c: [0] * days for c in crews}
    for w in work:
        if not w.crew:
            continue
        for k, cell in enumerate(w.cells):
            if cell is Cell.MUST:
                in_early = True
                for c, r in w.crew.items():
                    must[c][k] += r
                    most[c][k] += r
            elif cell is Cell.MAY:
                in_early = w.early_first <= k <= w.early_last
                for c, r in w.crew.items():
                    most[c][k] += r
            else:
                continue
            if in_early:
                for c, r in w.crew.items():
                    early[c][k] += r
    return tuple(
        CrewLoad(c, crews[c].available, tuple(must[c]), tuple(most[c]), tuple(early[c]))
        for c in crews
    )


def near_headcount(available: int, early_peak: int) -> bool:
    """Over its headcount, or within a tenth of it (at least one person): worth asking."""
    return early_peak > 0 and early_peak >= available - max(1, -(-available // 10))
