"""The fewest-people question as plain numbers: which work may move, where, and what it loads.

A foreman asks "can this crew do the fortnight with 8 people instead of 10 without moving the
finish?". Before any search this module fixes what a plan may change, so that the search
(:mod:`fieldlog.lookahead.fewest_search`), the lower bounds
(:mod:`fieldlog.lookahead.fewest_bounds`) and the tests all answer the same question:

* work *may move* when it has not started, has positive total float and could start inside the
  window (early start on or before the window's last day); it keeps its duration and runs
  whole working days of its own calendar, never split or interrupted;
* a moved start is never earlier than the early start, never later than the late start, never
  so late that the work finishes after the forecast finish, and at the latest on the first
  working day after the window (the plan is about the days on the sheet);
* everything else stays on its early dates: work already running (it cannot move), work with
  no float, late work, and work that starts after the window;
* every link that still binds is kept, checked with :meth:`Network.bound` on each activity's
  calendar. Each movable activity's latest start is pulled in, last activity first, so that
  whatever start its predecessors take, its successors can still be placed: a search that
  places work in network order never paints itself into a corner on links, only on people.

Loads are counted on the window's days only (index 0 is the window's first day).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from datetime import date, timedelta

from fieldlog.engine.progress import Status
from fieldlog.engine.result import ScheduleResult
from fieldlog.engine.topology import topological_order
from fieldlog.lookahead.positions import Network, Placed
from fieldlog.site.model import Link


@dataclass(frozen=True)
class Movable:
    """One activity the plan may start later, with every start it may take."""

    id: str
    crew: Mapping[str, int]
    """People per working day, per crew (only crews with a headcount above zero)."""
    starts: tuple[int, ...]
    """Start points, earliest first: the early start up to the latest allowed start."""
    runs: tuple[tuple[int, ...], ...]
    """Per start, the window-day indices it works on."""


@dataclass(frozen=True)
class Tie:
    """A link between two movable activities: the earliest start it allows its successor."""

    pred: int
    """Index of the predecessor in :attr:`Problem.movables`."""
    succ: int
    floor: tuple[int, ...]
    """Per start index of the predecessor, the earliest start point of the successor."""


@dataclass(frozen=True)
class Problem:
    """Everything the search and the bounds read."""

    days: int
    crews: tuple[str, ...]
    available: Mapping[str, int]
    fixed_load: Mapping[str, tuple[int, ...]]
    """Per crew and window day, the people needed by work that stays on its dates."""
    movables: tuple[Movable, ...]
    """In network order: every predecessor before its successors."""
    ties: tuple[Tie, ...]
    placed: Mapping[str, Placed]
    """The movable activities as :class:`Placed` values, to turn starts back into dates."""


def build_problem(
    result: ScheduleResult,
    days: Sequence[date],
    open_by_start: Sequence,
    network: Network | None = None,
) -> Problem:
    """The movable work of ``result`` over the window ``days`` (see the module docstring).

    Args:
        result: the schedule.
        days: the window's days, consecutive.
        open_by_start: the open activities (lookahead rows or results), early-start order.
        network: a :class:`Network` of ``result`` already built, if the caller has one.
    """
    site = result.site
    net = network or Network(result)
    first, n = days[0].toordinal(), len(days)
    window_end = days[-1]
    after_window = window_end + timedelta(days=1)
    finish_cap = {
        name: c.pos(result.finish + timedelta(days=1)) for name, c in result.calendars.items()
    }
    crews = tuple(site.crews)

    def crew_of(aid: str) -> dict[str, int]:
        return {c: k for c, k in site.activity(aid).crew.items() if k > 0}

    def window_run(p: Placed, start: int) -> tuple[int, ...]:
        work = p.calendar.work
        return tuple(o - first for o in work[start : start + p.duration] if 0 <= o - first < n)

    fixed = {c: [0] * n for c in crews}
    latest: dict[str, int] = {}
    for r in open_by_start:
        if r.early_start > window_end:
            break
        p = net[r.id]
        if r.status is Status.NOT_STARTED and r.total_float is not None and r.total_float > 0:
            end = finish_cap[r.calendar] - (0 if p.end_after else 1)
            top = min(p.late_start, end - p.duration, p.calendar.pos(after_window))
            if top > p.start:
                latest[r.id] = top
                continue
        for c, k in crew_of(r.id).items():
            for d in window_run(p, p.start):
                fixed[c][d] += k

    order, _ = topological_order(
        list(latest),
        ((lk.pred, lk.succ) for lk in site.links if lk.pred in latest and lk.succ in latest),
    )
    _pull_in_latest(order, latest, net)

    index = {aid: k for k, aid in enumerate(order)}
    movables = []
    for aid in order:
        p = net[aid]
        starts = tuple(range(p.start, latest[aid] + 1))
        movables.append(Movable(aid, crew_of(aid), starts, tuple(window_run(p, s) for s in starts)))
    ties = []
    for aid in order:
        for lk in net.out_links(aid):
            if lk.succ in index:
                ties.append(
                    Tie(
                        index[aid],
                        index[lk.succ],
                        tuple(net.bound(lk, s) for s in movables[index[aid]].starts),
                    )
                )
    return Problem(
        n,
        crews,
        {c: site.crews[c].available for c in crews},
        {c: tuple(v) for c, v in fixed.items()},
        tuple(movables),
        tuple(ties),
        {aid: net[aid] for aid in order},
    )


def _pull_in_latest(order: list[str], latest: dict[str, int], net: Network) -> None:
    """Lower each movable activity's latest start until every outgoing link can be kept.

    Last activity first: a successor that may move lends its own latest start, one that stays
    lends its early start. Links bound the successor more as the predecessor starts later, so
    the latest start that keeps a link is found by stepping up from the early start (ranges
    are a few working days).
    """
    for aid in reversed(order):
        p = net[aid]
        top = latest[aid]
        for lk in net.out_links(aid):
            target = latest.get(lk.succ, net[lk.succ].start)
            top = _highest_keeping(lk, p.start, top, target, net)
        latest[aid] = max(top, p.start)


def _highest_keeping(link: Link, low: int, high: int, target: int, net: Network) -> int:
    """The latest start in ``[low, high]`` whose link bound is at most ``target``."""
    s = low
    while s < high and net.bound(link, s + 1) <= target:
        s += 1
    return s
