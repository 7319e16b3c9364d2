"""The CPM engine checked against outside references.

1. networkx: on random finish-to-start networks (seven-day calendar, so points are days) the
   job length equals ``networkx.dag_longest_path_length`` and the zero-float activities are
   exactly those on some longest path.
2. Brute force: on small random networks with every link type, lags and leads, one or two
   calendars, every feasible integer start of every activity is enumerated; the feasible
   starts must be exactly ``[early start, late start]``. Link rules are restated here in dates
   with numpy's business-day functions, independently of the engine's code.
3. Textbook worked examples (Hendrickson, *Project Management for Construction*; a precedence
   diagramming module; a published retained-logic example).
"""

from __future__ import annotations

from datetime import date, timedelta

import networkx as nx
import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Progress
from fieldlog.site.model import CalendarSpec, LagCalendar
from tests.helpers.engine_helpers import (
    ALLWEEK,
    MONDAY,
    WEEKDAYS,
    before_start,
    make_site,
    np_calendar,
    table,
)

# --- 1. networkx as the reference for the longest path ----------------------------------------


@st.composite
def fs_networks(draw):
    """A random finish-to-start DAG: ids, durations and links in topological order."""
    n = draw(st.integers(1, 12))
    ids = [f"T{k}" for k in range(n)]
    durations = [draw(st.integers(0, 9)) for _ in ids]
    links = [
        (ids[i], ids[j])
        for i in range(n)
        for j in range(i + 1, n)
        if draw(st.booleans()) and draw(st.booleans())
    ]
    return ids, durations, links


@settings(max_examples=80, deadline=None)
@given(fs_networks())
def test_length_and_zero_float_match_networkx(network):
    ids, durations, links = network
    site = make_site(list(zip(ids, durations, strict=True)), links)
    result = compute_schedule(site, before_start(site))

    # Reference: networkx longest path, durations on each activity's outgoing edges and an
    # edge to a sink, so the path length is the job length in days.
    g = nx.DiGraph()
    dur = dict(zip(ids, durations, strict=True))
    g.add_nodes_from(["SOURCE", "SINK", *ids])
    for a in ids:
        g.add_edge("SOURCE", a, weight=0)
        g.add_edge(a, "SINK", weight=dur[a])
    for a, b in links:
        g.add_edge(a, b, weight=dur[a])
    length = nx.dag_longest_path_length(g)
    if length > 0:
        assert (result.finish - site.start).days + 1 == length

    # A node is on a longest path iff longest-to-node + longest-from-node == length, and its
    # float is length - (longest-to-node + longest-from-node).
    on_longest = set()
    for a in ids:
        to_a = nx.dag_longest_path_length(g.subgraph(nx.ancestors(g, a) | {a}))
        from_a = nx.dag_longest_path_length(g.subgraph(nx.descendants(g, a) | {a}))
        expected = length - (to_a + from_a)
        if dur[a] == 0 and to_a == 0:
            # A start milestone is dated on the day it falls at the start of, so it must fall
            # on or before the finish day: one point less room than the bare path gives when
            # nothing but milestones follows it (common practice: float counts shown dates).
            expected = min(expected, max(length - 1, 0))
        assert result.by_id[a].total_float == expected, a
        if expected == 0:
            on_longest.add(a)
    zero_float = {r.id for r in result.activities if r.total_float == 0}
    assert zero_float == on_longest
    assert all(r.total_float >= 0 for r in result.activities)


# --- 2. brute force over every start -----------------------------------------------------------

ORIGIN = MONDAY - timedelta(days=70)
MWFS = CalendarSpec("mwfs", frozenset({0, 2, 4, 5}))
"""A second, odd calendar (Mon, Wed, Fri, Sat) so calendar changes are frequent."""


class NumpyCalendar:
    """Points on one calendar from numpy's business-day functions (the reference)."""

    def __init__(self, spec: CalendarSpec) -> None:
        self.cal = np_calendar(spec)
        self._pos: dict[date, int] = {}
        self._day: dict[int, date] = {}

    def pos(self, day: date) -> int:
        """Working days in [ORIGIN, day): numpy.busday_count."""
        if day not in self._pos:
            self._pos[day] = int(np.busday_count(ORIGIN, day, busdaycal=self.cal))
        return self._pos[day]

    def day(self, p: int) -> date:
        """The p-th working day from ORIGIN: numpy.busday_offset, rolling forward."""
        if p not in self._day:
            v = np.busday_offset(ORIGIN, p, roll="forward", busdaycal=self.cal)
            self._day[p] = v.astype(object)
        return self._day[p]


def link_bound(kind, lag, s_i, f_i, cal_i, cal_j, lag_on_succ):
    """The least start (FS/SS) or finish (FF/SF) point of the successor a link allows.

    Stated in dates: a predecessor's *finish* stands for "the day after its last working day",
    its *start* for "its first working day"; that date is rolled forward onto the successor's
    calendar and the lag counted there in working days (or counted on the predecessor's
    calendar first, when the site says so). This is common practice for multi-calendar
    precedence links; the numbers come from numpy only.
    """
    pred_lag = 0 if lag_on_succ else lag
    succ_lag = lag if lag_on_succ else 0
    if kind in ("FS", "FF"):
        moment = cal_i.day(f_i + pred_lag - 1) + timedelta(days=1)
    else:
        moment = cal_i.day(s_i + pred_lag)
    return cal_j.pos(moment) + succ_lag


def feasible_starts(acts, links, cals, floor_day, deadline, lag_on_succ):
    """Every feasible start of every activity, by enumerating whole schedules.

    ``acts`` is ``[(id, duration, calendar)]`` in topological order. A schedule keeps every
    link, starts nothing before ``floor_day`` and ends everything by ``deadline`` (inclusive).
    """
    index = {a[0]: k for k, a in enumerate(acts)}
    preds = {a[0]: [lk for lk in links if lk[1] == a[0]] for a in acts}
    ranges = []
    for aid, d, cname in acts:
        c = cals[cname]
        lo = c.pos(floor_day)
        hi = c.pos(deadline + timedelta(days=1)) - d  # last day on or before the deadline
        ranges.append((aid, d, cname, lo, hi))
    found: dict[str, set[int]] = {a[0]: set() for a in acts}
    starts = [0] * len(acts)

    def place(k: int) -> None:
        if k == len(acts):
            for (aid, *_), s in zip(acts, starts, strict=True):
                found[aid].add(s)
            return
        aid, d, cname, lo, hi = ranges[k]
        for s in range(lo, hi + 1):
            ok = True
            for p, _, kind, lag in preds[aid]:
                i = index[p]
                _, d_i, cname_i = acts[i]
                b = link_bound(
                    kind, lag, starts[i], starts[i] + d_i, cals[cname_i], cals[cname], lag_on_succ
                )
                if kind in ("FS", "SS") and s < b or kind in ("FF", "SF") and s + d < b:
                    ok = False
                    break
            if ok:
                starts[k] = s
                place(k + 1)

    place(0)
    return found


def earliest_starts(acts, links, cals, floor_day, lag_on_succ):
    """Least schedule by plain relaxation (Bellman-Ford style, any order until nothing moves)."""
    es = {aid: cals[c].pos(floor_day) for aid, _, c in acts}
    info = {aid: (d, c) for aid, d, c in acts}
    changed = True
    while changed:
        changed = False
        for p, s, kind, lag in links:
            d_i, c_i = info[p]
            d_j, c_j = info[s]
            b = link_bound(kind, lag, es[p], es[p] + d_i, cals[c_i], cals[c_j], lag_on_succ)
            need = b if kind in ("FS", "SS") else b - d_j
            if need > es[s]:
                es[s] = need
                changed = True
    return es


@st.composite
def small_networks(draw, two_calendars: bool):
    n = draw(st.integers(2, 5 if not two_calendars else 4))
    ids = [f"X{k}" for k in range(n)]
    cal_names = ["weekdays", "mwfs"] if two_calendars else ["weekdays"]
    acts = [(a, draw(st.integers(1, 3)), draw(st.sampled_from(cal_names))) for a in ids]
    links = []
    for j in range(1, n):
        for i in range(j):
            if draw(st.integers(0, 2)) == 0:
                links.append(
                    (
                        ids[i],
                        ids[j],
                        draw(st.sampled_from(["FS", "SS", "FF", "SF"])),
                        draw(st.integers(-2, 3)),
                    )
                )
    holiday = draw(st.one_of(st.none(), st.dates(MONDAY, MONDAY + timedelta(days=20))))
    slack = draw(st.one_of(st.none(), st.integers(-3, 4)))
    lag_on_succ = draw(st.booleans())
    return acts, links, holiday, slack, lag_on_succ


def _check_against_enumeration(network):
    acts, links, holiday, slack, lag_on_succ = network
    weekdays = CalendarSpec(
        "weekdays", WEEKDAYS.workdays, frozenset({holiday}) if holiday else frozenset()
    )
    specs = [weekdays, MWFS]
    cals = {s.name: NumpyCalendar(s) for s in specs}
    # Reference finish: the least schedule's latest last day (by relaxation, not the engine).
    es = earliest_starts(acts, links, cals, MONDAY, lag_on_succ)
    finish = max(cals[c].day(es[a] + d - 1) for a, d, c in acts)
    finish_by = None if slack is None else finish + timedelta(days=slack)
    site = make_site(
        acts,
        links,
        calendar="weekdays",
        calendars=specs,
        finish_by=finish_by,
        lag_calendar=LagCalendar.SUCCESSOR if lag_on_succ else LagCalendar.PREDECESSOR,
    )
    result = compute_schedule(site, before_start(site))
    assert result.finish == finish
    deadline = finish_by or finish
    found = feasible_starts(acts, links, cals, MONDAY, deadline, lag_on_succ)
    if any(not starts for starts in found.values()):
        # No schedule meets the deadline: the engine must show negative float somewhere.
        assert min(r.total_float for r in result.activities) < 0
        return
    for r in result.activities:
        c = cals[r.calendar]
        assert c.pos(r.early_start) == es[r.id]
        # Every start in [ES, LS] extends to a schedule that keeps all links and meets the
        # deadline, and no start outside does.
        assert found[r.id] == set(range(c.pos(r.early_start), c.pos(r.late_start) + 1)), r.id
        assert r.total_float == c.pos(r.late_start) - c.pos(r.early_start)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(small_networks(two_calendars=False))
def test_float_window_is_exact_on_one_calendar(network):
    _check_against_enumeration(network)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(small_networks(two_calendars=True))
def test_float_window_is_exact_on_two_calendars(network):
    _check_against_enumeration(network)


# --- 3. textbook worked examples ---------------------------------------------------------------

START = date(2026, 3, 2)


def test_hendrickson_nine_activity_example():
    """Hendrickson, *Project Management for Construction*, nine-activity site preparation
    project (precedence table in ch. 9, scheduled in ch. 10): duration 30, critical path
    A-C-F-I. Zero-based ES/EF/LS/LF/TF as tabulated for that example."""
    site = make_site(
        [("A", 4), ("B", 3), ("C", 8), ("D", 7), ("E", 9), ("F", 12), ("G", 2), ("H", 5), ("I", 6)],
        [
            ("A", "C"),
            ("A", "D"),
            ("B", "E"),
            ("C", "E"),
            ("B", "F"),
            ("C", "F"),
            ("D", "G"),
            ("E", "G"),
            ("D", "H"),
            ("E", "H"),
            ("F", "I"),
            ("G", "I"),
        ],
        start=START,
    )
    result = compute_schedule(site, before_start(site))
    assert table(result, START) == {
        "A": (0, 4, 0, 4, 0),
        "B": (0, 3, 9, 12, 9),
        "C": (4, 12, 4, 12, 0),
        "D": (4, 11, 15, 22, 11),
        "E": (12, 21, 13, 22, 1),
        "F": (12, 24, 12, 24, 0),
        "G": (21, 23, 22, 24, 1),
        "H": (21, 26, 25, 30, 4),
        "I": (24, 30, 24, 30, 0),
    }
    assert (result.finish - START).days + 1 == 30
    assert result.driving_path == ("A", "C", "F", "I")
    assert set(result.lowest_float) == {"A", "C", "F", "I"}


def test_precedence_example_with_start_to_start_links():
    """Fourteen-activity precedence diagramming module example (A-N, SS links on B, J, K).
    Values derived from the source's data (zero-based, no lags); not a published answer.
    Duration 38, critical path A-D-H-M-N."""
    durations = {
        "A": 2,
        "B": 10,
        "C": 13,
        "D": 12,
        "E": 12,
        "F": 7,
        "G": 10,
        "H": 16,
        "I": 6,
        "J": 12,
        "K": 5,
        "L": 8,
        "M": 5,
        "N": 3,
    }
    links = [
        ("A", "B", "SS"),
        ("A", "C"),
        ("A", "D"),
        ("B", "E"),
        ("B", "F"),
        ("D", "G"),
        ("D", "H"),
        ("F", "I"),
        ("C", "J"),
        ("G", "J", "SS"),
        ("I", "K", "SS"),
        ("E", "L"),
        ("I", "L"),
        ("K", "L"),
        ("H", "M"),
        ("G", "N"),
        ("J", "N"),
        ("L", "N"),
        ("M", "N"),
    ]
    site = make_site(list(durations.items()), links, start=START)
    result = compute_schedule(site, before_start(site))
    expected = {  # ES, EF, LS, LF, TF, FF
        "A": (0, 2, 0, 2, 0, 0),
        "B": (0, 10, 4, 14, 4, 0),
        "C": (2, 15, 10, 23, 8, 0),
        "D": (2, 14, 2, 14, 0, 0),
        "E": (10, 22, 15, 27, 5, 1),
        "F": (10, 17, 14, 21, 4, 0),
        "G": (14, 24, 23, 33, 9, 1),
        "H": (14, 30, 14, 30, 0, 0),
        "I": (17, 23, 21, 27, 4, 0),
        "J": (15, 27, 23, 35, 8, 8),
        "K": (17, 22, 22, 27, 5, 1),
        "L": (23, 31, 27, 35, 4, 4),
        "M": (30, 35, 30, 35, 0, 0),
        "N": (35, 38, 35, 38, 0, 0),
    }
    got = table(result, START)
    assert {k: (*got[k], result.by_id[k].free_float) for k in got} == expected
    assert (result.finish - START).days + 1 == 38
    assert result.driving_path == ("A", "D", "H", "M", "N")


@pytest.mark.parametrize("override, b_days", [(False, (156, 160)), (True, (151, 155))])
def test_retained_logic_example(override, b_days):
    """Published retained-logic example (inclusive workday numbers, data date = workday 151):
    A in progress with 5 days remaining finishes on workday 155; B, started out of sequence
    against its FS link from A with 5 days remaining, runs 156-160 under retained logic.
    Under progress override B simply continues from the data date (151-155)."""
    site = make_site([("A", 20), ("B", 10)], [("A", "B")], start=START, progress_override=override)

    def workday(n: int) -> date:  # seven-day calendar: workday 1 is the site start
        return START + timedelta(days=n - 1)

    status = workday(150)
    progress = {
        "A": Progress(actual_start=workday(140), remaining=5, remaining_as_of=status),
        "B": Progress(actual_start=workday(148), remaining=5, remaining_as_of=status),
    }
    result = compute_schedule(site, status, progress)
    a, b = result.by_id["A"], result.by_id["B"]
    assert (a.early_start, a.early_finish) == (workday(151), workday(155))
    assert (b.early_start, b.early_finish) == (workday(b_days[0]), workday(b_days[1]))
    assert len(result.out_of_sequence) == 1
    assert result.out_of_sequence[0].treatment == (
        "progress override" if override else "retained logic"
    )


def test_allweek_calendar_is_the_identity():
    """Sanity for the helpers above: on the seven-day calendar point p is START + p days."""
    site = make_site([("A", 3)], start=START, calendars=(ALLWEEK,))
    r = compute_schedule(site, before_start(site)).by_id["A"]
    assert (r.early_start, r.early_finish) == (START, START + timedelta(days=2))
