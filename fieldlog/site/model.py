"""The site as the rest of fieldlog sees it: plain frozen values, no I/O.

:mod:`fieldlog.site.files` builds a :class:`Site` from the TOML in a site folder; everything
downstream (calendars, cpm, lookahead, reports, the app) only reads these values.

:class:`Activity` and :class:`Link` use ``__slots__``: a 200,000-activity schedule has
600,000 of them, and without a per-object ``__dict__`` they take a fifth of the memory.
"""

from __future__ import annotations

from collections import deque
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field, fields
from datetime import date
from enum import StrEnum
from functools import cached_property
from itertools import repeat
from types import MappingProxyType
from typing import Any, TypeVar

WEEKDAY_NAMES = ("mon", "tue", "wed", "thu", "fri", "sat", "sun")
"""Weekday keys used in ``workdays`` lists; index = ``date.weekday()``."""


class LinkType(StrEnum):
    """Precedence link types of the precedence diagramming method."""

    FS = "FS"  # finish-to-start
    SS = "SS"  # start-to-start
    FF = "FF"  # finish-to-finish
    SF = "SF"  # start-to-finish


class LagCalendar(StrEnum):
    """Which calendar a link's lag is counted on (a site setting)."""

    SUCCESSOR = "successor"
    PREDECESSOR = "predecessor"


@dataclass(frozen=True)
class CalendarSpec:
    """A working-day calendar as written in site.toml."""

    name: str
    workdays: frozenset[int]
    """Working weekdays, 0 = Monday .. 6 = Sunday."""
    holidays: frozenset[date] = frozenset()
    """Dates that are never worked on this calendar."""
    public_holidays: str | None = None
    """Optional region code such as ``"GB-ENG"``: that region's public holidays are added."""


@dataclass(frozen=True)
class Crew:
    """A crew (trade or subcontractor) and how many people it can put on site per day."""

    name: str
    available: int


@dataclass(frozen=True, slots=True)
class Link:
    """A precedence link: ``succ`` depends on ``pred`` by ``type`` with ``lag`` working days."""

    pred: str
    succ: str
    type: LinkType = LinkType.FS
    lag: int = 0
    """Working days; negative is a lead."""


@dataclass(frozen=True, slots=True)
class Activity:
    """One activity of the office schedule."""

    id: str
    name: str
    duration: int
    """Working days on the activity's calendar; 0 is a milestone."""
    calendar: str
    start_not_before: date | None = None
    finish_not_after: date | None = None
    crew: Mapping[str, int] = field(default_factory=lambda: MappingProxyType({}))
    """Crew name -> headcount needed each working day."""

    @property
    def is_milestone(self) -> bool:
        """A milestone takes no working time."""
        return self.duration == 0


@dataclass(frozen=True)
class Site:
    """Everything the engine needs to know about one job, from site.toml and schedule.toml."""

    name: str
    start: date
    calendar: str
    """Name of the default calendar."""
    calendars: Mapping[str, CalendarSpec]
    crews: Mapping[str, Crew]
    revision: int
    activities: tuple[Activity, ...]
    links: tuple[Link, ...]
    finish_by: date | None = None
    """Required finish (inclusive); the backward pass starts here when set."""
    progress_override: bool = False
    """Out-of-sequence work: False = retained logic (default), True = progress override."""
    lag_calendar: LagCalendar = LagCalendar.SUCCESSOR

    def activity(self, activity_id: str) -> Activity:
        """The activity with this id (KeyError when there is none)."""
        return self._by_id[activity_id]

    @cached_property
    def _by_id(self) -> Mapping[str, Activity]:
        """Id -> activity, made on the first lookup and then kept with the value.

        Checks and the journal ask by id inside loops over every activity, so a scan would be
        quadratic. It is derived from ``activities`` alone and never changes; it is not a
        field, so it takes no part in equality, and the site cache pickles the fields only.
        (The engine's own index lives in :class:`fieldlog.engine.compiled.CompiledSite`.)
        """
        return {a.id: a for a in self.activities}

    def has_activity(self, activity_id: str) -> bool:
        """True when the current schedule has this activity."""
        return activity_id in self._by_id


_Value = TypeVar("_Value", Activity, Link)


def from_columns(
    cls: type[_Value], count: int, columns: Mapping[str, Iterable[Any]]
) -> tuple[_Value, ...]:
    """``count`` activities or links, each field from its column (every column ``count`` long).

    The same values as calling ``cls(...)`` per row, without a Python-level ``__init__`` per
    object: the objects are made empty and each slot is filled by its descriptor, all in C
    loops (``__init__`` of a frozen dataclass costs about a microsecond per object, a fifth
    of a second for a 200,000-activity schedule's links). The values must already be checked:
    the schedule's bulk checks (:mod:`fieldlog.site.bulk`) and the site cache use it. Every
    field is set: a column missing for a field is a KeyError, never a half-built object.
    """
    objects: tuple[_Value, ...] = tuple(map(object.__new__, repeat(cls, count)))
    for f in fields(cls):
        deque(map(getattr(cls, f.name).__set__, objects, columns[f.name]), maxlen=0)
    return objects
