"""Fewest people: checked against brute-force enumeration of every start combination.

The oracle knows nothing of fieldlog's search, bounds or link arithmetic. For each random
small site it lists, per activity that may move (not started, positive float, early start
inside the window), every working day from its early start to the first working day after
the window whose finish is no later than its late finish and the forecast finish, counted on
numpy's busday calendars (tests/test_lookahead_oracle.py); everything else stays on its early
dates. It then walks every combination, keeps those that hold every link (the oracle's own
link rule), counts each crew's people per window day, and takes the minimum the same way the
answer is defined (fieldlog/lookahead/fewest_people.py): crews in the order reported, each as
small as it can be while the crews before keep their answers and every crew stays within its
headcount or its early-start peak.

Checked:

* the reported peak equals the enumerated minimum, and the answer says "optimal";
* the plan is feasible: every link, every late finish and the forecast finish, recounted;
* the lower bound never exceeds the enumerated minimum, for every crew with work in the
  window (without the other crews' limits, so the check is the stronger one).
"""

from __future__ import annotations

import csv
import io
import itertools
import json
from datetime import date
from unittest import mock

import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from test_lookahead_levelling import crewed_networks
from test_lookahead_oracle import OracleCalendar, Placement, act, link_holds, make_site

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Status
from fieldlog.lookahead import build_lookahead
from fieldlog.lookahead import fewest_people as fewest_module
from fieldlog.lookahead.fewest_bounds import lower_bound
from fieldlog.lookahead.fewest_people import fewest_people, near_headcount
from fieldlog.lookahead.fewest_problem import build_problem
from fieldlog.lookahead.fewest_text import crew_line
from fieldlog.reports.lookahead_data import render_csv, render_json
from fieldlog.reports.lookahead_text import render_text
from fieldlog.site.model import CalendarSpec, Link, LinkType

SUN = date(2026, 3, 1)
CALS = (
    CalendarSpec("weekdays", frozenset({0, 1, 2, 3, 4}), frozenset({date(2026, 3, 11)})),
    CalendarSpec("sixday", frozenset({0, 1, 2, 3, 4, 5})),
)
MAX_COMBINATIONS = 1500


WORK = (1, 3)
WORK_AND_MILESTONES = (0, 4)


@st.composite
def small_sites(draw, durations=WORK):
    """Levelling's random sites, smaller (enumeration stays quick), and a window length."""
    site, progress = draw(
        crewed_networks(
            sizes=(2, 6),
            durations=durations,
            lags=(-1, 2),
            link_odds=3,
            finish_days=(0, 12),
            finish_from=date(2026, 3, 6),
        )
    )
    return site, progress, draw(st.integers(4, 10))


def _early_placement(r, shown: tuple[date, date] | None = None) -> Placement:
    """An open activity on its early dates (or the ``shown`` first and last day), as an oracle
    placement (milestones as in tests/test_lookahead_levelling.py: an end-of-work milestone is
    the end of its day, any other the start of its day)."""
    first, last = r.early_start.toordinal(), r.early_finish.toordinal()
    if shown is not None:
        first, last = shown[0].toordinal(), shown[1].toordinal()
    if r.remaining == 0 and r.after_work:
        return Placement(last + 1, last, last, True, True)
    if r.remaining == 0:
        return Placement(first, first - 1, first - 1, False, False)
    started = (r.actual_start.toordinal() if r.actual_start else first) - 1
    return Placement(first, last, started)


def _choices(result, la, cals) -> dict[str, list[Placement]]:
    """Per open activity, every placement the oracle allows (one for work that stays)."""
    window_end = la.days[-1].toordinal()
    out = {}
    for r in result.activities:
        if r.status is Status.FINISHED:
            continue
        here = _early_placement(r)
        if (
            r.status is Status.NOT_STARTED
            and r.total_float > 0
            and r.remaining > 0
            and r.early_start.toordinal() <= window_end
        ):
            c = cals[r.calendar]
            top = min(r.late_finish, result.finish).toordinal()
            options = []
            for first in range(r.early_start.toordinal(), window_end + 8):
                if not c.is_working(first):
                    continue
                last = c.last_day(first, r.remaining)
                if last > top:
                    break
                options.append(Placement(first, last, first - 1))
                if first > window_end:
                    break  # the first working day after the window is the latest start
            out[r.id] = options
        else:
            out[r.id] = [here]
    return out


def _feasible(site, result, cals, places) -> bool:
    for link in site.links:
        p, s = places.get(link.pred), places.get(link.succ)
        if p is None or s is None:
            continue
        if result.by_id[link.succ].status is Status.IN_PROGRESS and site.progress_override:
            continue
        if not link_holds(link, site, cals, p, s):
            return False
    return True


def _loads(site, result, cals, places, days) -> dict[str, list[int]]:
    first, n = days[0].toordinal(), len(days)
    load = {c: [0] * n for c in site.crews}
    for aid, pl in places.items():
        r = result.by_id[aid]
        if r.remaining == 0:
            continue
        for o in cals[r.calendar].working_between(pl.first, pl.last):
            if 0 <= o - first < n:
                for c, k in site.activity(aid).crew.items():
                    load[c][o - first] += k
    return load


def _enumerate(site, result, la, cals):
    choices = _choices(result, la, cals)
    ids = list(choices)
    total = 1
    for v in choices.values():
        total *= len(v)
    assume(total <= MAX_COMBINATIONS)
    peaks = []
    for combo in itertools.product(*(choices[a] for a in ids)):
        places = dict(zip(ids, combo, strict=True))
        if _feasible(site, result, cals, places):
            load = _loads(site, result, cals, places, la.days)
            peaks.append({c: max(v) for c, v in load.items()})
    return peaks


@settings(
    max_examples=120,
    deadline=None,
    derandomize=True,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much],
)
@given(small_sites())
def test_reported_minimum_is_the_enumerated_minimum(case) -> None:
    """Brute force (every start combination): the answer is the true lexicographic minimum,
    it says optimal, and its plan holds every link, late finish and the forecast finish."""
    site, progress, days = case
    result = compute_schedule(site, SUN, progress)
    la = build_lookahead(result, days=days, suggest_levelling=False)
    cals = {name: OracleCalendar(spec) for name, spec in site.calendars.items()}
    peaks = _enumerate(site, result, la, cals)
    assert peaks, "the early-start schedule is always one combination"
    early = peaks[0]  # every activity on its first (early) placement comes first
    problem = build_problem(result, la.days, la.rows)
    for crew in site.crews:
        if any(problem.fixed_load[crew]) or any(m.crew.get(crew) for m in problem.movables):
            best = min(p[crew] for p in peaks)
            assert lower_bound(problem, crew).people <= best, crew

    fewest = la.fewest
    if fewest is None:
        return
    allowed = [
        p for p in peaks if all(p[c] <= max(site.crews[c].available, early[c]) for c in site.crews)
    ]
    for answer in fewest.crews:
        best = min(p[answer.crew] for p in allowed)
        assert answer.optimal
        assert answer.peak == best, answer.crew
        assert answer.bound.people <= answer.peak
        allowed = [p for p in allowed if p[answer.crew] <= best]

    _check_plan(site, result, la, cals)


def _check_plan(site, result, la, cals) -> None:
    """The plan's moves, recounted by the oracle: links, late finishes, forecast finish, load."""
    fewest = la.fewest
    assert fewest.nodes <= fewest.budget
    moved = {m.activity: m for m in fewest.moves}
    places = {}
    for r in result.activities:
        if r.status is Status.FINISHED:
            continue
        if r.id in moved:
            m = moved[r.id]
            assert r.status is Status.NOT_STARTED
            assert r.early_start < m.start <= r.late_start
            assert m.finish <= min(r.late_finish, result.finish)
            places[r.id] = _early_placement(r, (m.start, m.finish))
        else:
            places[r.id] = _early_placement(r)
    assert _feasible(site, result, cals, places)
    load = _loads(site, result, cals, places, la.days)
    for answer in fewest.crews:
        assert tuple(load[answer.crew]) == answer.load
        assert max(answer.load) == answer.peak
        # A crew settled later may rise above its early peak to make room for one settled
        # earlier, never above its headcount (or its early peak, if that is higher).
        assert answer.peak <= max(answer.available, answer.early_peak)
    # Every crew the plan puts above its early peak is listed (the sheet says so), and no other.
    early_places = {r.id: _early_placement(r) for r in result.activities if r.id in places}
    early_load = _loads(site, result, cals, early_places, la.days)
    raised = {
        c: (max(early_load[c]), max(load[c]))
        for c in site.crews
        if max(load[c], default=0) > max(early_load[c], default=0)
    }
    assert {r.crew: (r.early_peak, r.peak) for r in fewest.raised} == raised
    for r in fewest.raised:
        assert r.peak <= r.available


@settings(
    max_examples=80, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow]
)
@given(small_sites(durations=WORK_AND_MILESTONES))
def test_plan_with_milestones_keeps_every_link(case) -> None:
    """Property, milestones included: the plan never breaks a link (the oracle's rule), never
    starts work before its early or after its late start, never finishes after the forecast
    finish, and its printed load is the load its dates give."""
    site, progress, days = case
    result = compute_schedule(site, SUN, progress)
    la = build_lookahead(result, days=days, suggest_levelling=False)
    if la.fewest is None:
        return
    _check_plan(site, result, la, {n: OracleCalendar(spec) for n, spec in site.calendars.items()})


def test_small_window_is_counted_by_hand() -> None:
    """Worked by hand: two 3-day jobs of 4 carpenters each beside a 6-day job without a crew
    that starts with the first (SS) and must not finish before the second (FF). Early, both
    run Mon-Wed (8 people); the second can slide to Thu-Mon, finishing with the 6-day job, so
    the window Mon-Fri needs 4, and the first job's must work (4 a day) proves it."""
    site = make_site(
        [act("A1", 3, crew={"carpenters": 4}), act("A2", 3, crew={"carpenters": 4}), act("A3", 6)],
        [Link("A1", "A3", LinkType.SS), Link("A2", "A3", LinkType.FF)],
        crews={"carpenters": 6},
        start=date(2026, 3, 2),
    )
    result = compute_schedule(site, SUN)
    la = build_lookahead(result, days=5, suggest_levelling=False)
    assert la.fewest is not None
    (answer,) = la.fewest.crews
    assert (answer.early_peak, answer.peak, answer.optimal) == (8, 4, True)
    assert answer.bound.people == 4
    assert [(m.activity, m.start) for m in la.fewest.moves] == [("A2", date(2026, 3, 5))]


def _hand_example():
    site = make_site(
        [
            act("A1", 3, crew={"carpenters": 4}),
            act("A2", 3, "Frame walls", crew={"carpenters": 4}),
            act("A3", 6),
        ],
        [Link("A1", "A3", LinkType.SS), Link("A2", "A3", LinkType.FF)],
        crews={"carpenters": 6},
        start=date(2026, 3, 2),
    )
    result = compute_schedule(site, SUN)
    return result, build_lookahead(result, days=5, suggest_levelling=False)


def test_sheet_json_and_csv_carry_the_answer_and_the_caution() -> None:
    result, la = _hand_example()
    sheet = render_text(la, 80)
    assert "carpenters: 4 people, optimal (has 6; 8 if all work starts early)" in sheet
    assert "With carpenters 4: move A2 (Frame walls) to Thu 05 Mar 2026." in sheet
    assert "not a safe staffing level" in sheet
    doc = json.loads(render_json(la))["fewest_people"]
    assert doc["crews"][0]["people"] == 4 and doc["crews"][0]["optimal"] is True
    assert doc["crews"][0]["lower_bound"] == 4
    assert [(m["id"], m["start"]) for m in doc["moves"]] == [("A2", "2026-03-05")]
    assert "not a safe staffing level" in doc["caution"]
    rows = list(csv.DictReader(io.StringIO(render_csv(la))))
    assert {r["fewest_people_start"] for r in rows if r["id"] == "A2"} == {"2026-03-05"}
    assert {r["fewest_people_start"] for r in rows if r["id"] == "A1"} == {""}


def test_an_answer_cut_short_prints_its_bound_beside_it() -> None:
    """With no search at all the early plan is the answer, and the bound stands beside it."""
    result, la = _hand_example()
    f = fewest_people(result, la.days, {"carpenters": 8}, la.rows, budget=0)
    assert f is not None
    (answer,) = f.crews
    assert (answer.peak, answer.optimal) == (8, False)
    assert crew_line(answer) == (
        "carpenters: 8 people; no plan needs fewer than 4 (has 6; 8 if all work starts early)"
    )
    with pytest.raises(ValueError, match="cannot be negative"):
        fewest_people(result, la.days, {"carpenters": 8}, la.rows, budget=-1)


@pytest.mark.parametrize(
    ("available", "peak", "asked"),
    [
        (10, 12, True),
        (10, 10, True),
        (10, 9, True),
        (10, 8, False),
        (3, 2, True),
        (3, 1, False),
        (5, 0, False),
    ],
)
def test_crews_over_or_near_their_headcount_are_asked_about(available, peak, asked) -> None:
    """Near means within a tenth of the headcount, at least one person (our own rule)."""
    assert near_headcount(available, peak) is asked


@settings(
    max_examples=60, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow]
)
@given(small_sites(durations=WORK_AND_MILESTONES))
def test_repair_search_plans_keep_every_link(case) -> None:
    """With the first round's branch and bound cut to one start, every try goes through the
    repair search first: its plans too are checked by the oracle (links, late finishes, forecast
    finish, recounted load)."""
    site, progress, days = case
    result = compute_schedule(site, SUN, progress)
    with mock.patch.object(fewest_module, "QUICK_NODES", 1):
        la = build_lookahead(result, days=days, suggest_levelling=False)
    if la.fewest is None:
        return
    _check_plan(site, result, la, {n: OracleCalendar(spec) for n, spec in site.calendars.items()})


def test_the_budget_is_never_overspent() -> None:
    """However small the budget, the searches stop on it (a busy invented yard, 20 jobs)."""
    site = make_site(
        [act(f"J{k:02d}", 2 + k % 4, crew={"formers": 1 + k % 5}) for k in range(20)],
        crews={"formers": 8},
        finish_by=date(2026, 3, 20),
    )
    result = compute_schedule(site, SUN)
    la = build_lookahead(result, suggest_levelling=False, suggest_fewest=False)
    early = {load.crew: max(load.early) for load in la.crews}
    for budget in (0, 1, 7, 100, 1000):
        f = fewest_people(result, la.days, early, la.rows, budget=budget)
        assert f is not None and f.nodes <= budget
