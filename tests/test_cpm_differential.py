"""The array engine against the plain reference engine, field by field, on random sites.

:mod:`fieldlog.engine.cpm` computes the passes level by level with numpy.
``tests/helpers/reference_cpm.py`` is the engine as it was before: one activity at a time in
topological order, checked by the oracle tests (networkx, numpy busday functions, textbook examples,
brute force). Here both run on the same random sites and must agree exactly: every field of every
ActivityResult (with the same Python types), the finish, finish float, driving path, lowest-float
set, out-of-sequence list and the calendar range.

The sites are drawn from a seeded generator (one seed per test case, so a failure names the
seed that reproduces it). They mix every link type, lags and leads, one to three calendars
with holidays and lost days, milestones, start-not-before and finish-not-after dates, a
required finish early (negative float) and late, readiness holds, and progress at a status date
with finished, in-progress and out-of-sequence work, under both out-of-sequence settings and
both lag calendars. A few cases reach outside the first calendar range, so the engine's
widen-and-retry path is compared too. All data is invented.
"""

from __future__ import annotations

import random
from dataclasses import FrozenInstanceError, replace
from datetime import date, timedelta
from types import MappingProxyType

import pytest

from fieldlog.engine.compiled import compile_site
from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Progress
from fieldlog.engine.result import ActivityResult, ScheduleResult, find_out_of_sequence
from fieldlog.site.model import (
    Activity,
    CalendarSpec,
    Crew,
    LagCalendar,
    Link,
    LinkType,
    Site,
)
from tests.benchmarks.synthetic import synthetic_site
from tests.helpers import reference_cpm

MONDAY = date(2026, 3, 2)
_TYPES = tuple(LinkType)
_FIELDS = ActivityResult._fields


def _calendar_pool(rng: random.Random, start: date) -> list[CalendarSpec]:
    """Four invented calendars with a few holidays near the start."""

    def some_days(k: int) -> frozenset[date]:
        return frozenset(start + timedelta(days=rng.randint(-5, 90)) for _ in range(k))

    return [
        CalendarSpec("weekdays", frozenset(range(5)), some_days(rng.randint(0, 4))),
        CalendarSpec("allweek", frozenset(range(7)), some_days(rng.randint(0, 1))),
        CalendarSpec("sixday", frozenset(range(6)), some_days(rng.randint(0, 3))),
        CalendarSpec("fourday", frozenset({0, 1, 2, 3}), some_days(rng.randint(0, 2))),
    ]


def random_case(seed: int) -> tuple[Site, date, dict, dict, dict]:
    """A random site with its status date, progress, lost days and holds."""
    rng = random.Random(seed)
    start = MONDAY + timedelta(days=rng.randint(0, 6))  # sometimes a weekend
    pool = _calendar_pool(rng, start)
    cals = rng.sample(pool, k=rng.choice((1, 1, 2, 2, 2, 3)))
    big = rng.random() < 0.05
    n = rng.randint(60, 250) if big else rng.randint(0, 28)
    hidden = [f"T{k:03d}" for k in range(n)]  # a topological order, shuffled for the file

    acts = []
    for aid in hidden:
        extra: dict = {}
        if rng.random() < 0.15:
            extra["start_not_before"] = start + timedelta(days=rng.randint(-5, 35))
        if rng.random() < 0.12:
            extra["finish_not_after"] = start + timedelta(days=rng.randint(0, 70))
        if rng.random() < 0.01:
            extra["finish_not_after"] = start - timedelta(days=rng.randint(300, 900))
        duration = 0 if rng.random() < 0.18 else rng.randint(1, 8)
        acts.append(Activity(aid, f"Task {aid}", duration, rng.choice(cals).name, **extra))

    density = rng.choice((0.05, 0.15, 0.3)) if n < 40 else 3.0 / max(n, 1)
    links = []
    for j in range(n):
        for i in range(max(0, j - 12), j):
            if rng.random() < density:
                lag = 0 if rng.random() < 0.6 else rng.randint(-3, 5)
                links.append(Link(hidden[i], hidden[j], rng.choice(_TYPES), lag))
                if rng.random() < 0.08:  # a second link between the same pair
                    links.append(Link(hidden[i], hidden[j], rng.choice(_TYPES), rng.randint(-2, 3)))
    rng.shuffle(acts)
    rng.shuffle(links)

    finish_by = rng.choice(
        (
            None,
            None,
            start + timedelta(days=rng.randint(5, 30)),
            start + timedelta(days=rng.randint(60, 140)),
        )
    )
    if rng.random() < 0.02:
        finish_by = start - timedelta(days=rng.randint(200, 700))
    site = Site(
        name="Random yard",
        start=start,
        calendar=rng.choice(cals).name,
        calendars=MappingProxyType({c.name: c for c in cals}),
        crews=MappingProxyType({"crew": Crew("crew", 5)}),
        revision=1,
        activities=tuple(acts),
        links=tuple(links),
        finish_by=finish_by,
        progress_override=rng.random() < 0.5,
        lag_calendar=rng.choice((LagCalendar.SUCCESSOR, LagCalendar.PREDECESSOR)),
    )

    lost = {
        c.name: [start + timedelta(days=rng.randint(0, 40)) for _ in range(rng.randint(0, 3))]
        for c in cals
        if rng.random() < 0.4
    }
    holds = {a.id: start + timedelta(days=rng.randint(-3, 40)) for a in acts if rng.random() < 0.08}

    if rng.random() < 0.3:
        return site, start - timedelta(days=1), {}, lost, holds
    status = start + timedelta(days=rng.randint(0, 45))
    progress: dict[str, Progress] = {}
    p_done, p_run = rng.random() * 0.6, rng.random() * 0.3
    for aid in hidden:
        roll = rng.random()
        first = start + timedelta(days=rng.randint(-4, max(0, (status - start).days)))
        if roll < p_done:
            finish = min(status, first + timedelta(days=rng.randint(0, 9)))
            begun = None if rng.random() < 0.08 else first
            progress[aid] = Progress(
                actual_start=begun, actual_finish=finish, percent=rng.choice((None, 100.0))
            )
        elif roll < p_done + p_run:
            remaining = as_of = None
            if rng.random() < 0.6:
                remaining = rng.randint(0, 7)
                if rng.random() < 0.8:
                    as_of = first + timedelta(days=rng.randint(0, max(0, (status - first).days)))
            progress[aid] = Progress(
                actual_start=first,
                remaining=remaining,
                remaining_as_of=as_of,
                percent=rng.choice((None, 10.0, 55.5)),
            )
        elif roll < p_done + p_run + 0.05:
            progress[aid] = Progress(percent=rng.choice((None, 0.0)))
    if rng.random() < 0.1:
        progress["GONE"] = Progress(actual_start=start)  # an id the schedule no longer has
    return site, status, progress, lost, holds


def assert_same(new: ScheduleResult, ref: ScheduleResult) -> None:
    """Every public value of two schedule results is equal, with the same Python types."""
    assert [r.id for r in new.activities] == [r.id for r in ref.activities]
    for a, b in zip(new.activities, ref.activities, strict=True):
        assert type(a) is ActivityResult
        assert set(a._asdict()) == set(_FIELDS)
        diff = {
            f: (getattr(a, f), getattr(b, f))
            for f in _FIELDS
            if getattr(a, f) != getattr(b, f) or type(getattr(a, f)) is not type(getattr(b, f))
        }
        assert not diff, f"{a.id}: (new, reference) {diff}"
    assert dict(new.by_id) == dict(ref.by_id)
    assert list(new.by_id) == list(ref.by_id)
    for name in (
        "as_of",
        "finish",
        "finish_float",
        "driving_path",
        "lowest_float",
        "out_of_sequence",
        "data_date",
        "paths_differ",
    ):
        got, want = getattr(new, name), getattr(ref, name)
        assert got == want and type(got) is type(want), f"{name}: {got!r} != {want!r}"
    assert {k: (c.origin, c.end) for k, c in new.calendars.items()} == {
        k: (c.origin, c.end) for k, c in ref.calendars.items()
    }
    assert new == ref


def both(
    site: Site, status: date, progress: dict, lost: dict, holds: dict
) -> tuple[ScheduleResult, ScheduleResult]:
    """The schedule from the engine and from the reference."""
    new = compute_schedule(site, status, progress, lost_days=lost, holds=holds)
    ref = reference_cpm.compute_schedule(site, status, progress, lost_days=lost, holds=holds)
    return new, ref


@pytest.mark.parametrize("seed", range(700))
def test_random_sites_match_the_reference(seed):
    site, status, progress, lost, holds = random_case(seed)
    new, ref = both(site, status, progress, lost, holds)
    assert_same(new, ref)
    # The plain out-of-sequence finder in schedule_result reads the same way as the engine.
    in_order = [progress.get(a.id, Progress()) for a in site.activities]
    assert find_out_of_sequence(site, in_order, site.progress_override) == new.out_of_sequence


@pytest.mark.parametrize("seed", range(0, 700, 7))
def test_recomputing_the_same_site_value_matches(seed):
    """A second run on the same compiled site value matches; the other setting too."""
    site, status, progress, lost, holds = random_case(seed)
    comp = compile_site(site)
    compute_schedule(comp, status, progress, lost_days=lost, holds=holds)
    again = compute_schedule(comp, status, progress, lost_days=lost, holds=holds)
    assert_same(again, both(site, status, progress, lost, holds)[1])
    flipped = replace(site, progress_override=not site.progress_override)
    assert_same(*both(flipped, status, progress, lost, holds))


def test_an_empty_schedule():
    site, status, *_ = random_case(0)
    empty = replace(site, activities=(), links=())
    assert_same(*both(empty, status, {}, {}, {}))


@pytest.mark.parametrize("done", [0.0, 0.4])
def test_the_benchmark_network_with_progress(done):
    """The layered benchmark network (1,000 activities, two calendars), with progress."""
    site = replace(synthetic_site(1000, seed=3), finish_by=MONDAY + timedelta(days=300))
    status = MONDAY + timedelta(days=120)
    rng = random.Random(11)
    progress = {}
    for a in site.activities[: int(len(site.activities) * done)]:
        begun = MONDAY + timedelta(days=rng.randint(0, 100))
        if rng.random() < 0.8:
            progress[a.id] = Progress(actual_start=begun, actual_finish=begun + timedelta(3))
        else:
            progress[a.id] = Progress(
                actual_start=begun,
                remaining=rng.randint(1, 9),
                remaining_as_of=status - timedelta(days=2),
            )
    assert_same(*both(site, status, progress, {"weekdays": [status + timedelta(2)]}, {}))


def test_results_are_plain_python_values():
    """Nothing numpy leaks out: JSON writers and equality with dates need plain values."""
    site, status, progress, lost, holds = random_case(5)
    result = compute_schedule(site, status, progress, lost_days=lost, holds=holds)
    allowed = (
        str,
        int,
        float,
        bool,
        date,
        type(None),
        Link,
        *{type(r.status) for r in result.activities},
    )
    for r in result.activities:
        for name in _FIELDS:
            assert type(getattr(r, name)) in allowed, (r.id, name, type(getattr(r, name)))
    assert type(result.finish) is date


def test_a_deferred_result_behaves_as_a_plain_value():
    """Rows are built on first read; before and after, the result acts as the frozen value.

    The app narrows a result with ``dataclasses.replace(result, activities=...)``.
    """
    site, status, progress, lost, holds = random_case(3)
    result = compute_schedule(site, status, progress, lost_days=lost, holds=holds)
    assert not result.activities.built  # nothing built yet
    assert result.lowest_float and result.finish  # the summary needs no rows
    eager = reference_cpm.compute_schedule(site, status, progress, lost_days=lost, holds=holds)
    assert result == eager
    assert result.by_id[result.activities[0].id] is result.activities[0]
    narrowed = replace(result, activities=result.activities[:2])
    assert narrowed.activities == result.activities[:2] and narrowed.by_id == result.by_id
    with pytest.raises(AttributeError):
        result.no_such_field  # noqa: B018
    with pytest.raises(FrozenInstanceError):
        result.finish = status  # type: ignore[misc]
