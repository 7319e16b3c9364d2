"""Rules of the trade and edge cases of the CPM engine.

Facts of the trade are marked "common practice" (float identities, critical = lowest float,
FS with lag 0 starts the next working day, free float <= total float). Edge cases come from the
list in DEVELOPERS.md, Easy to get wrong: weekends and holidays at the edges, leads before the
site start, milestones, disconnected chains, required finish on a non-working day, negative
float, lost days, progress at a status date, out-of-sequence work, readiness holds.

Dates: 2026-03-02 is a Monday; the weekday calendar works Monday to Friday.
"""

from __future__ import annotations

from datetime import date, timedelta

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Progress, Status
from fieldlog.engine.result import ActivityResult
from fieldlog.site.model import CalendarSpec, LagCalendar
from tests.helpers.engine_helpers import ALLWEEK, MONDAY, WEEKDAYS, before_start, make_site

D = date.fromisoformat
WK = "weekdays"


def schedule(site, status=None, progress=None, **kw):
    return compute_schedule(site, status or before_start(site), progress, **kw)


def dates(r):
    return r.early_start, r.early_finish, r.late_start, r.late_finish


# --- facts of the trade, on random networks -----------------------------------------------------


@st.composite
def networks(draw):
    n = draw(st.integers(1, 8))
    ids = [f"N{k}" for k in range(n)]
    acts = [(a, draw(st.integers(0, 6)), draw(st.sampled_from([WK, "allweek"]))) for a in ids]
    links = [
        (ids[i], ids[j], draw(st.sampled_from(["FS", "SS", "FF", "SF"])), draw(st.integers(-2, 3)))
        for j in range(n)
        for i in range(j)
        if draw(st.integers(0, 2)) == 0
    ]
    return acts, links


@settings(max_examples=60, deadline=None)
@given(networks())
def test_float_identities_and_critical_is_lowest_float(network):
    acts, links = network
    site = make_site(acts, links, calendar=WK)
    result = schedule(site)
    lowest = min(r.total_float for r in result.activities)
    for r in result.activities:
        c = result.calendars[r.calendar]
        if r.duration:
            # Common practice: TF = LF - EF = LS - ES (working days of the activity's calendar).
            assert r.total_float == c.count(r.early_start, r.late_start)
            assert r.total_float == c.count(r.early_finish, r.late_finish)
        # Common practice: without a required finish, free float never exceeds total float.
        assert 0 <= r.free_float <= r.total_float
        # Common practice: the critical activities are those with the lowest float.
        assert r.critical == (r.total_float == lowest)
    assert lowest == 0  # no required finish: the longest path has no float


def test_fs_lag_zero_starts_the_next_working_day():
    """Common practice: an FS successor with lag 0 starts on the next working day."""
    site = make_site([("A", 5, WK), ("B", 1, WK)], [("A", "B")], calendar=WK)
    a, b = schedule(site).by_id["A"], schedule(site).by_id["B"]
    assert a.early_finish == D("2026-03-06")  # Friday
    assert b.early_start == b.early_finish == D("2026-03-09")  # Monday: one-day activity


# --- weekends, holidays and leads at the edges ----------------------------------------------


def test_start_not_before_on_a_saturday_rolls_to_monday():
    site = make_site([("A", 2, WK, {"start_not_before": D("2026-03-14")})], calendar=WK)
    r = schedule(site).by_id["A"]
    assert (r.early_start, r.early_finish) == (D("2026-03-16"), D("2026-03-17"))
    assert r.driven_by == "start not before"


def test_holiday_at_a_link_boundary_and_a_lag_ending_on_a_holiday():
    friday_off = CalendarSpec(WK, WEEKDAYS.workdays, frozenset({D("2026-03-06")}))
    site = make_site(
        [("A", 4, WK), ("B", 1, WK), ("C", 1, WK), ("D", 2, WK)],
        [("A", "B"), ("C", "D", "FS", 2)],
        calendar=WK,
        calendars=(friday_off, ALLWEEK),
    )
    result = schedule(site)
    # A ends Thursday; Friday is a holiday, so B starts Monday.
    assert result.by_id["A"].early_finish == D("2026-03-05")
    assert result.by_id["B"].early_start == D("2026-03-09")
    # C ends Monday 2nd; a two-day lag runs Tue-Wed, D starts Thursday.
    assert result.by_id["D"].early_start == D("2026-03-05")
    # Reference: numpy.busday_offset(C's finish + 1 day, 2, roll="forward") with the holiday.
    ref = np.busday_offset(
        "2026-03-03", 2, roll="forward", weekmask="1111100", holidays=["2026-03-06"]
    )
    assert result.by_id["D"].early_start == ref.astype(object)
    # A lag ending on the holiday: C2 ends Tue 3rd, lag 2 (Wed, Thu) -> Fri is off -> Monday.
    site2 = make_site(
        [("C", 2, WK), ("D", 1, WK)],
        [("C", "D", "FS", 2)],
        calendar=WK,
        calendars=(friday_off, ALLWEEK),
    )
    assert schedule(site2).by_id["D"].early_start == D("2026-03-09")


@pytest.mark.parametrize("kind", ["SS", "FS", "FF"])
def test_a_lead_never_starts_work_before_the_site_start(kind):
    site = make_site([("A", 2), ("B", 3)], [("A", "B", kind, -5)])
    b = schedule(site).by_id["B"]
    assert b.early_start == MONDAY
    assert b.driven_by == "site start"


def test_lag_on_successor_or_predecessor_calendar():
    """A five-day activity ends Friday; a seven-day successor waits two lag days."""
    acts = [("A", 5, WK), ("B", 3, "allweek")]
    on_succ = make_site(acts, [("A", "B", "FS", 2)], calendar=WK)
    on_pred = make_site(
        acts, [("A", "B", "FS", 2)], calendar=WK, lag_calendar=LagCalendar.PREDECESSOR
    )
    # Successor's (seven-day) calendar: Sat, Sun are the lag, B starts Monday.
    assert schedule(on_succ).by_id["B"].early_start == D("2026-03-09")
    # Predecessor's (weekday) calendar: Mon, Tue are the lag, B starts Wednesday.
    assert schedule(on_pred).by_id["B"].early_start == D("2026-03-11")


def test_cure_on_a_seven_day_calendar_runs_through_the_weekend():
    site = make_site(
        [("POUR", 1, WK), ("CURE", 3, "allweek"), ("STRIP", 1, WK)],
        [("POUR", "CURE"), ("CURE", "STRIP")],
        calendar=WK,
        start=D("2026-03-06"),
    )  # a Friday
    result = schedule(site)
    assert dates(result.by_id["CURE"])[:2] == (D("2026-03-07"), D("2026-03-09"))
    assert result.by_id["STRIP"].early_start == D("2026-03-10")
    assert result.driving_path == ("POUR", "CURE", "STRIP")


# --- milestones and network shapes ---------------------------------------------------------


def test_milestones_at_both_ends():
    site = make_site(
        [("START", 0, WK), ("A", 3, WK), ("B", 2, WK), ("DONE", 0, WK)],
        [("START", "A"), ("A", "B"), ("B", "DONE")],
        calendar=WK,
    )
    result = schedule(site)
    start, done = result.by_id["START"], result.by_id["DONE"]
    assert dates(start) == (MONDAY,) * 4
    assert dates(done) == (D("2026-03-06"),) * 4  # the day B finishes
    assert result.finish == D("2026-03-06")
    assert start.total_float == done.total_float == 0
    assert set(result.lowest_float) == {"START", "A", "B", "DONE"}
    assert result.driving_path == ("START", "A", "B", "DONE")
    assert done.after_work and not start.after_work


def test_a_milestone_is_never_dated_before_the_site_start_or_the_data_date():
    # M follows A start-to-start: it falls at the start of A's first day, not the day before.
    site = make_site(
        [("A", 5, WK), ("M", 0, WK), ("B", 3, WK)], [("A", "M", "SS"), ("M", "B")], calendar=WK
    )
    m = schedule(site).by_id["M"]
    assert m.early_start == MONDAY and m.late_start >= MONDAY
    # F follows A, which finished long ago: F falls on the data date.
    site2 = make_site([("A", 2, WK), ("F", 0, WK)], [("A", "F")], calendar=WK)
    done = {"A": Progress(actual_start=MONDAY, actual_finish=D("2026-03-03"))}
    f = schedule(site2, D("2026-03-11"), done).by_id["F"]
    assert f.early_start == D("2026-03-12")


def test_a_start_milestone_on_a_monday_does_not_start_seven_day_work_on_saturday():
    site = make_site(
        [("GO", 0, WK, {"start_not_before": D("2026-03-09")}), ("CURE", 2, "allweek")],
        [("GO", "CURE")],
        calendar=WK,
    )
    result = schedule(site)
    assert result.by_id["GO"].early_start == D("2026-03-09")
    assert result.by_id["CURE"].early_start == D("2026-03-09")


def test_two_disconnected_chains():
    site = make_site([("A1", 3), ("A2", 4), ("B1", 2), ("B2", 1)], [("A1", "A2"), ("B1", "B2")])
    result = schedule(site)
    assert result.finish == MONDAY + timedelta(days=6)
    assert [result.by_id[k].total_float for k in ("A1", "A2", "B1", "B2")] == [0, 0, 4, 4]
    assert result.by_id["B2"].free_float == 4
    assert result.driving_path == ("A1", "A2")


def test_an_empty_schedule():
    result = schedule(make_site([]))
    assert result.activities == () and result.finish == MONDAY


# --- required finish ---------------------------------------------------------------------------


def test_finish_by_on_a_non_working_day():
    site = make_site([("A", 5, WK)], calendar=WK, finish_by=D("2026-03-07"))  # a Saturday
    result = schedule(site)
    a = result.by_id["A"]
    assert a.late_finish == D("2026-03-06") and a.total_float == 0
    assert result.finish_float == 0


def test_negative_float_when_finish_by_is_too_early():
    site = make_site(
        [("A", 5, WK), ("B", 5, WK), ("C", 2, WK)],
        [("A", "B")],
        calendar=WK,
        finish_by=D("2026-03-10"),
    )
    result = schedule(site)
    a, b, c = (result.by_id[k] for k in "ABC")
    assert result.finish == D("2026-03-13")
    assert a.total_float == b.total_float == -3 and a.late and b.late
    assert c.total_float == 5
    assert result.finish_float == -3
    assert set(result.lowest_float) == {"A", "B"}
    assert b.late_finish == D("2026-03-10") and a.late_start == D("2026-02-25")


def test_very_negative_float_widens_the_calendar_range():
    site = make_site([("A", 400, WK)], calendar=WK, finish_by=D("2026-03-06"))
    a = schedule(site).by_id["A"]
    assert a.total_float == -395
    assert a.late_start < D("2025-01-01")


def test_finish_not_after_gives_negative_float_to_that_activity_only():
    site = make_site(
        [("A", 5, WK, {"finish_not_after": D("2026-03-04")}), ("B", 8, WK)], calendar=WK
    )
    result = schedule(site)
    assert result.by_id["A"].total_float == -2
    assert result.by_id["B"].total_float == 0


# --- progress at a status date ------------------------------------------------------------------


def test_finished_activities_keep_their_actual_dates():
    site = make_site([("A", 5, WK), ("B", 2, WK)], [("A", "B")], calendar=WK)
    done = {"A": Progress(actual_start=D("2026-03-03"), actual_finish=D("2026-03-07"))}  # a Sat
    result = schedule(site, D("2026-03-07"), done)
    a, b = result.by_id["A"], result.by_id["B"]
    assert a.status is Status.FINISHED
    assert (a.early_start, a.early_finish) == (D("2026-03-03"), D("2026-03-07"))
    assert a.total_float is None and a.remaining == 0
    assert b.early_start == D("2026-03-09")


def test_in_progress_remaining_counts_down_by_working_days():
    site = make_site([("A", 10, WK)], calendar=WK)
    p = {"A": Progress(actual_start=MONDAY, remaining=6, remaining_as_of=D("2026-03-04"))}
    # Recorded 6 left at the end of Wed 4th; Thu, Fri worked -> 4 left from Mon 9th.
    a = schedule(site, D("2026-03-08"), p).by_id["A"]
    assert a.remaining == 4
    assert (a.early_start, a.early_finish) == (D("2026-03-09"), D("2026-03-12"))
    assert not a.overdue


def test_in_progress_without_a_remaining_uses_the_planned_duration():
    site = make_site([("A", 10, WK)], calendar=WK)
    p = {"A": Progress(actual_start=D("2026-03-04"))}
    a = schedule(site, D("2026-03-06"), p).by_id["A"]  # Wed, Thu, Fri worked
    assert a.remaining == 7 and a.early_start == D("2026-03-09")


def test_count_down_that_runs_out_is_held_at_one_day_and_flagged():
    site = make_site([("A", 3, WK)], calendar=WK)
    a = schedule(site, D("2026-03-13"), {"A": Progress(actual_start=MONDAY)}).by_id["A"]
    assert a.remaining == 1 and a.overdue
    assert a.early_start == a.early_finish == D("2026-03-16")


def test_lost_days_move_an_in_progress_activity():
    site = make_site([("A", 10, WK), ("B", 2, WK)], [("A", "B")], calendar=WK)
    p = {"A": Progress(actual_start=MONDAY, remaining=5, remaining_as_of=MONDAY)}
    dry = schedule(site, D("2026-03-04"), p).by_id["A"]
    wet = schedule(site, D("2026-03-04"), p, lost_days={WK: [D("2026-03-03")]}).by_id["A"]
    assert dry.remaining == 3 and wet.remaining == 4  # Tuesday lost: it did not count down
    assert dry.early_finish == D("2026-03-09")
    assert wet.early_finish == D("2026-03-10")
    # A lost day ahead (announced closure) pushes the forecast too.
    ahead = schedule(site, D("2026-03-04"), p, lost_days={WK: [D("2026-03-05")]})
    assert ahead.by_id["A"].early_finish == D("2026-03-10")
    # Lost days on another calendar change nothing here.
    other = schedule(site, D("2026-03-04"), p, lost_days={"allweek": [D("2026-03-03")]})
    assert other.by_id["A"].early_finish == dry.early_finish


@settings(max_examples=40, deadline=None)
@given(network=networks(), status_offset=st.integers(-3, 20), started=st.sets(st.integers(0, 7)))
def test_nothing_unfinished_is_forecast_before_the_data_date(network, status_offset, started):
    acts, links = network
    site = make_site(acts, links, calendar=WK)
    status = MONDAY + timedelta(days=status_offset)
    progress = {
        acts[k][0]: Progress(
            actual_start=min(status, MONDAY), remaining=2, remaining_as_of=min(status, MONDAY)
        )
        for k in started
        if k < len(acts)
    }
    result = schedule(site, status, progress)
    data_date = max(status + timedelta(days=1), MONDAY)
    for r in result.activities:
        assert r.early_start >= data_date, r.id
        assert r.early_finish >= r.early_start


# --- out-of-sequence work ----------------------------------------------------------------------


@pytest.mark.parametrize("override", [False, True])
def test_out_of_sequence_retained_logic_or_progress_override(override):
    site = make_site(
        [("FRAME", 5, WK), ("BOARD", 4, WK)],
        [("FRAME", "BOARD")],
        calendar=WK,
        progress_override=override,
    )
    p = {
        "FRAME": Progress(actual_start=MONDAY, remaining=3, remaining_as_of=D("2026-03-03")),
        "BOARD": Progress(
            actual_start=D("2026-03-03"), remaining=3, remaining_as_of=D("2026-03-03")
        ),
    }
    result = schedule(site, D("2026-03-03"), p)
    frame, board = result.by_id["FRAME"], result.by_id["BOARD"]
    assert frame.early_finish == D("2026-03-06")
    if override:  # the field carries on regardless of the plan's logic
        assert (board.early_start, board.early_finish) == (D("2026-03-04"), D("2026-03-06"))
    else:  # retained logic: the rest of the boarding waits for the framing
        assert (board.early_start, board.early_finish) == (D("2026-03-09"), D("2026-03-11"))
        assert board.driven_by == "FRAME"
    [oos] = result.out_of_sequence
    assert oos.kind == "started before predecessor finished"
    assert oos.treatment == ("progress override" if override else "retained logic")


def test_out_of_sequence_kinds_for_each_link_type():
    site = make_site(
        [("A", 5), ("B", 5), ("C", 5), ("D", 5), ("E", 5)],
        [("A", "B", "SS"), ("A", "C", "FF"), ("A", "D", "SF"), ("A", "E")],
    )
    p = {
        "B": Progress(actual_start=MONDAY),
        "C": Progress(actual_start=MONDAY, actual_finish=D("2026-03-04")),
        "D": Progress(actual_start=MONDAY, actual_finish=D("2026-03-04")),
        "E": Progress(actual_start=MONDAY),
    }
    kinds = {o.link.succ: o.kind for o in schedule(site, D("2026-03-04"), p).out_of_sequence}
    assert kinds == {
        "B": "started before predecessor started",
        "C": "finished before predecessor finished",
        "D": "finished before predecessor started",
        "E": "started before predecessor finished",
    }


# --- readiness holds ---------------------------------------------------------------------------


def test_holds_keep_an_activity_from_starting():
    site = make_site([("A", 2, WK), ("B", 2, WK)], [("A", "B")], calendar=WK)
    held = schedule(site, holds={"B": D("2026-03-14")})  # a Saturday: rolls to Monday
    b = held.by_id["B"]
    assert b.early_start == D("2026-03-16") and b.driven_by == "readiness"
    early = schedule(site, holds={"B": D("2026-03-03")})  # before its logic allows: no effect
    assert early.by_id["B"].early_start == D("2026-03-04")
    assert early.by_id["B"].driven_by == "A"


# --- the result values themselves -----------------------------------------------------------


def test_results_carry_every_field_and_behave_as_plain_values():
    """The engine builds its rows in bulk from columns (for speed): check they are complete,
    equal to rows built one by one, and still read-only."""
    site = make_site([("A", 2), ("M", 0), ("B", 1)], [("A", "M"), ("M", "B")])
    done = {"A": Progress(actual_start=MONDAY, actual_finish=MONDAY + timedelta(days=1))}
    for result in (schedule(site), schedule(site, MONDAY + timedelta(days=1), done)):
        for r in result.activities:
            assert set(r._asdict()) == set(ActivityResult._fields)
            assert ActivityResult(**r._asdict()) == r == r._replace()
            with pytest.raises(AttributeError):
                r.total_float = 3  # type: ignore[misc]
