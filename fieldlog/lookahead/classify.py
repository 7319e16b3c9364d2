"""Must, may or cannot: the class of one activity on each day of the lookahead window.

The rule (DEVELOPERS.md, Rules of the trade) works on an activity's inclusive working dates
on its own calendar: early start ES, early finish EF, late start LS, late finish LF. For a
working day d:

* MUST when LS <= d <= EF: the activity runs on d in *every* schedule that keeps the links and
  meets the late dates, so if it is not running on d the job slips;
* MAY when ES <= d <= LF and not MUST: it runs on d in *some* such schedule (it has float);
* DONE after its late finish: it is finished by then in every such schedule, so there is
  nothing left to do (never shown as CANNOT, which would read as if it were held back);
* CANNOT otherwise: its predecessors (or a readiness item, or a date in the schedule) keep it
  back;
* OFF on the days its calendar does not work.

Why the rule is exact: with float >= 0 the early dates form the earliest schedule and the late
dates the latest one, every schedule lies between them, and each start between ES and LS is
reached by some schedule (start there, push the successors as early as the links allow). So
the activity covers d for every start in [ES, LS] exactly when d lies in both the earliest and
the latest placement, [LS, EF], and for some start when d lies in their union, [ES, LF].
``tests/test_lookahead_exact.py`` checks this against brute-force enumeration.

Negative float means no schedule meets the late dates: the activity is late, its ES..EF days
are MUST (it has to run on every day it possibly can), the days after EF are DONE, and it is
flagged. Days before the data date are in the past: nothing unfinished can be planned there.

Alongside each class this module records *why* (a :class:`Why` per day), so that the reasons a
foreman can act on ("waiting on ...", "n days of float") are attached to the cells they explain.
The work is done on date ordinals and cached per pattern, because thousands of activities share
a handful of patterns inside a two-week window.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date
from enum import IntEnum, StrEnum
from typing import NamedTuple


class Cell(StrEnum):
    """What an activity may do on one day of the window (the JSON and CSV spell it so)."""

    MUST = "must"
    MAY = "may"
    CANNOT = "cannot"
    DONE = "done"
    """After its late finish (its early finish when late): finished by then."""
    OFF = "off"


class Why(IntEnum):
    """Why a cell has its class; turned into words by :mod:`fieldlog.lookahead.reasons`."""

    NONE = 0
    """A MUST day of work that is on time, or an OFF day: nothing to explain."""
    PAST = 1
    """Before the data date: that day is already over."""
    WAITING = 2
    """Before the early start: a predecessor, readiness item or date holds it back."""
    FLOAT = 3
    """A MAY day: the activity has float."""
    AFTER_LATE_FINISH = 4
    """After the late finish: finished by then, or the job is delayed (a DONE day)."""
    LATE = 5
    """A MUST day of an activity with negative float."""


class Window(NamedTuple):
    """The days of the lookahead as date ordinals, and where the data date falls."""

    first: int
    """Ordinal of the first day shown."""
    length: int
    """Number of calendar days shown."""
    data_date: int
    """Ordinal of the data date (the first day that is not past)."""


@dataclass(frozen=True)
class Pattern:
    """The classes of one activity over the window, with the reason kind of each day."""

    cells: tuple[Cell, ...]
    why: tuple[Why, ...]
    kinds: tuple[Why, ...]
    """The reason kinds used, in order of first appearance (the order reasons are listed)."""
    index: tuple[int | None, ...]
    """Per day, the position in ``kinds`` of that day's reason (None: nothing to explain)."""
    active: bool
    """The activity must or may run on some day of the window."""

    @classmethod
    def of(cls, cells: tuple[Cell, ...], why: tuple[Why, ...]) -> Pattern:
        """A pattern with its reason list worked out once, for every activity that shares it."""
        kinds: list[Why] = []
        index: list[int | None] = []
        for kind in why:
            if kind is Why.NONE:
                index.append(None)
                continue
            if kind not in kinds:
                kinds.append(kind)
            index.append(kinds.index(kind))
        active = Cell.MUST in cells or Cell.MAY in cells
        return cls(cells, why, tuple(kinds), tuple(index), active)


def classify(
    working: Sequence[bool], window: Window, es: int, ef: int, ls: int, lf: int, late: bool
) -> Pattern:
    """Classify one open activity on every day of ``window``.

    Args:
        working: per window day, whether the activity's calendar works that day.
        window: the days shown.
        es: early start (ordinal of the first working day).
        ef: early finish (ordinal of the last working day, inclusive).
        ls: late start (ordinal).
        lf: late finish (ordinal, inclusive).
        late: the activity has negative total float.

    Returns:
        One :class:`Cell` and one :class:`Why` per window day.

    Examples:
        >>> w = Window(first=0, length=5, data_date=0)
        >>> classify([True] * 5, w, es=1, ef=2, ls=2, lf=3, late=False).cells
        ... # doctest: +NORMALIZE_WHITESPACE
        (<Cell.CANNOT: 'cannot'>, <Cell.MAY: 'may'>, <Cell.MUST: 'must'>, <Cell.MAY: 'may'>,
         <Cell.DONE: 'done'>)
    """
    cells: list[Cell] = []
    why: list[Why] = []
    o = window.first
    for works in working:
        if not works:
            cells.append(Cell.OFF)
            why.append(Why.NONE)
        elif o < window.data_date:
            cells.append(Cell.CANNOT)
            why.append(Why.PAST)
        elif o < es:
            cells.append(Cell.CANNOT)
            why.append(Why.WAITING)
        elif late:
            if o <= ef:
                cells.append(Cell.MUST)
                why.append(Why.LATE)
            else:
                cells.append(Cell.DONE)
                why.append(Why.AFTER_LATE_FINISH)
        elif ls <= o <= ef:
            cells.append(Cell.MUST)
            why.append(Why.NONE)
        elif o <= lf:
            cells.append(Cell.MAY)
            why.append(Why.FLOAT)
        else:
            cells.append(Cell.DONE)
            why.append(Why.AFTER_LATE_FINISH)
        o += 1
    return Pattern.of(tuple(cells), tuple(why))


class PatternCache:
    """Classify many activities quickly: equal (calendar, clamped dates) share one pattern.

    Dates outside the window are clamped to the day just before or just after it first; the
    class of every window day is unchanged by that, so activities far in the future all share
    one entry. Dates are compared as :class:`datetime.date` values and only turned into
    ordinals for a new pattern: this runs once per open activity.
    """

    def __init__(self, window: Window, working: dict[str, tuple[bool, ...]]) -> None:
        self._window = window
        self._working = working
        self._before = date.fromordinal(window.first - 1)
        self._after = date.fromordinal(window.first + window.length)
        self._seen: dict[tuple, Pattern] = {}

    def get(self, calendar: str, es: date, ef: date, ls: date, lf: date, late: bool) -> Pattern:
        """The pattern for one activity (see :func:`classify`; here the four dates are dates)."""
        before, after = self._before, self._after
        es = before if es <= before else (after if es >= after else es)
        ef = before if ef <= before else (after if ef >= after else ef)
        ls = before if ls <= before else (after if ls >= after else ls)
        lf = before if lf <= before else (after if lf >= after else lf)
        key = (calendar, es, ef, ls, lf, late)
        found = self._seen.get(key)
        if found is None:
            # Classify with the clamped dates: the same result on every window day.
            found = classify(
                self._working[calendar],
                self._window,
                es.toordinal(),
                ef.toordinal(),
                ls.toordinal(),
                lf.toordinal(),
                late,
            )
            self._seen[key] = found
        return found
