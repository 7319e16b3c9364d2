"""A site compiled once for the engine and the lookahead: lookups and arrays, built up front.

A :class:`~fieldlog.site.model.Site` is what the files say. Scheduling it needs other shapes of
the same facts: activity positions by id, the precedence network as numpy arrays grouped by
level (:mod:`fieldlog.engine.network_arrays`), the per-activity columns a result row copies,
and the links out of and into each activity (levelling walks them). Building those shapes
costs more than one recompute, and the app recomputes after every journal entry, so they are
built once into one frozen :class:`CompiledSite` and passed to whoever needs them:
``fieldlog/workspace.py`` compiles the site once and the engine, its results and the
lookahead read the same value. Nothing is kept on the Site itself.

A new schedule revision is a new Site and needs a new compile. The value holds only plain
containers and numpy arrays, so it pickles (the site's read-only mappings need the pickling
rules of :mod:`fieldlog.site.cache`, as the Site does).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from itertools import groupby
from operator import attrgetter

import numpy as np

from fieldlog.engine.network_arrays import NetworkArrays, build_network
from fieldlog.site.model import Activity, Link, Site


@dataclass(frozen=True, eq=False)
class CompiledSite:
    """One site in the shapes the engine and the lookahead read (see module docstring)."""

    site: Site
    net: NetworkArrays
    """The precedence network as arrays, positions as ``site.activities``."""
    by_id: Mapping[str, Activity]
    """Activity id -> activity."""
    names: list[str]
    """Activity names, by position (copied into result rows)."""
    calendars: list[str]
    """Calendar name of each activity, by position."""
    durations: list[int]
    """Planned working days, by position."""
    links: np.ndarray
    """``site.links`` as an object array, so a result can pick many driving links at once."""
    link_preds: np.ndarray
    """The predecessor id of each link in ``site.links``, as an object array."""
    links_out: Mapping[str, tuple[Link, ...]]
    """Links from each activity that has any, in file order."""
    links_in: Mapping[str, tuple[Link, ...]]
    """Links into each activity that has any, in file order."""


def compile_site(site: Site) -> CompiledSite:
    """Everything the engine and the lookahead derive from ``site``, built once.

    Built with C-level loops (``map``, ``zip``, a stable sort and ``groupby``) rather than a
    Python loop per link: on a 200,000-activity site there are 400,000 links.
    """
    acts, site_links = site.activities, site.links
    links = np.empty(len(site_links), dtype=object)
    links[:] = site_links
    ids = list(map(_ID, acts))
    return CompiledSite(
        site=site,
        net=build_network(site),
        by_id=dict(zip(ids, acts, strict=True)),
        names=list(map(_NAME, acts)),
        calendars=list(map(_CALENDAR, acts)),
        durations=list(map(_DURATION, acts)),
        links=links,
        link_preds=np.array(list(map(_PRED, site_links)), dtype=object),
        links_out=_grouped(site_links, _PRED),
        links_in=_grouped(site_links, _SUCC),
    )


_ID, _NAME, _CALENDAR, _DURATION = (attrgetter(a) for a in ("id", "name", "calendar", "duration"))
_PRED, _SUCC = attrgetter("pred"), attrgetter("succ")


def _grouped(links: tuple[Link, ...], end: attrgetter[str]) -> dict[str, tuple[Link, ...]]:
    """``links`` by the activity at ``end``, each group in file order (the sort is stable)."""
    return {aid: tuple(group) for aid, group in groupby(sorted(links, key=end), end)}


def compiled(site: Site | CompiledSite) -> CompiledSite:
    """``site`` itself when it is compiled already, else compiled now.

    For the public entry points that callers and tests may hand a plain Site; the workspace
    and the app pass the compiled value so that nothing is built twice.
    """
    return site if isinstance(site, CompiledSite) else compile_site(site)
