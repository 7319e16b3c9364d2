"""A site compiled once for the engine and the lookahead: lookups and arrays, built once.

A :class:`~fieldlog.site.model.Site` is what the files say. Scheduling it needs other shapes of
the same facts: activity positions by id, the precedence network as numpy arrays grouped by
level (:mod:`fieldlog.engine.network_arrays`), the per-activity columns a result row copies,
and the links out of and into each activity (levelling walks them). Building those shapes
costs more than one recompute, and the app recomputes after every journal entry, so they are
built once into one frozen :class:`CompiledSite` and passed to whoever needs them:
``fieldlog/workspace.py`` compiles the site once and the engine, its results and the
lookahead read the same value. Nothing is kept on the Site itself.

The network is built up front (every schedule needs it); the other shapes are built on first
use and then kept (``cached_property``), because each command needs only some of them: the
float list never walks the links out of an activity, the lookahead does.

A new schedule revision is a new Site and needs a new compile. The value pickles as the site
and the network only (the site cache, :mod:`fieldlog.site.cache`, stores it so): the other
shapes cost less to derive again from the site than to read back from a file.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from functools import cached_property
from itertools import groupby
from operator import attrgetter
from typing import Any

import numpy as np

from fieldlog.engine.network_arrays import NetworkArrays, build_network
from fieldlog.engine.topology import LinkEnds
from fieldlog.site.model import Activity, Link, Site


@dataclass(frozen=True, eq=False)
class CompiledSite:
    """One site in the shapes the engine and the lookahead read (see module docstring)."""

    site: Site
    net: NetworkArrays
    """The precedence network as arrays, positions as ``site.activities``."""

    def __reduce__(self) -> tuple[Any, ...]:
        # The site and the network only: the shapes below are rebuilt on first use.
        return (CompiledSite, (self.site, self.net))

    @cached_property
    def by_id(self) -> Mapping[str, Activity]:
        """Activity id -> activity."""
        return dict(zip(self.net.ids, self.site.activities, strict=True))

    @cached_property
    def names(self) -> list[str]:
        """Activity names, by position (copied into result rows)."""
        return list(map(_NAME, self.site.activities))

    @cached_property
    def calendars(self) -> list[str]:
        """Calendar name of each activity, by position."""
        return list(map(_CALENDAR, self.site.activities))

    @cached_property
    def durations(self) -> list[int]:
        """Planned working days, by position."""
        return list(map(_DURATION, self.site.activities))

    @cached_property
    def links(self) -> np.ndarray:
        """``site.links`` as an object array, so a result can pick many driving links at once."""
        links = np.empty(len(self.site.links), dtype=object)
        links[:] = self.site.links
        return links

    @cached_property
    def link_preds(self) -> np.ndarray:
        """The predecessor id of each link in ``site.links``, as an object array."""
        return np.array(list(map(_PRED, self.site.links)), dtype=object)

    @cached_property
    def links_out(self) -> Mapping[str, tuple[Link, ...]]:
        """Links from each activity that has any, in file order."""
        return _grouped(self.site.links, _PRED)

    @cached_property
    def links_in(self) -> Mapping[str, tuple[Link, ...]]:
        """Links into each activity that has any, in file order."""
        return _grouped(self.site.links, _SUCC)


def compile_site(site: Site, ends: LinkEnds | None = None) -> CompiledSite:
    """The compiled form of ``site``: its network now, the other shapes on first use.

    ``ends``: the site's link ends as the loader found them (see
    :class:`~fieldlog.engine.topology.LinkEnds`), so they are not worked out twice.
    """
    return CompiledSite(site=site, net=build_network(site, ends))


_NAME, _CALENDAR, _DURATION = (attrgetter(a) for a in ("name", "calendar", "duration"))
_PRED, _SUCC = attrgetter("pred"), attrgetter("succ")


def _grouped(links: tuple[Link, ...], end: attrgetter[str]) -> dict[str, tuple[Link, ...]]:
    """``links`` by the activity at ``end``, each group in file order (the sort is stable).

    A stable sort and ``groupby`` rather than a Python loop per link: a 200,000-activity
    site has 400,000 links.
    """
    return {aid: tuple(group) for aid, group in groupby(sorted(links, key=end), end)}


def compiled(site: Site | CompiledSite) -> CompiledSite:
    """``site`` itself when it is compiled already, else compiled now.

    For the public entry points that callers and tests may hand a plain Site; the workspace
    and the app pass the compiled value so that nothing is built twice.
    """
    return site if isinstance(site, CompiledSite) else compile_site(site)
