"""Read a site folder: site.toml (the field's) and schedule.toml (the office's).

Reading and caching live here; what makes the files valid is :mod:`fieldlog.site.schema`, and
line-aware parsing is :mod:`fieldlog.site.toml_file`. The names other modules import
(``load_site``, ``build_site``, ``read_toml``, ``parse_toml``, ``TomlFile``, ``SITE_FILE``,
``SCHEDULE_FILE``, ``MAX_LAG``) are all available from here.
"""

from __future__ import annotations

import gc
from collections.abc import Iterator
from contextlib import contextmanager
from functools import lru_cache, partial
from pathlib import Path
from typing import TYPE_CHECKING, Any

from fieldlog.errors import SiteError
from fieldlog.site.cache import cached_site
from fieldlog.site.model import Site
from fieldlog.site.toml_file import (
    SCHEDULE_FILE,
    SITE_FILE,
    TomlFile,
    parse_toml,
    read_file_bytes,
    read_toml,
)

if TYPE_CHECKING:  # the engine (numpy) is imported only when a site is compiled or unpickled
    from fieldlog.engine.compiled import CompiledSite
    from fieldlog.engine.topology import LinkEnds
    from fieldlog.site.schema import MAX_LAG, build_site


def __getattr__(name: str) -> Any:
    """``build_site`` and ``MAX_LAG``, imported on first use (PEP 562): a site found in the
    cache is never validated again, so ``fieldlog record`` does not load the schema checks."""
    if name in ("build_site", "MAX_LAG"):
        from fieldlog.site import schema

        return getattr(schema, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


__all__ = [
    "MAX_LAG",
    "SCHEDULE_FILE",
    "SITE_FILE",
    "TomlFile",
    "build_site",
    "load_compiled",
    "load_site",
    "load_site_bytes",
    "read_site_bytes",
    "parse_toml",
    "read_toml",
]


def load_site(folder: Path | str) -> Site:
    """Load and validate the site folder ``folder`` (see :func:`load_compiled`)."""
    return load_compiled(folder).site


def load_compiled(folder: Path | str) -> CompiledSite:
    """Load and validate ``folder``, with the engine's compiled form of it (cached with it).

    Raises:
        SiteError: anything wrong in the files, located and explained.
        DependencyLoopError: the links form a loop (every activity of it named, in order).
    """
    folder = Path(folder)
    return _load_bytes(folder, *read_site_bytes(folder))


def read_site_bytes(folder: Path | str) -> tuple[bytes, bytes]:
    """The bytes of ``site.toml`` and ``schedule.toml``, each within its size cap.

    Raises:
        SiteError: not a folder, or a file missing, unreadable or too big.
    """
    folder = Path(folder)
    if not folder.is_dir():
        raise SiteError(
            "not a site folder",
            file=folder,
            fix=f"give the folder that holds {SITE_FILE} and {SCHEDULE_FILE}",
        )
    return read_file_bytes(folder / SITE_FILE), read_file_bytes(folder / SCHEDULE_FILE)


def load_site_bytes(folder: Path | str, site_raw: bytes, schedule_raw: bytes) -> Site:
    """The Site these bytes (read by :func:`read_site_bytes` from ``folder``) describe."""
    return _load_bytes(Path(folder), site_raw, schedule_raw).site


@lru_cache(maxsize=4)
def _load_bytes(folder: Path, site_raw: bytes, schedule_raw: bytes) -> CompiledSite:
    """Parse and validate, remembered by the files' content, in this process and on disk.

    Parsing dominates loading (tomllib takes about 0.4 s for a 10,000-activity schedule, the
    checks and the schedule itself a fraction of that), and the app reloads the folder after
    every sync. The same bytes give the same immutable Site, which also keeps the engine's
    cached network; any change to either file is a new key. Errors are never cached.

    Across processes (each ``fieldlog`` command is one), :mod:`fieldlog.site.cache` keeps the
    validated Site in the user's cache folder, so only the first command after an office
    revision pays for the parse (and the compiled form is built once per revision too).
    """
    with collector_paused():
        return cached_site(
            site_raw, schedule_raw, partial(_compile, folder, site_raw, schedule_raw)
        )


@contextmanager
def collector_paused() -> Iterator[None]:
    """Python's cycle collector off while a site is parsed, checked, compiled or unpickled.

    Those steps make a few objects per activity and link (over a million on a 200,000-activity
    schedule), none of them in a reference cycle, and every 700 new objects the collector
    would walk the young ones and, now and then, all of them: a third of the load's time
    (tests/benchmarks/bench_process.py --200k). Reference counting still frees everything;
    the collector is switched back on afterwards (unless it was off already), also on error.

    In a one-shot command (:func:`freeze_after_loads`) the objects made are then moved out of
    the collector's generations (``gc.freeze``): otherwise the first collection after
    switching it back on walks all of them (half a second on a 200,000-activity site), and
    every full collection after that walks them again, though a site value never takes part
    in a reference cycle. Frozen objects are still freed by reference counting.
    """
    was_on = gc.isenabled()
    gc.disable()
    try:
        yield
        if _freeze[0]:
            gc.freeze()
    finally:
        if was_on:
            gc.enable()


_freeze = [False]


def freeze_after_loads() -> None:
    """From now on, freeze what each load makes out of the cycle collector (see
    :func:`collector_paused`). For a process that loads a site and exits (a command line
    command): ``gc.freeze`` takes every object alive at that moment, and in the long-running
    app a reference cycle among those that became garbage later would never be collected.
    """
    _freeze[0] = True


def _compile(folder: Path, site_raw: bytes, schedule_raw: bytes) -> CompiledSite:
    from fieldlog.engine.compiled import compile_site

    # The network is compiled from the link ends the loop test found (no second lookup).
    return compile_site(*_parse_and_build(folder, site_raw, schedule_raw))


def _parse_and_build(folder: Path, site_raw: bytes, schedule_raw: bytes) -> tuple[Site, LinkEnds]:
    """The Site the two files' bytes describe, parsed and validated (no cache), and its
    links' ends."""
    from fieldlog.site.schema import build_site_and_ends

    return build_site_and_ends(
        parse_toml(folder / SITE_FILE, site_raw), parse_toml(folder / SCHEDULE_FILE, schedule_raw)
    )
