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

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from datetime import date
from functools import cached_property
from operator import attrgetter

import numpy as np

from fieldlog.engine.topology import LinkEnds, link_ends, topological_order
from fieldlog.site.model import LinkType, Site

_READS_START = frozenset({LinkType.SS, LinkType.SF})
"""Link types that read the predecessor's start (the others read its finish)."""
_BOUNDS_FINISH = frozenset({LinkType.FF, LinkType.SF})
"""Link types that bound the successor's finish (the others bound its start)."""

_TYPE_CODE = {t: k for k, t in enumerate(LinkType)}
"""A small number per link type, so the two flags above are one array lookup per network."""
_READS_START_BY_CODE = np.array([t in _READS_START for t in LinkType], dtype=bool)
_BOUNDS_FINISH_BY_CODE = np.array([t in _BOUNDS_FINISH for t in LinkType], dtype=bool)
_ID, _CALENDAR, _DURATION = (attrgetter(a) for a in ("id", "calendar", "duration"))
_SNB, _FNA = attrgetter("start_not_before"), attrgetter("finish_not_after")
_PRED, _SUCC, _LAG, _TYPE = (attrgetter(a) for a in ("pred", "succ", "lag", "type"))


def _ordinal(day: date | None) -> int:
    """A date's ordinal, 0 for none (no real date has ordinal 0)."""
    return day.toordinal() if day else 0


def _ordinals(days: Iterable[date | None], n: int) -> np.ndarray:
    """The ordinals of ``n`` dates or Nones (see :func:`_ordinal`); most activities have no
    date constraint, and a column of Nones is all zeros without a call per activity."""
    column = list(days)
    if not any(column):
        return np.zeros(n, dtype=np.int64)
    return np.fromiter(map(_ordinal, column), np.int64, n)


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


def build_network(site: Site, ends: LinkEnds | None = None) -> NetworkArrays:
    """The arrays of ``site`` (see module docstring); ``ends``: its links' ends as the
    loader's loop test found them (:func:`fieldlog.site.schema.build_site_and_ends`), else
    worked out here."""
    acts, links = site.activities, site.links
    ids = tuple(map(_ID, acts))
    n = len(ids)
    index = dict(zip(ids, range(n), strict=True))
    calendar_names = tuple(site.calendars)
    number = {name: k for k, name in enumerate(calendar_names)}
    calendar = np.fromiter(map(number.__getitem__, map(_CALENDAR, acts)), np.int64, n)
    duration = np.fromiter(map(_DURATION, acts), np.int64, n)
    snb, fna = _ordinals(map(_SNB, acts), n), _ordinals(map(_FNA, acts), n)

    m = len(links)
    ends = ends or link_ends(index, links)
    assert len(ends.pred) == m, "the link ends belong to another site"
    assert ends.level is not None, "site_files refuses loops"
    pred, succ, level = ends.pred, ends.succ, ends.level
    lag = np.fromiter(map(_LAG, links), np.int64, m)
    code = np.fromiter(map(_TYPE_CODE.__getitem__, map(_TYPE, links)), np.int8, m)

    file_order = np.arange(m)
    fwd = np.lexsort((file_order, succ, level[succ]))  # the last key sorts first
    pred, succ, lag, code = pred[fwd], succ[fwd], lag[fwd], code[fwd]
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
        reads_start=_READS_START_BY_CODE[code],
        bounds_finish=_BOUNDS_FINISH_BY_CODE[code],
        lag=lag,
        cross=calendar[pred] != calendar[succ],
        by_pred=np.lexsort((pred, level[pred])),
    )
