"""A quick proof that a forward pass will run past its calendars, before running it.

The engine builds calendars over a date range and widens it when a pass runs outside
(``fieldlog.engine.cpm.compute_schedule``). A network much deeper than the first range (years
of work in one long sequence) then pays for one or two forward passes that fail part way. This
module finds, once per network, one long path of links whose bound is easy to bound from
below: finish-to-start and start-to-start links with no lead, from work that takes time.
Along such a link the successor's start date is at least the predecessor's start date plus
the predecessor's duration (FS) and the lag, in calendar days, because ``k`` working days of
any calendar span at least ``k`` calendar days (an FS successor starts on or after the day
after the predecessor's last working day, which is at least ``duration - 1`` days after its
first). When the whole path is on one calendar the sum is exact in that calendar's working
days (a link's bound is its source point plus the lag), which proves much more: a chain of
one-day activities on a five-day week needs 7/5 of its length in calendar days. If the sum,
counted from the path's first start, lands after the calendars' last day, the last
activity's dates are outside them and the forward pass would raise
:class:`~fieldlog.engine.calendars.HorizonExceeded`; it is raised at once instead. Only the
part of the path after its last started or finished activity counts (links between waiting
work always bind); when nothing is proved the pass runs and decides.
tests/test_cpm_deep.py checks that a proof never fires where the pass would have fitted.
"""

from __future__ import annotations

import weakref
from typing import NamedTuple

import numpy as np

from fieldlog.engine.calendar_tables import CalendarTables
from fieldlog.engine.calendars import HorizonExceeded
from fieldlog.engine.network_arrays import NetworkArrays


class Path(NamedTuple):
    """Activities ``acts`` (first to last) joined by the links ``links`` (positions in the
    network's link arrays); ``acts[k]`` is the predecessor of ``links[k]``."""

    acts: np.ndarray
    links: np.ndarray


_PATHS: weakref.WeakKeyDictionary[NetworkArrays, Path] = weakref.WeakKeyDictionary()


def long_path(net: NetworkArrays) -> Path:
    """A long path of bounded links (see module docstring), found once per network.

    Each activity keeps the bounded link into it from the predecessor of highest level; the
    walk starts at the activity of highest level with work and follows those links back.
    """
    got = _PATHS.get(net)
    if got is not None:
        return got
    ok = ~net.bounds_finish & (net.lag >= 0) & (net.duration[net.pred] > 0)
    cand = np.flatnonzero(ok)
    choice = np.full(net.size, -1, dtype=np.int64)
    if cand.size:
        order = cand[np.lexsort((net.level[net.pred[cand]], net.succ[cand]))]
        choice[net.succ[order]] = order  # the last write per successor: the highest level
    work = np.flatnonzero(net.duration > 0)
    acts: list[int] = []
    links: list[int] = []
    if work.size:
        k = int(work[np.argmax(net.level[work])])
        acts.append(k)
        chosen, preds = choice.tolist(), net.pred.tolist()
        while chosen[k] >= 0:
            links.append(chosen[k])
            k = preds[chosen[k]]
            acts.append(k)
    got = _PATHS[net] = Path(
        np.array(acts[::-1], dtype=np.int64), np.array(links[::-1], dtype=np.int64)
    )
    return got


def check_reach(
    net: NetworkArrays,
    tables: CalendarTables,
    duration: np.ndarray,
    floor: np.ndarray,
    waiting: np.ndarray,
) -> None:
    """Raise :class:`HorizonExceeded` when the long path provably ends after ``tables``.

    Args:
        duration: working days per activity in this pass.
        floor: earliest start point per activity (dates, data date).
        waiting: activities neither started nor finished (their links all bind).
    """
    path = long_path(net)
    acts, links = path.acts, path.links
    moved = np.flatnonzero(~waiting[acts])
    if moved.size:  # only the part after the last work that has started binds for certain
        acts, links = acts[moved[-1] + 1 :], links[moved[-1] + 1 :]
    if links.size < 2:
        return
    pred, last = acts[:-1], int(acts[-1])
    step = net.lag[links] + np.where(net.reads_start[links], 0, duration[pred])
    if duration[last] <= 0:
        return
    first = int(acts[0])
    cal, at = int(net.calendar[first]), int(floor[first])
    if not 0 <= at < int(tables.length[cal]):
        return  # the pass itself decides
    if (net.calendar[acts] == cal).all():
        # One calendar: a link's bound is its source point plus the lag, exactly (passes),
        # so the last activity's last working day is at least this point of the calendar.
        past = at + int(step.sum()) + int(duration[last]) - 1 >= int(tables.length[cal])
    else:  # several calendars: each step spans at least its length in calendar days
        past = int(tables.work[cal, at]) + int(step.sum()) >= tables.origin + tables.before.shape[1]
    if past:
        raise HorizonExceeded("calendar tables (a long path runs past them)")
