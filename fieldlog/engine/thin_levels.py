"""Thin network levels scheduled one link at a time with plain Python ints.

:mod:`fieldlog.engine.passes` handles a level of the network with a dozen numpy calls. Each
call has a fixed cost of a microsecond or more, whatever the level's size, so a level of ten
links costs as much as one of a thousand. A deep network (a long band of work, each step
waiting on one or two of the step before) has a thousand such thin levels and the fixed costs
add up to more than the work itself. For a run of consecutive thin levels the passes call
:func:`forward_run` / :func:`backward_run` instead: the run's inputs are read out of the
arrays once (``.tolist()``), every link is handled with Python ints, and the results are
written back in one assignment per column.

The arithmetic is the vectorised one, step for step: the same bound per link, the same packed
(bound, position) maximum that picks the driving link (see ``passes._tie_bits``), the same
calendar moves with the same range checks. An activity's value written earlier in the run is
read from the run's own record; anything else from the values the run started with (an
activity of an earlier level, or one no live link reaches, is never written in the run).
tests/test_cpm_differential.py runs the random sites with every level thin and with none.
"""

from __future__ import annotations

import weakref
from typing import NamedTuple

import numpy as np

from fieldlog.engine.calendar_tables import CalendarTables
from fieldlog.engine.calendars import HorizonExceeded

_LOW = int(np.iinfo(np.int64).min)
"""Below every bound (bounds are points plus lags, far from the int64 range)."""

THIN_LINKS = 32
"""A level with at most this many links is thin: one link at a time in Python costs less than
the dozen numpy calls of a level (measured with tests/benchmarks/bench_cpm.py's deep case)."""
MIN_LEVELS = 16
"""Fewest consecutive thin levels worth a run: a run starts by copying the activities' points
into lists, which costs about as much as a dozen levels in numpy."""


def runs(link_bounds: list[int], thin: int, min_levels: int) -> list[tuple[int, int, bool]]:
    """Consecutive levels grouped as ``(first level, end level, thin)``; a thin group has at
    least ``min_levels`` levels (shorter ones join the vectorised groups around them)."""
    if len(link_bounds) < 2:
        return []
    thin_level = np.diff(link_bounds) <= thin
    first = np.flatnonzero(np.r_[True, thin_level[1:] != thin_level[:-1]])  # of each group
    ends = [*first[1:].tolist(), thin_level.size]
    out = list(zip(first.tolist(), ends, thin_level[first].tolist(), strict=True))
    merged: list[tuple[int, int, bool]] = []
    for g0, g1, is_thin in out:
        is_thin = is_thin and g1 - g0 >= min_levels
        if merged and merged[-1][2] == is_thin:
            merged[-1] = (merged[-1][0], g1, is_thin)
        else:
            merged.append((g0, g1, is_thin))
    return merged


class _Lists(NamedTuple):
    """A site's calendar tables as Python lists, for moves one point at a time."""

    work: list[list[int]]
    before: list[list[int]]
    length: list[int]
    origin: int


_NO_LISTS = _Lists([], [], [], 0)

_LISTS: weakref.WeakKeyDictionary[CalendarTables, _Lists] = weakref.WeakKeyDictionary()


def _lists(tables: CalendarTables) -> _Lists:
    """The tables as lists, made once per tables value (tables are remembered per calendar
    set, so the app's recompute after each entry finds them made)."""
    got = _LISTS.get(tables)
    if got is None:
        got = _LISTS[tables] = _Lists(
            tables.work.tolist(),
            tables.before.tolist(),
            [int(k) for k in tables.length.tolist()],
            tables.origin,
        )
    return got


class Run(NamedTuple):
    """One run of thin levels: its links ``a:b``, activities ``s0:s1`` and cross-calendar
    links ``c0:c1`` (positions in the pass's arrays, see ``passes._Levels``)."""

    a: int
    b: int
    s0: int
    s1: int
    c0: int
    c1: int

    def cross_at(self, cross_at: np.ndarray) -> list[int]:
        """For each link of the run, its number among the cross links of the run, or -1."""
        at = [-1] * (self.b - self.a)
        for c, k in enumerate((cross_at[self.c0 : self.c1] - self.a).tolist()):
            at[k] = c
        return at

    def link_ends(self, first: np.ndarray) -> tuple[list[int], list[int]]:
        """Each activity's links, relative to the run: (first, end) lists."""
        starts = (first[self.s0 : self.s1] - self.a).tolist()
        return starts, [*starts[1:], self.b - self.a]


def _link_lists(lk: Links, run: Run, tables: CalendarTables) -> tuple:
    """The run's sources, additions and cross-link numbers as lists, and the calendar lists
    (empty ones when the run has no cross link: they are never read then)."""
    src, adds = lk.source[run.a : run.b].tolist(), lk.add[run.a : run.b].tolist()
    cal = _lists(tables) if run.c1 > run.c0 else _NO_LISTS
    return src, adds, run.cross_at(lk.cross_at), cal


class Links(NamedTuple):
    """What both passes give a run: per link (in the pass's order) its source in the stacked
    points and what is added to it; per activity of the levels its first link, position and
    duration; the cross-calendar links' positions, calendars and what is added after a move."""

    source: np.ndarray
    add: np.ndarray
    first: np.ndarray
    targets: np.ndarray
    t_dur: np.ndarray
    cross_at: np.ndarray
    x_from: np.ndarray
    x_to: np.ndarray
    x_add: np.ndarray


class ForwardInputs(NamedTuple):
    """The forward pass's arrays (see ``passes.forward``)."""

    links: Links
    shift: int
    t_floor: np.ndarray
    x_source: np.ndarray
    """Where each cross link reads its "after" flag."""


def forward_run(
    f: ForwardInputs,
    run: Run,
    points: np.ndarray,
    flags: np.ndarray,
    best: np.ndarray,
    tables: CalendarTables,
) -> None:
    """Early points, packed bests and milestone flags of the run's activities, in place.

    A link's bound is compared as is; the first link in order that reaches the maximum wins
    (strictly greater replaces), which is what the packed maximum of ``passes`` picks.
    """
    if _forward_chain(f, run, points, flags, best):
        return
    a, s0, s1, c0, c1 = run.a, run.s0, run.s1, run.c0, run.c1
    lk = f.links
    n = points.shape[1]
    vals, flag = points.reshape(-1).tolist(), flags.reshape(-1).tolist()
    src, adds, xat, cal = _link_lists(lk, run, tables)
    x_src, x_from = f.x_source[c0:c1].tolist(), lk.x_from[c0:c1].tolist()
    x_to, x_add = lk.x_to[c0:c1].tolist(), lk.x_add[c0:c1].tolist()
    who = lk.targets[s0:s1]
    starts, ends = run.link_ends(lk.first)
    floors, durs = f.t_floor[s0:s1].tolist(), lk.t_dur[s0:s1].tolist()
    tops, wins, ms_who = [], [], []
    low = _LOW
    for t, lo, hi, floor, dur in zip(who.tolist(), starts, ends, floors, durs, strict=True):
        top = low
        for i in range(lo, hi):
            v = vals[src[i]] + adds[i]
            c = xat[i]
            if c >= 0:
                fr, after = x_from[c], flag[x_src[c]]
                q = v - after
                if not 0 <= q < cal.length[fr]:
                    raise HorizonExceeded("calendar tables")
                v = cal.before[x_to[c]][cal.work[fr][q] + after - cal.origin] + x_add[c]
            if v > top:
                top, win = v, i
        es = top if top > floor else floor
        vals[t] = es
        vals[n + t] = es + dur
        tops.append(top)
        wins.append(win)
        if dur == 0:  # a milestone: the end of the work driving it, or its own day
            flag[t] = flag[n + t] = flag[src[win]] and top > floor
            ms_who.append(t)
    top_arr = np.array(tops, dtype=np.int64)
    es_arr = np.maximum(top_arr, f.t_floor[s0:s1])
    points[0, who] = es_arr
    points[1, who] = es_arr + lk.t_dur[s0:s1]
    # packed as in passes: the bound, then the link's position (see passes._tie_bits)
    shift = f.shift
    best[who] = (top_arr << shift) | ((1 << shift) - 1 - a - np.array(wins, dtype=np.int64))
    if ms_who:
        after_arr = np.array([flag[t] for t in ms_who], dtype=bool)
        flags[0, ms_who] = after_arr
        flags[1, ms_who] = after_arr


class BackwardInputs(NamedTuple):
    """The backward pass's arrays (see ``passes.backward``)."""

    links: Links
    t_latest: np.ndarray
    x_after: np.ndarray


def backward_run(f: BackwardInputs, run: Run, late: np.ndarray, tables: CalendarTables) -> None:
    """Late points of the run's activities, in place; levels taken from the last."""
    if _backward_chain(f, run, late):
        return
    s0, s1, c0, c1 = run.s0, run.s1, run.c0, run.c1
    lk = f.links
    n = late.shape[1]
    vals = late.reshape(-1).tolist()
    src, adds, xat, cal = _link_lists(lk, run, tables)
    x_at = (~f.x_after[c0:c1]).astype(np.int64).tolist()  # a start point: "at its day"
    x_from, x_to = lk.x_from[c0:c1].tolist(), lk.x_to[c0:c1].tolist()
    x_add = lk.x_add[c0:c1].tolist()
    who = lk.targets[s0:s1].tolist()
    starts, ends = run.link_ends(lk.first)
    latest, durs = f.t_latest[s0:s1].tolist(), lk.t_dur[s0:s1].tolist()
    lf_out = []
    backwards = (who[::-1], starts[::-1], ends[::-1], latest[::-1], durs[::-1])
    for t, lo, hi, lf, dur in zip(*backwards, strict=True):
        for i in range(lo, hi):
            v = vals[src[i]] + adds[i]
            c = xat[i]
            if c >= 0:
                fr, at = x_from[c], x_at[c]
                if not 0 <= v < cal.length[fr]:
                    raise HorizonExceeded("calendar tables")
                v = cal.before[x_to[c]][cal.work[fr][v] + at - cal.origin] - at + x_add[c]
            if v < lf:
                lf = v
        vals[n + t] = lf
        vals[t] = lf - dur
        lf_out.append(lf)
    lf_out.reverse()
    lf_arr = np.array(lf_out, dtype=np.int64)
    late[1, who] = lf_arr
    late[0, who] = lf_arr - lk.t_dur[s0:s1]


# -- a run that is one chain ------------------------------------------------------------------
#
# A long sequence of work, each step waiting on the one before (one trade after another), is
# a run whose every activity has one link, from the activity before it, on one calendar. Its
# points then follow a max-plus recurrence that numpy solves at once: going forward,
# ``es[k] = max(es[k-1] + c[k], floor[k])`` (``c[k]``: the link's addition, plus the step
# before's duration when the link reads its finish), so with ``C`` the running sum of ``c``,
# ``es[k] = C[k] + max(es[0], max(floor[j] - C[j] for 1 <= j <= k))``: one
# ``maximum.accumulate``. Going back it is the same with min. A milestone's reading flag
# follows the link that drives it, along a row of milestones too (:func:`_milestone_flags`).
# The one-at-a-time loop stays for anything else.


def _chain_links(lk: Links, run: Run) -> tuple[np.ndarray, np.ndarray] | None:
    """The run's activities and their links' sources when every activity of the run has
    exactly one link, its own, in order, and no link crosses calendars; else None."""
    a, b, s0, s1 = run.a, run.b, run.s0, run.s1
    if run.c1 > run.c0 or b - a != s1 - s0 or b - a < 2:
        return None
    if not np.array_equal(lk.first[s0:s1], np.arange(a, b)):
        return None
    return lk.targets[s0:s1], lk.source[a:b]


def _forward_chain(
    f: ForwardInputs, run: Run, points: np.ndarray, flags: np.ndarray, best: np.ndarray
) -> bool:
    """The run's early points, packed bests and milestone flags when it is one chain (see
    above); False, with nothing written, when it is not."""
    lk = f.links
    found = _chain_links(lk, run)
    if found is None:
        return False
    who, src = found
    dur = lk.t_dur[run.s0 : run.s1]
    n = points.shape[1]
    prev = who[:-1]
    reads_finish = src[1:] == prev + n
    if not (reads_finish | (src[1:] == prev)).all():
        return False  # some link comes from elsewhere than the step before
    add = lk.add[run.a : run.b]
    c = add[1:] + np.where(reads_finish, dur[:-1], 0)
    total = np.concatenate((np.zeros(1, dtype=np.int64), np.cumsum(c)))
    floor = f.t_floor[run.s0 : run.s1]
    first_top = int(points.reshape(-1)[src[0]] + add[0])  # from an earlier level: final
    lowest = floor - total
    lowest[0] = max(first_top, int(floor[0]))
    es = np.maximum.accumulate(lowest) + total
    top = np.empty_like(es)
    top[0] = first_top
    top[1:] = es[:-1] + c
    points[0, who] = es
    points[1, who] = es + dur
    shift = f.shift  # packed as in the loop: the bound, then the link's position
    best[who] = (top << shift) | ((1 << shift) - 1 - np.arange(run.a, run.b, dtype=np.int64))
    milestone = dur == 0
    if milestone.any():
        after = _milestone_flags(flags.reshape(-1)[src], top > floor, milestone)
        flags[0, who[milestone]] = after
        flags[1, who[milestone]] = after
    return True


def _milestone_flags(read: np.ndarray, above: np.ndarray, milestone: np.ndarray) -> np.ndarray:
    """Each milestone's reading flag, as the loop sets it: the flag of the point its link
    reads, and its link's bound above its floor. A milestone right after another reads that
    one's new flag, so along a row of milestones the flag is the first one's read flag and
    every bound above its floor since: a running "since when" over the row.

    ``read``: the flag each link reads as it was before the run (final for work and for
    anything outside the run); ``above``: bound > floor, per activity.
    """
    k = np.arange(milestone.size)
    follows = np.zeros_like(milestone)
    follows[1:] = milestone[:-1]  # the step before is a milestone too
    row_start = np.maximum.accumulate(np.where(milestone & ~follows, k, -1))
    last_below = np.maximum.accumulate(np.where(milestone & ~above, k, -1))
    flag = read[row_start] & (last_below < row_start)
    return flag[milestone]


def _backward_chain(f: BackwardInputs, run: Run, late: np.ndarray) -> bool:
    """The run's late points when it is one chain (see above); False, with nothing written,
    when it is not. Going back each activity's one link comes from the step after it."""
    lk = f.links
    found = _chain_links(lk, run)
    if found is None:
        return False
    who, src = found
    n = late.shape[1]
    after = who[1:]
    reads_start = src[:-1] == after
    if not (reads_start | (src[:-1] == after + n)).all():
        return False
    dur = lk.t_dur[run.s0 : run.s1]
    add = lk.add[run.a : run.b]
    latest = f.t_latest[run.s0 : run.s1]
    # lf[k] = min(lf[k+1] + e[k], latest[k]), taken from the last activity of the run back
    e = (add[:-1] - np.where(reads_start, dur[1:], 0))[::-1]
    total = np.concatenate((np.zeros(1, dtype=np.int64), np.cumsum(e)))
    highest = latest[::-1] - total
    highest[0] = min(int(late.reshape(-1)[src[-1]] + add[-1]), int(latest[-1]))
    lf = (np.minimum.accumulate(highest) + total)[::-1]
    late[1, who] = lf
    late[0, who] = lf - dur
    return True
