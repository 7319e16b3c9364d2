"""A levelling suggestion for crews booked over their headcount: Burgess-Killebrew.

When everything starts on its early dates and a crew is needed by more people than it has, some
MAY work can slide inside its float. The suggestion uses the published minimum sum of squares
heuristic of Burgess and Killebrew (1962, "Variation in activity level on a cyclical arrow
diagram", Journal of Industrial Engineering 13(2); citation from memory): since the total work
is fixed, a flatter daily headcount has a smaller sum of squared daily totals. The heuristic:

1. start from the early-start schedule;
2. take the movable activities last first (reverse network order), and for each try every start
   within its float, keeping the one with the smallest sum of squares (ties: the latest start);
3. repeat whole passes until a pass improves nothing.

What may move, and what is guaranteed:

* only work not started yet, with float, that the window shows as MAY work for a crew that is
  over its headcount (the *seeds*); crew-less work not started yet downstream of the seeds
  (a cure, a milestone) may slide along to make room (*helpers*: during the passes they stand
  as late as the seeds can push them, afterwards they are pulled back as early as the seeds
  allow, so only the slides that are needed stay). Work of other crews stays on its early
  dates: moving it would only shift the crunch onto another crew;
* starts only move *later* than the early start and never past the late start, and never so far
  that the activity would finish after the forecast finish: **the forecast finish never moves**;
* the suggestion is about the days on the sheet: a seed starts at the latest on the first
  working day after the window, and a helper moves at most as far as the seeds can push it;
* every link that touches a moved activity is checked on the calendars (see
  :mod:`fieldlog.lookahead.positions`) against the other activity's position at that moment:
  **no link is ever broken**. Work that does not move stays on its early dates;
* the sum of squares is counted again at the end with every move made; a suggestion that does
  not lower it is dropped (no moves, and the sheet says so).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from datetime import date, timedelta
from operator import attrgetter
from typing import Protocol

from fieldlog.engine.progress import Status
from fieldlog.engine.result import ScheduleResult
from fieldlog.engine.topology import topological_order
from fieldlog.lookahead.positions import Network, Placed
from fieldlog.site.model import Site

METHOD = "Burgess-Killebrew minimum sum of squares"
MAX_PASSES = 50


@dataclass(frozen=True)
class Move:
    """One activity the suggestion starts later than its early start."""

    activity: str
    name: str
    early_start: date
    start: date
    """Suggested first working day."""
    finish: date
    """Last working day at the suggested start."""
    float_used: int
    """Working days of its float the move uses."""
    crew: Mapping[str, int]


@dataclass(frozen=True)
class Levelling:
    """The suggestion, with the numbers that show what it achieves."""

    method: str
    crews: tuple[str, ...]
    """The crews over their headcount that asked for it."""
    moves: tuple[Move, ...]
    sum_of_squares_before: int
    """Sum over crews and over the days the moves can touch of the squared daily headcount,
    everything on its early dates."""
    sum_of_squares_after: int
    passes: int
    window_load: Mapping[str, tuple[int, ...]]
    """Per crew, headcount on each window day with the moves made."""


class OpenWork(Protocol):
    """What levelling reads of an open activity (an ``ActivityResult`` or a lookahead row).

    Read-only, as both are frozen. The float is optional because an ``ActivityResult`` also
    stands for finished work, which has none; open work always has one.
    """

    @property
    def id(self) -> str: ...
    @property
    def status(self) -> Status: ...
    @property
    def calendar(self) -> str: ...
    @property
    def remaining(self) -> int: ...
    @property
    def early_start(self) -> date: ...
    @property
    def early_finish(self) -> date: ...
    @property
    def total_float(self) -> int | None: ...


def level(
    result: ScheduleResult,
    days: Sequence[date],
    over_crews: Sequence[str],
    early_load: Mapping[str, Sequence[int]],
    open_by_start: Sequence[OpenWork] | None = None,
) -> Levelling:
    """Suggest later starts that flatten the crews' daily headcount.

    Args:
        result: the schedule.
        days: the window's days.
        over_crews: crews whose early-start headcount exceeds their availability in the window.
        early_load: per crew, the window headcount with everything on its early dates.
        open_by_start: the open activities in early-start order, when the caller has them
            (the lookahead's rows): levelling then reads only the ones that start before the
            last day it can touch, instead of the whole schedule.

    Returns:
        The moves (possibly none) and the headcount they give.
    """
    if open_by_start is None:
        open_by_start = sorted(
            (r for r in result.activities if r.is_open), key=attrgetter("early_start")
        )
    site = result.site
    net = Network(result)
    crews_of = _CrewsOf(site)
    cap = {name: c.pos(result.finish + timedelta(days=1)) for name, c in result.calendars.items()}

    def latest(p: Placed) -> int:
        # Finish no later than the forecast finish: work and end-of-work milestones end "after
        # their last day", a start-of-day milestone is "at" its day, one point earlier.
        end = cap[p.result.calendar] - (0 if p.end_after else 1)
        return min(p.late_start, end - p.duration)

    over = set(over_crews)
    window_end = days[-1]
    after_window = window_end + timedelta(days=1)
    limit: dict[str, int] = {}  # the latest start each movable activity may be given
    for r in open_by_start:
        assert r.total_float is not None  # open work always has a float
        if r.early_start > window_end:
            break
        if (
            r.status is Status.NOT_STARTED
            and r.remaining > 0
            and r.total_float > 0
            and not over.isdisjoint(crews_of[r.id])
        ):
            p = net[r.id]
            top = min(latest(p), p.calendar.pos(after_window))
            if top > p.start:
                limit[r.id] = top
    seeds = list(limit)
    if not seeds:
        return _result(over_crews, {}, net, crews_of, days, early_load, 0, 0, 0)
    helpers = _helpers(seeds, net, latest, limit, crews_of)
    movable = set(seeds) | set(helpers)
    pos = {aid: net[aid].start for aid in movable}
    ins = {aid: [lk for lk in net.in_links(aid) if lk.pred in movable] for aid in movable}
    outs = {aid: net.out_links(aid) for aid in movable}

    # Daily headcount per crew over every day a movable activity could occupy.
    lo = min(net[a].result.early_start.toordinal() for a in movable)
    hi = max(
        [
            net[a].calendar.day_ordinal(limit[a] + net[a].duration - 1)
            for a in movable
            if net[a].duration > 0
        ],
        default=lo,
    )
    load = {c: [0] * (hi - lo + 1) for c in site.crews}
    first_day, last_day = date.fromordinal(lo), date.fromordinal(hi)
    for r in open_by_start:
        if r.early_start > last_day:
            break
        if r.remaining and r.early_finish >= first_day:
            crew = crews_of[r.id]
            if crew:
                c = result.calendars[r.calendar]
                _add(load, crew, c.work, c.pos(r.early_start), r.remaining, lo, hi, +1)
    before = _squares(load)

    def shift(aid: str, to: int) -> None:
        p = net[aid]
        if crews_of[aid]:
            _add(load, crews_of[aid], p.calendar.work, pos[aid], p.duration, lo, hi, -1)
            _add(load, crews_of[aid], p.calendar.work, to, p.duration, lo, hi, +1)
        pos[aid] = to

    def floor(aid: str) -> int:
        s = net[aid].start
        for link in ins[aid]:
            s = max(s, net.bound(link, pos[link.pred]))
        return s

    order_ids, _ = topological_order(
        sorted(movable),
        ((lk.pred, lk.succ) for lk in site.links if lk.pred in movable and lk.succ in movable),
    )
    order = list(reversed(order_ids))  # last first
    seed_set = set(seeds)
    passes = 0
    improved = True
    while improved and passes < MAX_PASSES:
        passes += 1
        improved = False
        for aid in order:
            p = net[aid]
            lo_k = floor(aid)
            hi_k = _highest(outs[aid], lo_k, limit[aid], net, pos)
            if aid not in seed_set:
                shift(aid, hi_k)  # a helper: out of the way while the seeds choose
                continue
            crew = crews_of[aid]
            _add(load, crew, p.calendar.work, pos[aid], p.duration, lo, hi, -1)
            best, best_cost, here = _best_start(load, crew, p, lo_k, hi_k, pos[aid], lo)
            if best_cost < here:
                improved = True
            pos[aid] = best
            _add(load, crew, p.calendar.work, best, p.duration, lo, hi, +1)

    # Pull the helpers back as early as the seeds allow: only the slides needed stay.
    for aid in order_ids:
        if aid not in seed_set:
            shift(aid, floor(aid))
    after = _squares(load)
    if after >= before:
        return _result(over_crews, {}, net, crews_of, days, early_load, before, before, passes)
    return _result(
        over_crews,
        {a: pos[a] for a in order_ids},
        net,
        crews_of,
        days,
        early_load,
        before,
        after,
        passes,
    )


class _CrewsOf:
    """Per activity id, the crews it needs (headcount above zero), looked up when asked."""

    def __init__(self, site: Site) -> None:
        self._site = site
        self._seen: dict[str, dict[str, int]] = {}

    def __getitem__(self, aid: str) -> dict[str, int]:
        crew = self._seen.get(aid)
        if crew is None:
            crew = {c: n for c, n in self._site.activity(aid).crew.items() if n > 0}
            self._seen[aid] = crew
        return crew


def _helpers(
    seeds: list[str], net: Network, latest, limit: dict[str, int], crews_of: _CrewsOf
) -> list[str]:
    """Crew-less work not started, downstream of the seeds, that the seeds can push.

    Only those can be in a seed's way; everything else stays on its early dates and is
    checked as it stands. ``limit`` gets, for each helper, the furthest it can be pushed (never
    past its own latest start).
    """
    stack = list(seeds)
    while stack:
        aid = stack.pop()
        for link in net.out_links(aid):
            j = link.succ
            if j in seeds:
                continue
            q = net[j]
            if q.result.status is not Status.NOT_STARTED or crews_of[j]:
                continue  # started work and other crews' work stay, and bound the seeds
            push = min(net.bound(link, limit[aid]), latest(q))
            if push > max(q.start, limit.get(j, q.start)):
                limit[j] = push
                stack.append(j)
    return sorted(j for j in limit if j not in seeds)


def _highest(links: list, lo_k: int, hi_k: int, net: Network, pos: dict[str, int]) -> int:
    """The latest start in ``[lo_k, hi_k]`` that keeps every outgoing link (bounds rise with
    the start, so the first start that breaks one ends the search)."""
    s = lo_k
    while s < hi_k and all(
        net.bound(lk, s + 1) <= pos.get(lk.succ, net[lk.succ].start) for lk in links
    ):
        s += 1
    return s


def _best_start(
    load, crew, p: Placed, lo_k: int, hi_k: int, current: int, origin: int
) -> tuple[int, int, int]:
    """Start in ``[lo_k, hi_k]`` adding least to the sum of squares (ties: the latest).

    Adding ``r`` people on days with ``L`` already booked adds ``2 r L + r^2`` per day, and the
    ``r^2`` part does not depend on the start, so comparing ``sum(r * L)`` is enough.
    """
    work = p.calendar.work
    d = p.duration
    prefix = [0]
    for k in range(lo_k, hi_k + d):
        o = work[k] - origin
        prefix.append(prefix[-1] + sum(r * load[c][o] for c, r in crew.items()))
    best, best_cost = lo_k, prefix[d]
    for s in range(lo_k + 1, hi_k + 1):
        cost = prefix[s - lo_k + d] - prefix[s - lo_k]
        if cost <= best_cost:
            best, best_cost = s, cost
    here = prefix[current - lo_k + d] - prefix[current - lo_k]
    return best, best_cost, here


def _add(
    load, crew, work: Sequence[int], start: int, duration: int, lo: int, hi: int, sign: int
) -> None:
    for o in work[start : start + duration]:
        if lo <= o <= hi:
            for c, r in crew.items():
                load[c][o - lo] += sign * r


def _squares(load: Mapping[str, list[int]]) -> int:
    return sum(v * v for row in load.values() for v in row)


def _result(
    over_crews,
    starts: Mapping[str, int],
    net: Network,
    crews_of,
    days,
    early_load,
    before: int,
    after: int,
    passes: int,
) -> Levelling:
    first = days[0].toordinal()
    n = len(days)
    window = {c: list(v) for c, v in early_load.items()}
    moves = []
    for aid, s in starts.items():
        p = net[aid]
        if s == p.start:
            continue
        crew = crews_of[aid]
        moves.append(
            Move(
                aid,
                p.result.name,
                p.result.early_start,
                p.first_day(s),
                p.last_day(s),
                s - p.start,
                dict(crew),
            )
        )
        for k, sign in ((p.start, -1), (s, +1)):
            for o in p.calendar.work[k : k + p.duration]:
                if 0 <= o - first < n:
                    for c, r in crew.items():
                        window[c][o - first] += sign * r
    moves.sort(key=lambda m: (m.start, m.activity))
    return Levelling(
        METHOD,
        tuple(over_crews),
        tuple(moves),
        before,
        after,
        passes,
        {c: tuple(v) for c, v in window.items()},
    )
