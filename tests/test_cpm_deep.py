"""Deep networks: the thin-level runs and the early horizon check against the reference.

A deep network (long bands of work, each step waiting on one or two of the step before) is
scheduled by :mod:`fieldlog.engine.thin_levels` one link at a time instead of one numpy call
per level, and :mod:`fieldlog.engine.reach` may stop a forward pass before it starts when a
long path provably runs past the calendars. Both must give exactly the frozen reference
engine's results (tests/helpers/reference_cpm.py, itself checked against networkx, numpy
busday functions and textbook examples): every field, the finish, paths, out-of-sequence
cases and the calendar range the engine settles on (an early stop that was wrong would widen
the range further than the reference does). The random sites of
tests/test_cpm_differential.py run again with every level thin and with none, so both ways of
doing a level are compared on every shape. The longest path is also checked against
networkx on a plain chain. All data is invented.
"""

from __future__ import annotations

import random
from dataclasses import replace
from datetime import date, timedelta
from types import MappingProxyType

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldlog.engine import reach, thin_levels
from fieldlog.engine.calendar_tables import calendar_tables
from fieldlog.engine.calendars import HorizonExceeded, build_calendars
from fieldlog.engine.compiled import compile_site
from fieldlog.engine.cpm import _initial_range, compute_schedule, schedule_on_calendars
from fieldlog.engine.horizon import widened
from fieldlog.engine.progress import Progress
from fieldlog.site.model import Activity, CalendarSpec, Link, LinkType, Site
from tests.test_cpm_differential import assert_same, both, random_case

_TYPES = (LinkType.FS,) * 6 + (LinkType.SS, LinkType.FF, LinkType.SF)


def deep_case(seed: int, *, chain: bool = False) -> tuple[Site, date, dict, dict, dict]:
    """A band network ``width`` wide and 40 to 400 levels deep, on the calendars, settings and
    status of :func:`random_case`; some cases run years past the first calendar range.
    ``chain``: one chain (width 1) on the site's own calendar."""
    site, status, _, lost, _ = random_case(seed)
    rng = random.Random(seed + 10_007)
    width = 1 if chain else rng.choice((1, 1, 2, 3, 5, 8))
    n = width * rng.randint(40, 400 // width + 40)
    plain = rng.random() < 0.3  # finish-to-start, no leads, no milestones: years of work
    longest = 30 if plain else rng.choice((3, 8, 30))
    types = (LinkType.FS,) if plain else _TYPES
    cals = [site.calendar] if chain else list(site.calendars)
    ids = [f"D{k:04d}" for k in range(n)]
    acts = [
        Activity(
            aid,
            f"Step {k}",
            0 if rng.random() < 0.1 and not plain else rng.randint(1, longest),
            rng.choice(cals),
            start_not_before=site.start + timedelta(days=rng.randint(0, 400))
            if rng.random() < 0.02
            else None,
        )
        for k, aid in enumerate(ids)
    ]
    links = []
    for k in range(width, n):
        band = k // width
        first = (band - 1) * width
        for p in rng.sample(range(first, first + width), k=min(width, rng.randint(1, 2))):
            lag = 0 if rng.random() < 0.7 else rng.randint(0 if plain else -2, 4)
            links.append(Link(ids[p], ids[k], rng.choice(types), lag))
        if k >= 3 * width and rng.random() < 0.05:  # now and then a link over several levels
            links.append(Link(ids[rng.randrange(0, first)], ids[k], LinkType.FS, 0))
    site = replace(site, activities=tuple(acts), links=tuple(links))
    progress: dict[str, Progress] = {}
    if status >= site.start:
        for aid in ids[: rng.randint(0, min(n, 2 * width + 3))]:
            begun = site.start + timedelta(days=rng.randint(0, max(0, (status - site.start).days)))
            if rng.random() < 0.6:
                progress[aid] = Progress(actual_start=begun, actual_finish=min(status, begun))
            else:
                progress[aid] = Progress(actual_start=begun)
    holds = {a.id: site.start + timedelta(days=rng.randint(0, 60)) for a in acts[:: max(1, n // 3)]}
    return site, status, progress, lost, holds


@pytest.fixture(params=["default", "all thin", "none thin"])
def level_mode(request: pytest.FixtureRequest, monkeypatch: pytest.MonkeyPatch) -> str:
    """Every level thin (one link at a time), none, or the engine's own choice."""
    if request.param == "all thin":
        monkeypatch.setattr(thin_levels, "THIN_LINKS", 10**9)
        monkeypatch.setattr(thin_levels, "MIN_LEVELS", 1)
    elif request.param == "none thin":
        monkeypatch.setattr(thin_levels, "THIN_LINKS", -1)
    return request.param


@pytest.mark.parametrize("seed", range(60))
def test_deep_networks_match_the_reference(seed: int, level_mode: str) -> None:
    assert_same(*both(*deep_case(seed)))


@pytest.mark.parametrize("seed", range(40))
def test_chains_on_one_calendar_match_the_reference(seed: int, level_mode: str) -> None:
    """One chain on one calendar: its thin runs are solved at once (a running maximum going
    forward, a running minimum going back) instead of one link at a time."""
    assert_same(*both(*deep_case(seed, chain=True)))


def test_the_chain_cases_take_the_running_maximum_and_minimum(monkeypatch) -> None:
    """The chain cases above do reach the solved-at-once way, both ways, and not always
    (a link over several steps sends a run to the loop)."""
    taken: dict[str, list[bool]] = {"forward": [], "backward": []}
    for name, attr in (("forward", "_forward_chain"), ("backward", "_backward_chain")):
        real = getattr(thin_levels, attr)

        def spy(*args, real=real, name=name):
            done = real(*args)
            taken[name].append(done)
            return done

        monkeypatch.setattr(thin_levels, attr, spy)
    for seed in range(40):
        site, status, progress, lost, holds = deep_case(seed, chain=True)
        compute_schedule(site, status, progress, lost_days=lost, holds=holds)
    for name, seen in taken.items():
        assert any(seen) and not all(seen), (name, seen.count(True), len(seen))


@pytest.mark.parametrize("seed", range(0, 700, 5))
def test_random_sites_match_the_reference_either_way(seed: int, level_mode: str) -> None:
    assert_same(*both(*random_case(seed)))


def test_the_deep_cases_cover_what_they_are_for() -> None:
    """Some cases have thin runs under the engine's own choice, some run past the first
    calendar range and are stopped early, and every link type occurs."""
    runs = stopped = 0
    types = set()
    for seed in range(60):
        site, status, progress, lost, holds = deep_case(seed)
        types |= {lk.type for lk in site.links}
        net = compile_site(site).net
        per_level = np.bincount(net.level[net.succ], minlength=int(net.level.max()) + 1)
        bounds = [0, *np.cumsum(per_level).tolist()]
        lv = thin_levels.runs(bounds, thin_levels.THIN_LINKS, thin_levels.MIN_LEVELS)
        runs += any(thin for *_, thin in lv)
        if _stopped_early(site, status, progress, lost, holds):
            stopped += 1
    assert runs >= 30 and stopped >= 3 and types == set(LinkType)


def _stopped_early(site: Site, status: date, progress: dict, lost: dict, holds: dict) -> bool:
    """The first calendar range is refused by the early check (the pass would fail there:
    :func:`test_an_early_stop_is_always_a_pass_that_fails` proves it)."""
    comp = compile_site(site)
    lo, hi = _initial_range(comp, status, progress, holds)
    calendars = build_calendars(site.calendars, lo, hi, lost)
    try:
        schedule_on_calendars(comp, status, progress, holds, calendars)
    except HorizonExceeded as exc:
        return "long path" in str(exc)
    return False


@pytest.mark.parametrize("seed", range(60))
def test_an_early_stop_is_always_a_pass_that_fails(seed: int, monkeypatch) -> None:
    """Where the early check refuses a range, the passes themselves fail on it too."""
    site, status, progress, lost, holds = deep_case(seed)
    if not _stopped_early(site, status, progress, lost, holds):
        return
    comp = compile_site(site)
    lo, hi = _initial_range(comp, status, progress, holds)
    calendars = build_calendars(site.calendars, lo, hi, lost)
    monkeypatch.setattr("fieldlog.engine.passes.check_reach", lambda *a: None)
    with pytest.raises(HorizonExceeded) as exc:
        schedule_on_calendars(comp, status, progress, holds, calendars)
    assert "long path" not in str(exc.value)


def test_a_long_chain_against_networkx() -> None:
    """One chain of 3,000 FS links on a seven-day calendar (every day works), 20 years of
    work: the finish is the longest path networkx finds, and the first range is stopped
    early."""
    site, *_ = random_case(1)
    rng = random.Random(4)
    ids = [f"C{k:04d}" for k in range(3000)]
    allweek = CalendarSpec("every day", frozenset(range(7)), frozenset())
    acts = tuple(Activity(aid, aid, rng.randint(1, 5), allweek.name) for aid in ids)
    links = tuple(Link(a, b, LinkType.FS, 0) for a, b in zip(ids, ids[1:], strict=False))
    site = replace(
        site,
        calendars=MappingProxyType({allweek.name: allweek}),
        calendar=allweek.name,
        activities=acts,
        links=links,
        finish_by=None,
    )
    status = site.start - timedelta(days=1)
    result = compute_schedule(site, status)
    g = nx.DiGraph()
    for a, b in zip(acts, acts[1:], strict=False):
        g.add_edge(a.id, b.id, weight=a.duration)
    g.add_edge(acts[-1].id, "END", weight=acts[-1].duration)
    days = nx.dag_longest_path_length(g)
    assert result.finish == site.start + timedelta(days=days - 1)
    assert _stopped_early(site, status, {}, {}, {})
    assert_same(result, both(site, status, {}, {}, {})[1])


def test_the_long_path_is_found_once_and_follows_links() -> None:
    site, *_ = deep_case(3)
    net = compile_site(site).net
    path = reach.long_path(net)
    assert reach.long_path(net) is path
    assert (net.pred[path.links] == path.acts[:-1]).all()
    assert (net.succ[path.links] == path.acts[1:]).all()
    tables = calendar_tables(
        build_calendars(site.calendars, site.start, site.start + timedelta(days=10)),
        net.calendar_names,
    )
    assert tables.origin == site.start.toordinal()


def _runs_one_level_at_a_time(
    link_bounds: list[int], thin: int, min_levels: int
) -> list[tuple[int, int, bool]]:
    """The grouping of :func:`thin_levels.runs` written out level by level (the reference)."""
    out: list[tuple[int, int, bool]] = []
    for g in range(len(link_bounds) - 1):
        is_thin = link_bounds[g + 1] - link_bounds[g] <= thin
        if out and out[-1][2] == is_thin:
            out[-1] = (out[-1][0], g + 1, is_thin)
        else:
            out.append((g, g + 1, is_thin))
    merged: list[tuple[int, int, bool]] = []
    for g0, g1, is_thin in out:
        is_thin = is_thin and g1 - g0 >= min_levels
        if merged and merged[-1][2] == is_thin:
            merged[-1] = (merged[-1][0], g1, is_thin)
        else:
            merged.append((g0, g1, is_thin))
    return merged


@settings(max_examples=300, deadline=None)
@given(
    sizes=st.lists(st.integers(0, 40), max_size=200),
    thin=st.integers(-1, 40),
    min_levels=st.integers(1, 20),
)
def test_the_runs_group_levels_as_one_at_a_time(sizes: list[int], thin: int, min_levels: int):
    bounds = [0, *np.cumsum(sizes, dtype=np.int64).tolist()]
    assert thin_levels.runs(bounds, thin, min_levels) == _runs_one_level_at_a_time(
        bounds, thin, min_levels
    )


def _unchecked_pass_fails(
    site: Site,
    status: date,
    progress: dict,
    lost: dict,
    holds: dict,
    lo: date,
    hi: date,
    monkeypatch: pytest.MonkeyPatch,
) -> bool:
    calendars = build_calendars(site.calendars, lo, hi, lost)
    with monkeypatch.context() as m:
        m.setattr("fieldlog.engine.passes.check_reach", lambda *a: None)
        try:
            schedule_on_calendars(compile_site(site), status, progress, holds, calendars)
        except HorizonExceeded:
            return True
    return False


@pytest.mark.parametrize("seed", range(0, 60, 3))
def test_an_early_stop_at_every_widening_is_a_pass_that_fails(seed: int, monkeypatch) -> None:
    """Each range the engine tries on its way out (the first, then each widening): where the
    early check refuses it, the passes without the check fail on it too."""
    site, status, progress, lost, holds = deep_case(seed)
    comp = compile_site(site)
    lo, hi = _initial_range(comp, status, progress, holds)
    for _ in range(8):
        calendars = build_calendars(site.calendars, lo, hi, lost)
        try:
            schedule_on_calendars(comp, status, progress, holds, calendars)
            return
        except HorizonExceeded as exc:
            if "long path" in str(exc):
                assert _unchecked_pass_fails(
                    site, status, progress, lost, holds, lo, hi, monkeypatch
                )
        lo, hi = widened(site.start, lo, hi)


def _chain_of_one_day_steps(n: int, calendars: tuple[str, ...]) -> Site:
    """``n`` one-day activities in one FS chain, taking the calendars in turn."""
    site, *_ = random_case(1)
    week = CalendarSpec("weekdays", frozenset(range(5)), frozenset())
    allweek = CalendarSpec("every day", frozenset(range(7)), frozenset())
    specs = {c.name: c for c in (week, allweek) if c.name in calendars}
    ids = [f"C{k:05d}" for k in range(n)]
    acts = tuple(Activity(aid, aid, 1, calendars[k % len(calendars)]) for k, aid in enumerate(ids))
    links = tuple(Link(a, b, LinkType.FS, 0) for a, b in zip(ids, ids[1:], strict=False))
    return replace(
        site,
        start=date(2027, 3, 1),  # a Monday
        calendars=MappingProxyType(specs),
        calendar=calendars[0],
        activities=acts,
        links=links,
        finish_by=None,
    )


@pytest.mark.parametrize("calendars", [("weekdays",), ("weekdays", "every day")])
def test_a_long_chain_of_one_day_steps_runs_one_forward_pass(calendars, monkeypatch) -> None:
    """A chain of 4,000 one-day steps (about 15 years of weekdays) runs past the first
    calendar ranges; each too-short range is refused before a pass runs (on one calendar
    the working days add up exactly, across calendars each step is at least a day), so the
    passes run once. The finish is the 4,000th weekday from the start, as numpy's busday
    functions count it (all steps on weekdays), or at most that (every other step may run on
    a weekend day)."""
    from fieldlog.engine import passes

    site = _chain_of_one_day_steps(4000, calendars)
    failed: list[str] = []
    forward = passes.forward

    def counting(*args, **kwargs):
        try:
            return forward(*args, **kwargs)
        except HorizonExceeded as exc:
            failed.append(str(exc))
            raise

    monkeypatch.setattr(passes, "forward", counting)
    monkeypatch.setattr("fieldlog.engine.cpm.forward", counting)
    result = compute_schedule(site, site.start - timedelta(days=1))
    assert failed and all("long path" in why for why in failed)
    last_weekday = np.busday_offset(np.datetime64(site.start), 3999, roll="forward")
    if calendars == ("weekdays",):
        assert np.datetime64(result.finish) == last_weekday
    else:
        assert np.datetime64(result.finish) <= last_weekday
