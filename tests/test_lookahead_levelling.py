"""The levelling suggestion: Burgess-Killebrew minimum sum of squares, kept honest.

Burgess, A. R. and Killebrew, J. B. (1962), "Variation in activity level on a cyclical arrow
diagram", Journal of Industrial Engineering 13(2) (citation from memory): shift work inside its
float, last activity first, keep the start with the smallest sum of squared daily totals (ties:
the latest), repeat passes until nothing improves.

Checked here against things outside the levelling code:

* property (hypothesis): on random networks the suggestion never moves the forecast finish,
  never breaks a link (each link checked by the brute-force oracle's own rule, numpy calendars),
  never starts work before its early start or after its late start, and never raises the sum of
  squares (recounted from the moved dates, not from the levelling's own arrays);
* with a single activity free to move, the heuristic's choice is the brute-force minimum over
  every start in its float (ties: the latest);
* a worked example by hand.
"""

from __future__ import annotations

from collections import Counter
from datetime import date, timedelta

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from test_lookahead_oracle import WEEKDAYS, OracleCalendar, Placement, act, link_holds, make_site

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Progress, Status
from fieldlog.lookahead import build_lookahead
from fieldlog.lookahead.levelling import METHOD
from fieldlog.site.model import CalendarSpec, LagCalendar, Link, LinkType

SUN = date(2026, 3, 1)
CALS = (
    CalendarSpec("weekdays", frozenset({0, 1, 2, 3, 4}), frozenset({date(2026, 3, 11)})),
    CalendarSpec("sixday", frozenset({0, 1, 2, 3, 4, 5})),
)


def test_method_is_named() -> None:
    assert METHOD == "Burgess-Killebrew minimum sum of squares"


@st.composite
def crewed_networks(
    draw,
    sizes=(3, 9),
    durations=(0, 4),
    lags=(-2, 3),
    link_odds=4,
    finish_days=(5, 40),
    finish_from=date(2026, 3, 2),
):
    """Random small sites with two crews; the keywords let other tests draw smaller ones."""
    n = draw(st.integers(*sizes))
    cals = list(CALS[: draw(st.integers(1, 2))])
    acts, progress = [], {}
    for k in range(n):
        crew = {}
        for c in ("hands", "pour"):
            if draw(st.integers(0, 2)):
                crew[c] = draw(st.integers(1, 4))
        acts.append(
            act(
                f"A{k}",
                draw(st.integers(*durations)),
                calendar=draw(st.sampled_from([c.name for c in cals])),
                crew=crew,
            )
        )
        if k == 0 and draw(st.booleans()):
            progress["A0"] = Progress(
                actual_start=date(2026, 2, 27), remaining=2, remaining_as_of=SUN
            )
    links = [
        Link(f"A{i}", f"A{j}", draw(st.sampled_from(list(LinkType))), draw(st.integers(*lags)))
        for j in range(n)
        for i in range(j)
        if draw(st.integers(0, link_odds - 1)) == 0
    ]
    finish_by = None
    if draw(st.booleans()):
        finish_by = finish_from + timedelta(days=draw(st.integers(*finish_days)))
    site = make_site(
        acts,
        links,
        calendars=cals,
        crews={"hands": draw(st.integers(1, 5)), "pour": draw(st.integers(1, 5))},
        finish_by=finish_by,
        start=date(2026, 2, 23),
        lag_calendar=draw(st.sampled_from(list(LagCalendar))),
    )
    return site, progress


def _placements(result, la):
    """Every open activity's instants with the suggested moves made (oracle placements).

    A milestone takes no time. One at the end of the work driving it (``after_work``) is the
    end of its shown day; any other is the start of its shown day (the convention of
    fieldlog.engine.cpm).
    """
    moved = {m.activity: m for m in la.levelling.moves} if la.levelling else {}
    out = {}
    for r in result.activities:
        if r.status is Status.FINISHED:
            continue
        first, last = r.early_start.toordinal(), r.early_finish.toordinal()
        if r.id in moved:
            first, last = moved[r.id].start.toordinal(), moved[r.id].finish.toordinal()
        if r.remaining == 0 and r.after_work:
            out[r.id] = Placement(last + 1, last, last, True, True)
        elif r.remaining == 0:
            out[r.id] = Placement(first, first - 1, first - 1, False, False)
        else:
            started = (r.actual_start.toordinal() if r.actual_start else first) - 1
            out[r.id] = Placement(first, last, started)
    return out


def _shown_finish(la) -> date:
    """The latest date any open activity shows once the moves are made."""
    moved = {m.activity: m.finish for m in la.levelling.moves} if la.levelling else {}
    return max(moved.get(r.id, r.early_finish) for r in la.rows)


def _squares(result, places, cals) -> int:
    load: Counter = Counter()
    for r in result.activities:
        if r.id not in places or r.remaining == 0:
            continue
        crew = result.site.activity(r.id).crew
        cal = cals[r.calendar]
        for o in cal.working_between(places[r.id].first, places[r.id].last):
            for c, n in crew.items():
                load[(c, o)] += n
    return sum(v * v for v in load.values())


@settings(
    max_examples=150, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow]
)
@given(crewed_networks())
def test_levelling_keeps_the_finish_and_every_link(case) -> None:
    """Property: the forecast finish never moves and no link is ever broken."""
    site, progress = case
    result = compute_schedule(site, SUN, progress)
    la = build_lookahead(result)
    cals = {name: OracleCalendar(spec) for name, spec in site.calendars.items()}
    early = _placements(result, build_lookahead(result, suggest_levelling=False))
    places = _placements(result, la)
    assert _shown_finish(la) <= result.finish
    for link in site.links:
        p, s = places.get(link.pred), places.get(link.succ)
        if p is None or s is None:
            continue
        succ = result.by_id[link.succ]
        if succ.status is Status.IN_PROGRESS and site.progress_override:
            continue
        assert link_holds(link, site, cals, p, s), link
    if la.levelling is None:
        return
    for m in la.levelling.moves:
        r = result.by_id[m.activity]
        assert r.status is Status.NOT_STARTED
        assert r.early_start < m.start <= r.late_start
        assert m.finish <= min(r.late_finish, result.finish)
    before, after = _squares(result, early, cals), _squares(result, places, cals)
    assert after <= before
    lev = la.levelling
    assert after - before == lev.sum_of_squares_after - lev.sum_of_squares_before


@settings(max_examples=100, deadline=None, derandomize=True)
@given(st.integers(1, 4), st.integers(1, 6), st.lists(st.integers(0, 6), min_size=8, max_size=8))
def test_one_movable_activity_lands_on_the_brute_force_minimum(dur, people, others) -> None:
    """With one activity free to move, Burgess-Killebrew's choice is the start with the least
    sum of squares among every start in its float (ties: the latest), found by brute force."""
    # A chain of one-day jobs fixes the other load day by day; M floats beside it.
    chain = [act(f"C{k}", 1, crew={"hands": n}) for k, n in enumerate(others)]
    links = [Link(f"C{k}", f"C{k + 1}") for k in range(len(others) - 1)]
    site = make_site(
        [*chain, act("M", dur, "Mover", crew={"hands": people})], links, crews={"hands": 0}
    )  # any load is over: levelling always runs
    result = compute_schedule(site, SUN)
    la = build_lookahead(result, days=14)
    m = result.by_id["M"]
    cal = OracleCalendar(WEEKDAYS)
    fixed = Counter()
    for k, n in enumerate(others):
        fixed[result.by_id[f"C{k}"].early_start.toordinal()] += n
    best = None
    for first in cal.working_between(m.early_start.toordinal(), m.late_start.toordinal()):
        load = Counter(fixed)
        for o in cal.working_between(first, cal.last_day(first, dur)):
            load[o] += people
        cost = sum(v * v for v in load.values())
        if best is None or cost <= best[0]:
            best = (cost, first)
    moves = {mv.activity: mv.start for mv in la.levelling.moves}
    chosen = moves.get("M", m.early_start).toordinal()
    early_days = cal.working_between(m.early_start.toordinal(), m.early_finish.toordinal())
    early_cost = sum(v * v for v in (fixed + Counter(dict.fromkeys(early_days, people))).values())
    if best[0] < early_cost:
        assert chosen == best[1]
    else:
        assert chosen == m.early_start.toordinal()  # nothing better: no move suggested


def test_worked_example_moves_the_floating_job_off_the_peak() -> None:
    """By hand: A (3 days, 4 people) then C (2 days); B (2 days, 3 people) floats beside them.
    On early dates Mon-Tue need 7 of the 4 hands. Daily totals and sums of squares for B's
    four starts: Mon 7,7,4 -> 114; Tue 4,7,7 -> 114; Wed 4,4,7,3 -> 90; Thu 4,4,4,3,3 -> 66.
    Thursday wins: the peak drops from 7 to 4."""
    site = make_site(
        [
            act("A", 3, "Excavate", crew={"hands": 4}),
            act("C", 2, "Blind"),
            act("B", 2, "Drainage", crew={"hands": 3}),
        ],
        [Link("A", "C")],
        crews={"hands": 4},
    )
    la = build_lookahead(compute_schedule(site, SUN), days=7)
    (move,) = la.levelling.moves
    assert (move.activity, move.start, move.float_used) == ("B", date(2026, 3, 5), 3)
    (hands,) = la.crews
    assert max(hands.early) == 7 and max(hands.levelled) == 4
    assert (la.levelling.sum_of_squares_before, la.levelling.sum_of_squares_after) == (114, 66)
