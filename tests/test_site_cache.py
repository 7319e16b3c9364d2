"""The persistent site cache: a second command on the same files skips the TOML parse.

The oracle for every check is the uncached path itself: tomllib's parse of the two files plus
fieldlog's validation (``site_files._parse_and_build``). A cached Site must equal what that
path builds, and any change to either file, or any damage to a cache file, must fall back to it.
The folders are invented and tiny; ``FIELDLOG_HOME`` is a fresh folder per test (conftest.py).
No golden files here.
"""

from __future__ import annotations

import dataclasses
import os
import pickle
import tomllib
import warnings
from datetime import date
from pathlib import Path
from types import MappingProxyType

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldlog.engine.compiled import compile_site
from fieldlog.errors import DependencyLoopError, SiteError
from fieldlog.site import cache as site_cache
from fieldlog.site import files as site_files
from fieldlog.site.cache import KEEP, SiteCacheWarning, cache_folder, cache_key
from fieldlog.site.files import load_site
from fieldlog.site.model import Link, LinkType
from tests.helpers.engine_helpers import make_site
from tests.helpers.site_builder import Act, Lnk, schedule_toml, site_toml

SITE = site_toml(
    "Quarry lane sheds",
    date(2026, 3, 2),
    holidays={"weekdays": [date(2026, 4, 3)]},
    crews={"steel": 5},
)

SCHEDULE = schedule_toml(
    2,
    [
        Act("PAD", "Pad foundations", 4, crew={"steel": 2}),
        Act("FRAME", "Erect frame", 6, after=("PAD",), finish_not_after=date(2026, 4, 30)),
    ],
    [Lnk("PAD", "FRAME", "SS", lag=2)],
)


def write(folder: Path, site: str = SITE, schedule: str = SCHEDULE) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "site.toml").write_text(site, encoding="utf-8")
    (folder / "schedule.toml").write_text(schedule, encoding="utf-8")
    return folder


@pytest.fixture
def parses(monkeypatch: pytest.MonkeyPatch) -> list[str]:
    """Every text tomllib parses; each test also starts with an empty in-process cache, so
    only the on-disk cache can spare a parse."""
    site_files._load_bytes.cache_clear()
    calls: list[str] = []
    real = tomllib.loads

    def counting(text: str, **kw: object) -> dict:
        calls.append(text)
        return real(text, **kw)

    monkeypatch.setattr(tomllib, "loads", counting)
    yield calls
    site_files._load_bytes.cache_clear()


def entries() -> list[Path]:
    folder = cache_folder()
    return sorted(folder.glob("site-*.pickle")) if folder.exists() else []


def load_fresh(folder: Path) -> object:
    """load_site as a new process would: nothing remembered in memory."""
    site_files._load_bytes.cache_clear()
    return load_site(folder)


def uncached(folder: Path) -> object:
    """The oracle: parse and validate, no cache involved."""
    site, _ends = site_files._parse_and_build(
        folder, (folder / "site.toml").read_bytes(), (folder / "schedule.toml").read_bytes()
    )
    return site


def test_cache_lives_in_fieldlog_home(_isolated_home):
    assert cache_folder() == _isolated_home / "cache"


@pytest.mark.parametrize(
    ("platform", "env", "expected"),
    [
        ("linux", {"XDG_CACHE_HOME": "/x/cache"}, "/x/cache/fieldlog"),
        ("linux", {"HOME": "/home/foreman"}, "/home/foreman/.cache/fieldlog"),
        ("darwin", {"HOME": "/Users/foreman"}, "/Users/foreman/.cache/fieldlog"),
        (
            "win32",
            {"LOCALAPPDATA": "/c/Users/foreman/AppData/Local"},
            "/c/Users/foreman/AppData/Local/fieldlog/cache",
        ),
    ],
)
def test_cache_folder_without_fieldlog_home(monkeypatch, platform, env, expected):
    # Locations as the task states them: XDG base directory spec (XDG_CACHE_HOME, default
    # ~/.cache) on Linux and macOS, %LOCALAPPDATA% on Windows.
    for name in ("FIELDLOG_HOME", "XDG_CACHE_HOME", "LOCALAPPDATA"):
        monkeypatch.delenv(name, raising=False)
    for name, value in env.items():
        monkeypatch.setenv(name, value)
    monkeypatch.setattr(site_cache.sys, "platform", platform)
    assert cache_folder() == Path(expected)


def test_second_load_comes_from_the_cache_without_parsing(tmp_path, parses):
    folder = write(tmp_path / "site")
    first = load_site(folder)
    assert len(parses) == 2 and len(entries()) == 1
    again = load_fresh(folder)
    assert len(parses) == 2, "the cached site was parsed again"
    assert again == first == uncached(folder)
    assert again is not first  # really read back, not the in-process cache


def test_cached_sample_site_equals_the_parsed_one(sample_site, parses):
    built = load_site(sample_site)
    cached = load_fresh(sample_site)
    assert len(parses) == 2
    assert cached == built
    assert [a.crew for a in cached.activities] == [a.crew for a in built.activities]
    for a in cached.activities:  # still read-only after the round trip
        assert isinstance(a.crew, MappingProxyType)
    assert isinstance(cached.calendars, MappingProxyType)
    assert isinstance(cached.crews, MappingProxyType)


@pytest.mark.parametrize(
    ("name", "old", "new"),
    [
        ("site.toml", "available = 5", "available = 6"),
        ("schedule.toml", "duration = 6", "duration = 7"),
        ("schedule.toml", "lag = 2", "lag = 2 "),  # one byte of whitespace is a change too
    ],
)
def test_an_edit_of_either_file_misses(tmp_path, parses, name, old, new):
    folder = write(tmp_path / "site")
    load_site(folder)
    path = folder / name
    path.write_text(path.read_text(encoding="utf-8").replace(old, new), encoding="utf-8")
    changed = load_fresh(folder)
    assert len(parses) == 4
    assert changed == uncached(folder)
    assert len(entries()) == 2


def test_key_covers_both_files_version_and_their_boundary(monkeypatch):
    assert cache_key(b"ab", b"c") != cache_key(b"a", b"bc")
    assert cache_key(b"a", b"b") != cache_key(b"b", b"a")
    before = cache_key(b"a", b"b")
    monkeypatch.setattr(site_cache, "__version__", "99.0")
    assert cache_key(b"a", b"b") != before


def test_a_hit_is_refused_when_fieldlog_changes(tmp_path, parses, monkeypatch):
    folder = write(tmp_path / "site")
    load_site(folder)
    monkeypatch.setattr(site_cache, "__version__", "99.0")
    reloaded = load_fresh(folder)
    assert len(parses) == 4
    assert reloaded == uncached(folder)
    assert len(entries()) == 2


def _truncate(data: bytes) -> bytes:
    return data[: len(data) // 2]


def _flip_last_byte(data: bytes) -> bytes:
    return data[:-1] + bytes([data[-1] ^ 0x01])


def _other_version(data: bytes) -> bytes:
    return data.replace(b"fieldlog-site-cache", b"fieldlog-site-cachX", 1)


def _valid_digest(payload: bytes):
    """A file whose header and digest are right but whose payload is not a Site."""

    def corrupt(data: bytes) -> bytes:
        import hashlib

        head = data[: data.index(b"\n", len(b"fieldlog-site-cache\n")) + 1]
        return head + hashlib.sha256(payload).digest() + payload

    return corrupt


@pytest.mark.parametrize(
    "corrupt",
    [
        lambda data: b"",
        _truncate,
        _flip_last_byte,
        _other_version,
        lambda data: os.urandom(len(data)),
        _valid_digest(b"\x80\x05not a pickle at all"),
        _valid_digest(pickle.dumps({"not": "a site"})),
        _valid_digest(pickle.dumps(1)[:-1]),  # pickle stream cut before its STOP
    ],
    ids=[
        "empty",
        "truncated",
        "flipped byte",
        "other version",
        "garbage",
        "unpicklable",
        "not a site",
        "cut stream",
    ],
)
def test_a_damaged_cache_file_is_a_miss_and_is_replaced(tmp_path, parses, corrupt):
    folder = write(tmp_path / "site")
    good = load_site(folder)
    (entry,) = entries()
    intact = entry.read_bytes()
    entry.write_bytes(corrupt(intact))
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # a damaged file is a plain miss, not a warning
        assert load_fresh(folder) == good
    assert len(parses) == 4
    assert entries() == [entry] and entry.read_bytes() == intact  # rewritten whole


@pytest.mark.parametrize(
    ("site", "schedule", "error"),
    [
        (SITE, SCHEDULE.replace("duration = 4", "durtion = 4"), SiteError),
        (SITE, SCHEDULE.replace('name = "Pad foundations"', 'name = "Pad'), SiteError),
        (SITE.replace('"weekdays"', '"weekday"', 1), SCHEDULE, SiteError),
        (SITE, SCHEDULE + '\n[[link]]\nfrom = "FRAME"\nto = "PAD"\n', DependencyLoopError),
    ],
    ids=["unknown key", "toml syntax", "unknown calendar", "loop"],
)
def test_validation_errors_are_never_cached(tmp_path, parses, site, schedule, error):
    folder = write(tmp_path / "site", site, schedule)
    for _attempt in (1, 2):
        with pytest.raises(error):
            load_fresh(folder)
        assert entries() == []
    assert len(parses) == 4  # each attempt parsed both files again


def test_the_site_folder_is_never_written(tmp_path, _isolated_home, sample_site, parses):
    def snapshot(root: Path) -> dict[str, tuple[int, int]]:
        return {
            str(p.relative_to(root)): (p.stat().st_size, p.stat().st_mtime_ns)
            for p in sorted(root.rglob("*"))
        }

    before = snapshot(sample_site)
    load_site(sample_site)
    load_fresh(sample_site)
    assert snapshot(sample_site) == before
    (entry,) = entries()
    assert entry.parent == _isolated_home / "cache"
    assert not entry.is_relative_to(sample_site)


def test_only_the_most_recently_used_entries_are_kept(tmp_path, parses):
    folders = [
        write(tmp_path / f"s{k}", schedule=SCHEDULE.replace("revision = 2", f"revision = {k}"))
        for k in range(KEEP + 3)
    ]
    load_site(folders[0])
    (first,) = entries()
    for k, folder in enumerate(folders[1:], 1):
        # Each round ages every entry a minute (coarse file system clocks must not tie), adds
        # one site, then uses the first again: a hit makes it the most recent again.
        for p in entries():
            old = p.stat().st_mtime - 60
            os.utime(p, (old, old))
        load_site(folder)
        assert len(entries()) == min(k + 1, KEEP)
        parsed = len(parses)
        assert load_fresh(folders[0]).revision == 0
        assert len(parses) == parsed, "the most recently used entry was pruned"
    assert first in entries()

    def hit(folder: Path) -> bool:
        parsed = len(parses)
        load_fresh(folder)
        return len(parses) == parsed

    assert hit(folders[-1]) and hit(folders[0])
    assert not hit(folders[1])  # the least recently used went first


def test_derived_lookups_on_the_site_are_not_stored(tmp_path):
    folder = write(tmp_path / "site")
    site = load_site(folder)
    site.activity("PAD")  # makes the site's id lookup
    assert "_by_id" in site.__dict__
    key = "k" * 64
    path = cache_folder() / "site-test.pickle"
    site_cache.write_entry(path, key, site)
    back = site_cache.read_entry(path, key)
    assert back == site
    assert set(back.__dict__) == {f.name for f in dataclasses.fields(site)}


def test_a_cached_site_shares_each_id_between_its_activity_and_links(tmp_path, parses):
    folder = write(tmp_path / "site")
    load_fresh(folder)
    cached = load_fresh(folder)
    assert len(parses) == 2  # the second load read no TOML
    assert cached == uncached(folder)
    by_id = {a.id: a.id for a in cached.activities}
    assert all(lk.pred is by_id[lk.pred] and lk.succ is by_id[lk.succ] for lk in cached.links)


def test_a_site_whose_links_name_unknown_ids_still_round_trips(tmp_path):
    # Another cache may pickle a Site built by hand, never validated: its links are kept as
    # written (the oracle is the value itself).
    site = uncached(write(tmp_path / "site"))
    odd = dataclasses.replace(site, links=(Link("PAD", "NOWHERE", LinkType.FF, -2),))
    assert pickle.loads(site_cache.pickled_with_sites(odd)) == odd


def test_an_unusable_cache_folder_warns_and_still_loads(tmp_path, monkeypatch, parses):
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("a file where the cache folder should be", encoding="utf-8")
    monkeypatch.setenv("FIELDLOG_HOME", str(blocker))
    folder = write(tmp_path / "site")
    with pytest.warns(SiteCacheWarning, match="cannot"):
        site = load_site(folder)
    assert site == uncached(folder)
    assert not list(tmp_path.glob("**/.site-*.tmp"))  # no temp file left behind


@pytest.mark.parametrize("fmt", ["json", "text"])
def test_a_cached_run_of_the_command_prints_the_same(sample_site, capsys, parses, fmt):
    from fieldlog.cli import main

    schedule_text = (sample_site / "schedule.toml").read_text(encoding="utf-8-sig")
    assert main(["schedule", str(sample_site), "--format", fmt]) == 0
    cold = capsys.readouterr()
    site_files._load_bytes.cache_clear()
    assert main(["schedule", str(sample_site), "--format", fmt]) == 0
    warm = capsys.readouterr()
    assert (warm.out, warm.err) == (cold.out, cold.err)
    assert parses.count(schedule_text) == 1  # the second command used the cache


def test_only_a_one_shot_command_freezes_what_a_load_makes(sample_site, capsys):
    # gc.freeze keeps every object alive at that moment out of the cycle collector: right
    # for a command that loads once and exits, wrong for the app (cycles made garbage later
    # would never be collected). The oracle is the interpreter's own count (gc module docs).
    import gc

    from fieldlog.cli import LONG_RUNNING, main

    gc.unfreeze()
    load_fresh(sample_site)
    assert gc.get_freeze_count() == 0  # a library or app load freezes nothing
    assert {"open", "demo"} <= LONG_RUNNING
    site_files._load_bytes.cache_clear()
    assert main(["schedule", str(sample_site)]) == 0
    assert gc.get_freeze_count() > 0
    capsys.readouterr()


@st.composite
def _shuffled_networks(draw):
    """Links in any file order (not level order), of every type, activities in any order."""
    n = draw(st.integers(1, 9))
    ids = draw(st.permutations([f"N{k}" for k in range(n)]))
    acts = [(a, draw(st.integers(0, 4)), "weekdays") for a in ids]
    pairs = [(ids[i], ids[j]) for j in range(n) for i in range(j) if draw(st.booleans())]
    order = draw(st.permutations(range(len(pairs))))
    kinds = ["FS", "SS", "FF", "SF"]
    links = [(*pairs[k], draw(st.sampled_from(kinds)), draw(st.integers(-2, 2))) for k in order]
    return acts, links


@settings(max_examples=80, deadline=None)
@given(_shuffled_networks())
def test_link_ends_from_the_network_equal_a_fresh_lookup(network):
    """The cache stores each link's ends as positions taken from the compiled network (which
    holds its links in level order); a lookup of every id in the activity list is the
    reference, and the entry must read back to the very same Site."""
    acts, links = network
    site = make_site(acts, links, calendar="weekdays")
    comp = compile_site(site)
    ids = [a.id for a in site.activities]
    assert site_cache._network_positions(comp) == site_cache._link_positions(ids, site.links)
    back = pickle.loads(site_cache._pickle(comp))
    assert back.site == site
    assert [lk.pred for lk in back.site.links] == [lk.pred for lk in site.links]


def test_every_module_that_decides_what_a_site_holds_is_in_the_cache_key():
    """Found: bounds.py was not in the key, so a limit tightened later (a name holding a
    terminal escape) would still be served from a site cached before. Every fieldlog module
    the site readers import is in the key, except those that only word errors or handle the
    cache files themselves (checked by reading the imports with ast, a reference parser)."""
    import ast

    root = Path(site_cache.__file__).resolve().parents[1]
    readers = ["site/schema.py", "site/bulk.py", "site/files.py", "site/toml_file.py"]
    wording_or_files = {"errors.py", "cache_files.py", "home.py", "__init__.py"}
    needed = set()
    for name in readers:
        for node in ast.walk(ast.parse((root / name).read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and (node.module or "").startswith("fieldlog"):
                parts = node.module.split(".")[1:]
                if not parts:  # from fieldlog import bounds
                    parts = [node.names[0].name]
                path = "/".join(parts) + ".py"
                if (root / path).is_file() and path not in wording_or_files:
                    needed.add(path)
    assert needed <= set(site_cache._SHAPING_MODULES), needed - set(site_cache._SHAPING_MODULES)
