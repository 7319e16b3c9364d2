"""The forward and backward passes as array operations, one level of the network at a time.

The rules are those of :mod:`fieldlog.engine.cpm` (read its docstring first). Here they are
applied to whole levels (see :mod:`fieldlog.engine.network_arrays`): for every link into the
level the bound it puts on its successor is computed at once, then the bounds are reduced per
successor (maximum going forward, minimum going back). A 10,000-activity job has tens to a few
hundred levels, so the Python loop runs that many times instead of once per activity and per
link. A deep network has many thin levels, where the dozen numpy calls of a level cost more
than its few links: runs of them go through :mod:`fieldlog.engine.thin_levels` instead (the
same arithmetic, one link at a time), and :mod:`fieldlog.engine.reach` refuses a calendar range
a long path provably runs past before the forward pass starts. tests/benchmarks/bench_cpm.py
measures a deep case.

Points of all activities live in stacked tables so that one fancy index reads every link's
input: going forward ``points[0]`` is ES, ``points[1]`` EF, ``points[2]`` the actual start of
work in progress (what an SS or SF link reads from it); going back ``late[0]`` is LS and
``late[1]`` LF. A link's *source* is its flat index into such a table.

Which link drives is decided as in the one-at-a-time loop: the first link in file order whose
bound equals the successor's early start, provided it is not below the dates' own bound (a
link that ties with a date drives). To find the maximum and the first link reaching it in one
reduction, each bound is packed with its position into one integer (:func:`_tie_bits`).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from fieldlog.engine import thin_levels
from fieldlog.engine.calendar_tables import CalendarTables
from fieldlog.engine.network_arrays import NetworkArrays
from fieldlog.engine.reach import check_reach
from fieldlog.engine.thin_levels import BackwardInputs, ForwardInputs, Links, Run

_NOTHING = np.iinfo(np.int64).min
"""Packed value of an activity no link reached."""


class Start(NamedTuple):
    """What dates and field progress fix before the passes, per activity."""

    duration: np.ndarray
    """Working days to schedule: planned; remaining for work in progress; for finished work
    the span of its actual dates."""
    floor: np.ndarray
    """Earliest start point set by a date (site start, data date, start not before,
    readiness); for finished work its actual start point."""
    finished: np.ndarray
    in_progress: np.ndarray
    actual_start: np.ndarray
    """Point of the actual start of work in progress (what its SS and SF links read)."""
    actual_finish: np.ndarray
    """Date ordinal of the last day of finished work."""


class Early(NamedTuple):
    """Result of the forward pass."""

    start: np.ndarray
    finish: np.ndarray
    driver: np.ndarray
    """Index in ``site.links`` of the driving link, -1 where a date sets the early start."""
    start_after: np.ndarray
    """How another calendar reads the start point: True = "after the working day before it"
    (a milestone at the end of the work driving it), False = "at the point's day"."""
    end_after: np.ndarray
    """The same for the finish point (True for work, see :mod:`fieldlog.engine.cpm`)."""


Bounds = tuple[int, int, int, int, int, int]
"""One level's slices: (first link, end link, first target, end target, first cross, end
cross)."""


class _Levels(NamedTuple):
    """Links (already filtered and ordered) cut into levels and, inside a level, per activity.

    Level ``g`` holds links ``links[g]:links[g + 1]``, whose activities are
    ``targets[segs[g]:segs[g + 1]]``; ``starts`` gives each activity's first link relative to
    its level's first link (for ``reduceat``). Cross-calendar links of level ``g`` are
    ``cross[g]:cross[g + 1]`` of ``cross_at`` (positions in the link arrays) and ``cross_in``
    (the same, relative to the level's first link).
    """

    targets: np.ndarray
    starts: np.ndarray
    first: np.ndarray
    """Each activity's first link (absolute, ``starts`` plus its level's first link)."""
    links: list[int]
    segs: list[int]
    cross: list[int]
    cross_at: np.ndarray
    cross_in: np.ndarray

    def plan(self) -> tuple[list[tuple[Run | None, range]], list[Bounds]]:
        """The runs (:meth:`runs`) and, only when some run is vectorised, every level's
        :meth:`bounds` (a deep chain is all thin runs and never reads them; they are one
        tuple per level, 10,000 for a 10,000-step chain)."""
        runs = self.runs()
        return runs, self.bounds() if any(thin is None for thin, _ in runs) else []

    def bounds(self) -> list[Bounds]:
        """Every level's :data:`Bounds`, in level order."""
        return list(
            zip(
                self.links[:-1],
                self.links[1:],
                self.segs[:-1],
                self.segs[1:],
                self.cross[:-1],
                self.cross[1:],
                strict=True,
            )
        )

    def runs(self) -> list[tuple[Run | None, range]]:
        """The levels in order, as runs: a thin run (:mod:`fieldlog.engine.thin_levels`) with
        its levels, or ``None`` with levels for the vectorised loop."""
        out: list[tuple[Run | None, range]] = []
        for g0, g1, thin in thin_levels.runs(
            self.links, thin_levels.THIN_LINKS, thin_levels.MIN_LEVELS
        ):
            if thin:
                lk, sg, cr = self.links, self.segs, self.cross
                out.append((Run(lk[g0], lk[g1], sg[g0], sg[g1], cr[g0], cr[g1]), range(g0, g1)))
            else:
                out.append((None, range(g0, g1)))
        return out


def _levels(owner: np.ndarray, level: np.ndarray, cross: np.ndarray) -> _Levels:
    """Group links sorted by (level of ``owner``, ``owner``): ``owner`` is the activity each
    link updates (the successor going forward, the predecessor going back)."""
    if not owner.size:
        return _Levels(owner, owner, owner, [0], [0], [0], owner, owner)
    first = _changes(owner)
    targets = owner[first]
    seg_bounds = np.append(_changes(level[targets]), targets.size)
    link_bounds = np.append(first[seg_bounds[:-1]], owner.size)
    level_first = link_bounds[:-1]
    cross_at = np.flatnonzero(cross)
    cross_bounds = np.searchsorted(cross_at, link_bounds)
    return _Levels(
        targets=targets,
        starts=first - np.repeat(level_first, np.diff(seg_bounds)),
        first=first,
        links=link_bounds.tolist(),
        segs=seg_bounds.tolist(),
        cross=cross_bounds.tolist(),
        cross_at=cross_at,
        cross_in=cross_at - np.repeat(level_first, np.diff(cross_bounds)),
    )


def _links(
    lv: _Levels,
    source: np.ndarray,
    add: np.ndarray,
    t_dur: np.ndarray,
    x_from: np.ndarray,
    x_to: np.ndarray,
    x_add: np.ndarray,
) -> Links:
    """A pass's arrays for :mod:`fieldlog.engine.thin_levels`."""
    return Links(source, add, lv.first, lv.targets, t_dur, lv.cross_at, x_from, x_to, x_add)


def _changes(values: np.ndarray) -> np.ndarray:
    """Positions where a run of equal values starts (``values`` is not empty)."""
    starts = np.empty(values.size, dtype=bool)
    starts[0] = True
    np.not_equal(values[1:], values[:-1], out=starts[1:])
    return np.flatnonzero(starts)


def _tie_bits(count: int) -> tuple[int, np.ndarray]:
    """Shift and low bits that pack a bound with its position among ``count`` links.

    A packed value is ``bound << shift | (2**shift - 1 - position)``: the maximum of packed
    values is the maximum bound and, among equal bounds, the smallest position (the first link
    in file order). ``>> shift`` gives the bound back (arithmetic shift: negative bounds too)
    and :func:`_position` the position.
    """
    shift = max(1, count.bit_length())
    return shift, (1 << shift) - 1 - np.arange(count, dtype=np.int64)


def _position(packed: np.ndarray, shift: int) -> np.ndarray:
    """The position packed with :func:`_tie_bits`."""
    mask = (1 << shift) - 1
    return mask - (packed & mask)


def forward(
    net: NetworkArrays,
    tables: CalendarTables,
    start: Start,
    *,
    override: bool,
    lag_on_successor: bool,
) -> Early:
    """Early start and finish points, the driving link and the milestone reading flags."""
    n = net.size
    fin, run, dur, floor = start.finished, start.in_progress, start.duration, start.floor
    check_reach(net, tables, dur, floor, ~(fin | run))
    pred, succ, lag = net.pred, net.succ, net.lag
    # Links that bind: none into finished work; into work in progress none from finished work
    # (history) and, with progress override, none at all.
    live = ~fin[succ]
    source = pred + n * ~net.reads_start
    if run.any():
        live &= ~(run[succ] & (override | fin[pred]))
        # an SS or SF link from work in progress reads its actual start
        source = np.where(net.reads_start & run[pred], 2 * n + pred, source)
    finish_shift = np.where(net.bounds_finish, dur[succ], 0)
    # Same calendar: bound = source + lag - shift. Across calendars the lag is added before
    # (predecessor's calendar) or after (successor's) moving the point, see fieldlog.engine.cpm.
    add = np.where(net.cross, 0 if lag_on_successor else lag, lag - finish_shift)
    keep = np.flatnonzero(live)
    source, add, owner = source[keep], add[keep], succ[keep]
    lv = _levels(owner, net.level, net.cross[keep])
    xs = keep[lv.cross_at]
    x_source, x_from, x_to = source[lv.cross_at], net.calendar[pred[xs]], net.calendar[succ[xs]]
    x_add = (lag[xs] if lag_on_successor else 0) - finish_shift[xs]
    t_floor, t_dur = floor[lv.targets], dur[lv.targets]
    milestone = t_dur == 0
    has_milestone = (
        np.logical_or.reduceat(milestone, lv.segs[:-1]).tolist() if milestone.size else []
    )
    shift, tie = _tie_bits(owner.size)

    points = np.stack([floor, floor + dur, start.actual_start])
    flat = points.reshape(-1)
    flags = np.zeros((3, n), dtype=bool)
    flags[1] = fin | (dur != 0)  # work ends "after its last day"; milestones see below
    flag_flat = flags.reshape(-1)
    best = np.full(n, _NOTHING, dtype=np.int64)

    inputs = ForwardInputs(
        _links(lv, source, add, t_dur, x_from, x_to, x_add), shift, t_floor, x_source
    )
    runs, bounds = lv.plan()
    for thin, levels in runs:
        if thin is not None:
            thin_levels.forward_run(inputs, thin, points, flags, best, tables)
            continue
        for g in levels:
            a, b, s0, s1, c0, c1 = bounds[g]
            bound = flat[source[a:b]]
            bound += add[a:b]
            if c1 > c0:
                x = lv.cross_in[c0:c1]
                bound[x] = (
                    tables.move(bound[x], flag_flat[x_source[c0:c1]], x_from[c0:c1], x_to[c0:c1])
                    + x_add[c0:c1]
                )
            bound <<= shift
            bound |= tie[a:b]
            top = np.maximum.reduceat(bound, lv.starts[s0:s1])
            who = lv.targets[s0:s1]
            es = np.maximum(top >> shift, t_floor[s0:s1])
            points[0, who] = es
            es += t_dur[s0:s1]
            points[1, who] = es
            best[who] = top
            if has_milestone[g]:  # the end of the work driving it, or the start of its day
                ms = milestone[s0:s1]
                t = top[ms]
                after = flag_flat[source[_position(t, shift)]] & ((t >> shift) > t_floor[s0:s1][ms])
                flags[0, who[ms]] = after
                flags[1, who[ms]] = after

    wins = np.flatnonzero((best != _NOTHING) & ((best >> shift) >= floor))
    driver = np.full(n, -1, dtype=np.int64)
    driver[wins] = net.link[keep[_position(best[wins], shift)]]
    return Early(points[0], points[1], driver, flags[0], flags[1])


def backward(
    net: NetworkArrays,
    tables: CalendarTables,
    start: Start,
    early: Early,
    latest: np.ndarray,
    slack: np.ndarray,
    *,
    override: bool,
    lag_on_successor: bool,
) -> tuple[np.ndarray, np.ndarray]:
    """Late finish points and free slack of open work.

    Args:
        latest: per activity the latest finish point the dates allow (required or forecast
            finish, finish not after), on the activity's calendar.
        slack: per activity the free slack the dates allow (before the forecast finish).

    Returns:
        ``(late finish, free slack)``; the values of finished work mean nothing.
    """
    n = net.size
    fin, run, dur = start.finished, start.in_progress, start.duration
    pred, succ, rs = net.pred, net.succ, net.reads_start
    # Links that bind going back: between open activities, not into work in progress under
    # progress override, and not from the (fixed) actual start of work in progress.
    live = ~fin[pred] & ~fin[succ] & ~(rs & run[pred])
    if override:
        live &= ~run[succ]
    keep = net.by_pred[live[net.by_pred]]
    owner, lag, cross = pred[keep], net.lag[keep], net.cross[keep]
    lv = _levels(owner, net.level, cross)
    source = (succ + n * net.bounds_finish)[keep]  # the successor's start or finish
    own = (pred + n * ~rs)[keep]  # the predecessor's own start (SS, SF) or finish
    # Across calendars the lag is taken off before (successor's calendar) or after
    # (predecessor's) moving the point back; the predecessor's own terms always after.
    lag_before = np.where(cross, -lag if lag_on_successor else 0, -lag)
    lag_after = np.where(cross, 0 if lag_on_successor else -lag, 0)
    xs = lv.cross_at
    x_after = np.concatenate([early.start_after, early.end_after])[own[xs]]
    x_from, x_to = net.calendar[succ[keep[xs]]], net.calendar[owner[xs]]

    # Free slack needs early dates only: every link at once, then the least per predecessor.
    e_flat = np.concatenate([early.start, early.finish])
    own_early = -e_flat[own]
    q = e_flat[source] + np.where(cross, lag_before, lag_before + own_early)
    q[xs] = tables.move_back(q[xs], x_after, x_from, x_to) + (lag_after + own_early)[xs]
    slack = slack.copy()
    if owner.size:
        first = _changes(owner)
        who = owner[first]
        slack[who] = np.minimum(slack[who], np.minimum.reduceat(q, first))

    # Late dates, level by level from the end.
    own_late = np.where(rs[keep], dur[owner], 0)
    add = np.where(cross, lag_before, lag_before + own_late)
    x_add = (lag_after + own_late)[xs]
    t_latest, t_dur = latest[lv.targets], dur[lv.targets]
    late = np.stack([latest - dur, latest])
    flat = late.reshape(-1)
    inputs = BackwardInputs(_links(lv, source, add, t_dur, x_from, x_to, x_add), t_latest, x_after)
    runs, bounds = lv.plan()
    for thin, levels in reversed(runs):
        if thin is not None:
            thin_levels.backward_run(inputs, thin, late, tables)
            continue
        for g in reversed(levels):
            a, b, s0, s1, c0, c1 = bounds[g]
            bound = flat[source[a:b]]
            bound += add[a:b]
            if c1 > c0:
                x = lv.cross_in[c0:c1]
                bound[x] = (
                    tables.move_back(bound[x], x_after[c0:c1], x_from[c0:c1], x_to[c0:c1])
                    + x_add[c0:c1]
                )
            who = lv.targets[s0:s1]
            lf = np.minimum(np.minimum.reduceat(bound, lv.starts[s0:s1]), t_latest[s0:s1])
            late[1, who] = lf
            lf -= t_dur[s0:s1]
            late[0, who] = lf
    return late[1], slack
