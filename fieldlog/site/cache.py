"""A persistent cache of validated sites, so a big schedule is parsed once, not on every command.

Reading ``schedule.toml`` is most of the time of ``fieldlog schedule`` on a large job: tomllib
takes about 0.6 s for 10,000 activities, while the CPM pass and the printing take a fraction
of that. The office changes the schedule once per revision; the field runs commands many
times a day. So the validated :class:`~fieldlog.site.model.Site` is kept, pickled, in the user's
cache folder and found again by the content of the two files, together with the engine's
compiled form of it (:class:`~fieldlog.engine.compiled.CompiledSite`: the network as arrays),
which costs about as much as the rest of a warm command to build. Activities and links are
stored as columns (:func:`_reduce_site`), not as 600,000 pickled objects on a big site.

Where: ``$FIELDLOG_HOME/cache`` when ``FIELDLOG_HOME`` is set, otherwise the platform's cache
folder (``%LOCALAPPDATA%\\fieldlog\\cache`` on Windows, ``$XDG_CACHE_HOME/fieldlog`` or
``~/.cache/fieldlog`` elsewhere). Never inside a site folder: site folders are synced to the
office and copied to USB sticks, and a cache there would travel with them.

Key: the sha256 of ``site.toml`` and ``schedule.toml`` bytes, fieldlog's version, the Python
version and a digest of the code that shapes a Site and its compiled form (this module,
``files``, ``schema``, ``toml_file``, ``model`` and the engine's ``compiled``,
``network_arrays`` and ``topology``), so an upgrade or an edited rule never serves an old
answer.

Safety: each file is written to a temp file in the same folder and moved into place with
``os.replace``, so a reader sees a whole file or none. Each file starts with a header holding
its key and the sha256 of its payload; a file that is truncated, damaged, from another
version, or does not unpickle to a compiled Site is a miss: it is deleted and rebuilt. Only
sites that passed validation are stored; errors are always raised again from the files. At most
:data:`KEEP` files are kept (most recently used first).

Pickle runs code from the file it reads. That is acceptable here: the folder belongs to the
user who runs fieldlog, as their shell history and configuration do, and nothing is ever read
from a site folder or a synced location.
"""

from __future__ import annotations

import copyreg
import dataclasses
import functools
import hashlib
import os
import sys
import warnings
from array import array
from collections.abc import Callable
from operator import attrgetter
from pathlib import Path
from types import MappingProxyType
from typing import TYPE_CHECKING, Any

from fieldlog import __version__
from fieldlog.cache_files import pickled, prune, remove, replace_file, unpickle
from fieldlog.home import HOME_ENV, fieldlog_home
from fieldlog.site.model import Activity, Link, LinkType, Site, from_columns

if TYPE_CHECKING:  # the engine (and numpy) is imported only when an entry is read or built
    from fieldlog.engine.compiled import CompiledSite

CACHE_SUBFOLDER = "cache"
"""Sub-folder of ``$FIELDLOG_HOME`` that holds the cache."""

KEEP = 8
"""How many cached sites are kept; the least recently used go first."""

FORMAT = 3
"""Bump when the file layout below changes."""

_MAGIC = b"fieldlog-site-cache\n"
_PREFIX, _SUFFIX = "site-", ".pickle"
_SHAPING_MODULES = (
    "site/cache.py",
    "site/files.py",
    "site/schema.py",
    "site/bulk.py",
    "site/toml_file.py",
    "site/model.py",
    "engine/compiled.py",
    "engine/network_arrays.py",
    "engine/topology.py",
    "bounds.py",
    "guarded_read.py",
    "fast_toml.py",
)
"""Source files (under fieldlog/) whose code decides what a cached entry holds. The limits
(``bounds.py``) and the readers decide what a site may hold at all: a site cached before a
limit was tightened must not be served after (a name with a terminal escape once was)."""


class SiteCacheWarning(UserWarning):
    """The cache folder cannot be used; the site was loaded from its files as usual."""


def cache_folder() -> Path:
    """The folder that holds cached sites (not created here)."""
    if os.environ.get(HOME_ENV):
        return fieldlog_home() / CACHE_SUBFOLDER
    if sys.platform == "win32":
        base = Path(os.environ.get("LOCALAPPDATA") or Path.home() / "AppData" / "Local")
        return base / "fieldlog" / "cache"
    return Path(os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache") / "fieldlog"


def cache_key(site_raw: bytes, schedule_raw: bytes) -> str | None:
    """The cache key of the two files' bytes, or None when caching is off (see _code_digest)."""
    code = _code_digest()
    if code is None:
        return None
    h = hashlib.sha256()
    # Lengths keep the two files apart: "ab" + "c" and "a" + "bc" must not share a key.
    for part in (
        f"{FORMAT}|{__version__}|{sys.version}|{code}".encode(),
        len(site_raw).to_bytes(8, "big"),
        site_raw,
        schedule_raw,
    ):
        h.update(part)
    return h.hexdigest()


def cached_site(
    site_raw: bytes, schedule_raw: bytes, build: Callable[[], CompiledSite]
) -> CompiledSite:
    """The compiled Site for these bytes from the cache, else ``build()`` (then stored).

    ``build`` parses and validates; whatever it raises is raised unchanged and nothing is
    stored. Problems with the cache folder itself (not writable, full) are reported with a
    :class:`SiteCacheWarning` and never stop the command.
    """
    key = cache_key(site_raw, schedule_raw)
    if key is None:
        return build()
    path = cache_folder() / f"{_PREFIX}{key}{_SUFFIX}"
    site = read_entry(path, key)
    if site is not None:
        return site
    site = build()
    write_entry(path, key, site)
    return site


# --- reading ------------------------------------------------------------------------------


def read_entry(path: Path, key: str) -> Any:
    """The value (a compiled Site, or a Site) stored in ``path`` under ``key``; None (and the
    file deleted) when unusable."""
    try:
        data = path.read_bytes()
    except (FileNotFoundError, NotADirectoryError):
        return None  # not cached yet (a folder that cannot hold a cache is reported on write)
    except OSError as exc:
        _warn(f"cannot read the site cache {path}: {exc.strerror}")
        return None
    site = _decode(data, key)
    if site is None:
        _remove(path)
        return None
    try:
        os.utime(path)  # most recently used: kept longest by prune
    except OSError as exc:  # FileNotFoundError too: another process pruned it meanwhile
        _warn(f"cannot mark the site cache {path} as used: {exc.strerror}")
    return site


def _decode(data: bytes, key: str) -> Any:
    """The value in a cache file's bytes, or None when they are not a whole, matching entry."""
    header = _MAGIC + key.encode("ascii") + b"\n"
    digest_end = len(header) + 32
    if not data.startswith(header) or len(data) < digest_end:
        return None  # another format, version or key, or cut short in the header
    payload = data[digest_end:]
    if hashlib.sha256(payload).digest() != data[len(header) : digest_end]:
        return None  # truncated or damaged: a flipped digit must never become a duration
    site = unpickle(payload)
    if type(site) is Site:
        return site
    from fieldlog.engine.compiled import CompiledSite

    if type(site) is CompiledSite and type(site.site) is Site:
        return site
    return None


# --- writing ------------------------------------------------------------------------------


def write_entry(path: Path, key: str, site: Site | CompiledSite) -> None:
    """Store ``site`` (or its compiled form) in ``path`` atomically, then keep only the
    :data:`KEEP` newest entries."""
    payload = _pickle(site)
    data = b"".join((_MAGIC, key.encode("ascii"), b"\n", hashlib.sha256(payload).digest(), payload))
    try:
        replace_file(path, data, _PREFIX)
    except OSError as exc:
        _warn(
            f"cannot write the site cache in {path.parent}: {exc.strerror}; the site loads "
            f"as usual, only slower (set {HOME_ENV} to a folder you can write)"
        )
        return
    prune(path.parent, _PREFIX, _SUFFIX, KEEP, path, _warn)


def _remove(path: Path) -> None:
    remove(path, _warn)


# --- pickling -----------------------------------------------------------------------------


_EMPTY: MappingProxyType[Any, Any] = MappingProxyType({})


def frozen_mapping(items: dict[Any, Any] | None = None) -> MappingProxyType[Any, Any]:
    """Rebuild a read-only mapping (pickle cannot name ``mappingproxy``); empty ones shared."""
    return MappingProxyType(items) if items else _EMPTY


def _reduce_mapping(m: MappingProxyType[Any, Any]) -> tuple[Any, ...]:
    return (frozen_mapping, (dict(m),)) if m else (frozen_mapping, ())


def _reduce_site(site: Site, ends: tuple[array, array] | None = None) -> tuple[Any, ...]:
    """A Site as its plain fields plus its activities and links as columns.

    Only the declared fields: lookups derived on the value (``_by_id``) are rebuilt on demand
    and must not be frozen into the file. Pickling 600,000 small objects one by one (a
    200,000-activity site) took seconds to read back and most of a process's memory; as
    columns they are a few lists, and :func:`site_from_columns` rebuilds the objects in C
    loops. A link's ends are stored as positions in the activity list, so on reading each id
    string exists once, shared by its activity and all its links. ``ends``: those positions
    already known (from the compiled network, :func:`_pickle`).
    """
    plain = {
        f.name: getattr(site, f.name)
        for f in dataclasses.fields(Site)
        if f.name not in ("activities", "links")
    }
    acts, links = site.activities, site.links
    columns = {name: list(map(attrgetter(name), acts)) for name in _ACTIVITY_FIELDS}
    if ends is None:
        ends = _link_positions(columns["id"], links)
    link_columns = (
        *ends,
        bytes(map(_LINK_TYPES.index, map(_TYPE, links))),
        array("q", map(_LAG, links)),
    )
    return (site_from_columns, (plain, columns, link_columns))


def _link_positions(ids: list[str], links: tuple[Link, ...]) -> tuple[Any, Any]:
    """Each link's two ends as positions in ``ids`` (as ids when one is not there)."""
    position = {aid: k for k, aid in enumerate(ids)}
    try:
        return (
            array("q", map(position.__getitem__, map(_PRED, links))),
            array("q", map(position.__getitem__, map(_SUCC, links))),
        )
    except KeyError:  # a Site built by hand for another cache need not have been validated
        return (list(map(_PRED, links)), list(map(_SUCC, links)))


def _network_positions(comp: CompiledSite) -> tuple[array, array]:
    """The positions :func:`_link_positions` would find, from the compiled network: it holds
    them already, in its own link order (``net.link`` is each one's place in the file)."""
    import numpy as np

    net = comp.net
    ends = []
    for sorted_ends in (net.pred, net.succ):
        in_file_order = np.empty(len(net.link), dtype=np.int64)
        in_file_order[net.link] = sorted_ends
        positions = array("q")
        positions.frombytes(in_file_order.astype("=i8", copy=False).tobytes())
        ends.append(positions)
    return ends[0], ends[1]


def site_from_columns(
    plain: dict[str, Any], columns: dict[str, list[Any]], link_columns: tuple[Any, ...]
) -> Site:
    """The Site :func:`_reduce_site` took apart (the pickle names this function)."""
    ids = columns["id"]
    preds, succs, types, lags = link_columns
    if isinstance(preds, array):
        preds, succs = map(ids.__getitem__, preds), map(ids.__getitem__, succs)
    link_values = {
        "pred": preds,
        "succ": succs,
        "type": map(_LINK_TYPES.__getitem__, types),
        "lag": lags,
    }
    return Site(
        **plain,
        activities=from_columns(Activity, len(ids), columns),
        links=from_columns(Link, len(lags), link_values),
    )


_ACTIVITY_FIELDS = tuple(f.name for f in dataclasses.fields(Activity))
_LINK_TYPES = tuple(LinkType)
_PRED, _SUCC, _TYPE, _LAG = map(attrgetter, ("pred", "succ", "type", "lag"))

_DISPATCH = copyreg.dispatch_table.copy()
_DISPATCH[MappingProxyType] = _reduce_mapping
_DISPATCH[Site] = _reduce_site


def _pickle(site: Site | CompiledSite) -> bytes:
    if isinstance(site, Site):
        return pickled(site, _DISPATCH)
    compiled_site, ends = site.site, _network_positions(site)

    def reduce_site(value: Site) -> tuple[Any, ...]:
        return _reduce_site(value, ends if value is compiled_site else None)

    return pickled(site, {**_DISPATCH, Site: reduce_site})


def pickled_with_sites(value: object) -> bytes:
    """``value`` pickled by the rules above (for another cache holding a Site)."""
    return pickled(value, _DISPATCH)


# --- the code's fingerprint ---------------------------------------------------------------


@functools.cache
def _code_digest() -> str | None:
    """sha256 of the modules that shape an entry; None turns caching off (source not readable).

    An editable install changes code without changing ``__version__``; a Site pickled by
    older code could lack a field the new code reads, or have passed a check that the new code
    refuses. Reading three small files costs well under a millisecond.
    """
    here = Path(__file__).resolve().parents[1]
    h = hashlib.sha256()
    try:
        for name in _SHAPING_MODULES:
            h.update((here / name).read_bytes())
    except OSError:
        return None  # running from a zip or a frozen build: no safe fingerprint, no cache
    return h.hexdigest()


def _warn(message: str) -> None:
    warnings.warn(message, SiteCacheWarning, stacklevel=3)
