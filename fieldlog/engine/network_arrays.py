"""The precedence network as numpy arrays, built once per site (into its compiled form).

The passes in :mod:`fieldlog.engine.passes` work one *level* at a time: an activity's level is the
number of links on the longest chain of links leading to it, so every predecessor of an
activity sits on a lower level and every successor on a higher one. All activities of a level
can then be scheduled at once: their predecessors are already done.

For that the links are stored as parallel arrays sorted by (successor's level, successor, order
in schedule.toml). Within one successor the file order is kept on purpose: when two links give
the same early start, the first one in the file is the driving link, as it always was.
``by_pred`` is the same links grouped by (predecessor's level, predecessor) for the backward
pass.

A site value never changes, so the arrays are built once, into
:class:`fieldlog.engine.compiled.CompiledSite`; a new revision is a new site value and is
compiled again.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from fieldlog.engine.topology import levels, topological_order
from fieldlog.site.model import LinkType, Site

_READS_START = frozenset({LinkType.SS, LinkType.SF})
"""Link types that read the predecessor's start (the others read its finish)."""
_BOUNDS_FINISH = frozenset({LinkType.FF, LinkType.SF})
"""Link types that bound the successor's finish (the others bound its start)."""


@dataclass(frozen=True, eq=False)
class NetworkArrays:
    """A site's activities and links as arrays (positions follow ``site.activities``)."""

    size: int
    """Number of activities."""
    ids: tuple[str, ...]
    index: Mapping[str, int]
    """Activity id -> position."""
    calendar_names: tuple[str, ...]
    """The site's calendars, in the order of ``site.calendars``."""
    calendar: np.ndarray
    """Calendar number of each activity (index into ``calendar_names``)."""
    duration: np.ndarray
    """Planned working days."""
    start_not_before: np.ndarray
    """Date ordinal, or 0 where the activity has none (no real date has ordinal 0)."""
    finish_not_after: np.ndarray
    """Date ordinal, or 0 where the activity has none."""
    level: np.ndarray
    """Links on the longest chain of links leading to the activity."""
    total_work: int
    """Sum of durations and positive lags: a bound on how far the schedule can reach."""
    # The links, sorted by (successor's level, successor, file order):
    link: np.ndarray
    """Index of the link in ``site.links``."""
    pred: np.ndarray
    succ: np.ndarray
    reads_start: np.ndarray
    """SS and SF: the link reads the predecessor's start."""
    bounds_finish: np.ndarray
    """FF and SF: the link bounds the successor's finish."""
    lag: np.ndarray
    """Working days; negative is a lead."""
    cross: np.ndarray
    """The two ends are on different calendars."""
    by_pred: np.ndarray
    """The positions above, reordered by (predecessor's level, predecessor)."""

    @cached_property
    def rank(self) -> np.ndarray:
        """Position of each activity in :func:`fieldlog.engine.topology.topological_order`.

        Only needed to break a tie between activities that end the job together (see
        ``fieldlog.engine.cpm._driving_path``), so it is sorted on first use rather than up front: a
        plain Python sort costs more than the whole recompute on a large site.
        """
        ids = self.ids
        edges = zip(
            map(ids.__getitem__, self.pred.tolist()),
            map(ids.__getitem__, self.succ.tolist()),
            strict=True,
        )
        # The links are in level order here, not file order; the sort does not depend on
        # link order (it takes released activities in file order).
        order, cycle = topological_order(ids, edges)
        assert cycle is None, "site_files refuses loops"
        rank = np.empty(self.size, dtype=np.int64)
        rank[[self.index[a] for a in order]] = np.arange(self.size)
        return rank


def build_network(site: Site) -> NetworkArrays:
    """The arrays of ``site`` (see module docstring)."""
    acts, links = site.activities, site.links
    ids = tuple(a.id for a in acts)
    index = {aid: k for k, aid in enumerate(ids)}
    n = len(ids)
    calendar_names = tuple(site.calendars)
    number = {name: k for k, name in enumerate(calendar_names)}
    calendar = np.array([number[a.calendar] for a in acts], dtype=np.int64)
    duration = np.array([a.duration for a in acts], dtype=np.int64)
    snb = np.array(
        [a.start_not_before.toordinal() if a.start_not_before else 0 for a in acts], dtype=np.int64
    )
    fna = np.array(
        [a.finish_not_after.toordinal() if a.finish_not_after else 0 for a in acts], dtype=np.int64
    )

    pred = np.array([index[lk.pred] for lk in links], dtype=np.int64)
    succ = np.array([index[lk.succ] for lk in links], dtype=np.int64)
    lag = np.array([lk.lag for lk in links], dtype=np.int64)
    level = _levels(n, pred, succ)

    file_order = np.arange(len(links))
    fwd = np.lexsort((file_order, succ, level[succ]))  # the last key sorts first
    pred, succ, lag = pred[fwd], succ[fwd], lag[fwd]
    types = [links[k].type for k in fwd.tolist()]
    return NetworkArrays(
        size=n,
        ids=ids,
        index=index,
        calendar_names=calendar_names,
        calendar=calendar,
        duration=duration,
        start_not_before=snb,
        finish_not_after=fna,
        level=level,
        total_work=int(duration.sum() + lag[lag > 0].sum()),
        link=fwd,
        pred=pred,
        succ=succ,
        reads_start=np.array([t in _READS_START for t in types], dtype=bool),
        bounds_finish=np.array([t in _BOUNDS_FINISH for t in types], dtype=bool),
        lag=lag,
        cross=calendar[pred] != calendar[succ],
        by_pred=np.lexsort((pred, level[pred])),
    )


def _levels(n: int, pred: np.ndarray, succ: np.ndarray) -> np.ndarray:
    """Longest chain of links into each activity (:func:`fieldlog.engine.topology.levels`)."""
    level = levels(n, pred, succ)
    assert level is not None, "site_files refuses loops"
    return level.astype(np.int64)
