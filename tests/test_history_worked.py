"""Forecast history on a hand-worked example: windows, cause split, evidence and PPC.

The example and every expected number below are DERIVED by hand (worked in this docstring,
not taken from a publication). The method they follow is the contemporaneous, observational
windows family of AACE RP 29R-03 ("Forensic Schedule Analysis", MIP 3.3 with the split of a
window that MIP 3.4 makes), one window per logged day; the step order and the mapping of
entries to causes are our own choice (DEVELOPERS.md, "Forecast history"). PPC is Ballard's
(2000) percent plan complete; what counts as planned and done is our own choice too.

Site: seven-day calendar (every day works, so working days are calendar days), start Monday
2026-03-02, required finish 2026-03-08. A (2 d) -> B (3 d) -> FIN (milestone); C (2 d) -> FIN.

Plan (as of 03-01): A 03-02..03-03, B 03-04..03-06, FIN after B (dated 03-06), C 03-02..03-03.
Finish 03-06, float +2 (03-07, 03-08). B: LS 03-06 (LF 03-08 minus 3 days), so B is MUST on
03-06; A has TF 2 = its duration (never MUST); C has TF 5.

Log and the movement of each logged day:

* 03-02 started A. A needs 2 - 1 = 1 more day (03-03); B 03-04..03-06; C slipped a day but has
  float. Finish 03-06, move 0.
* 03-03 a whole day lost to weather. Step 1 (status 03-02): 03-03 is no longer a working day,
  A's last day moves to 03-04, B to 03-05..03-07: **weather +1**. Step 2 (status 03-03): no
  progress, A still needs 1 day (the lost day did not count down). Finish 03-07, float +1.
* 03-04 finished A; an instruction names B. B 03-05..03-07: move 0.
* 03-05 started C; a note about B; B did not start although the plan as of 03-04 had it
  starting 03-05. B moves to 03-06..03-08 and no entry of 03-05 gives a cause (a note is not a
  cause): **not explained by the log +1**. Finish 03-08, float 0.
* 03-06 a whole day lost, cause access. Step 1 (status 03-05): B's start day 03-06 is lost, B
  03-07..03-09: **access +1**. Step 2: B still not started, ES 03-07: 0. Finish 03-09,
  float -1. Evidence: B was MUST from 03-06 (its LS as of 03-05) and did not start.
* 03-07 started B, finished C. B 03-07..03-09 as forecast: 0. Evidence: late start, B's LS as
  of 03-06 was 03-05 (LF 03-08; working days back 03-08, 03-07, 03-05, as 03-06 is lost).
* 03-08 nothing logged. 03-09 finished B and FIN (a milestone is recorded as reached with a
  finish). Had FIN not been recorded, it would be dated on the data date 03-10 (an open
  milestone is never dated before the data date) and the day would move +1.

Total +3 = weather +1, not explained +1, access +1 (03-06 -> 03-09). By week: the week of
03-02 moved +3, the week of 03-09 0.

PPC. Week of 03-02, plan as of 03-01: A (MAY, needed a finish: done 03-04), B (MUST on 03-06,
needed a finish: not done, finished 03-09), C (MAY, finish: done 03-07); FIN is a milestone,
not an assignment. 2 / 3 = 66.7 %, MUST 0 / 1. Reasons for B: the instruction (03-04), the
note (03-05), the days lost on site 03-03 (weather) and 03-06 (access). Week of 03-09, plan as
of 03-08: B (started, 1 day left, float negative so MUST; needed a finish: done 03-09).
1 / 1 = 100 %.
"""

from __future__ import annotations

from datetime import date, timedelta

import pytest

from fieldlog.history import NOT_EXPLAINED, build_history
from tests.helpers.engine_helpers import make_site
from tests.helpers.history_helpers import Log

D = date(2026, 3, 2)


def day(n: int) -> date:
    """Day n of March 2026."""
    return D + timedelta(days=n - 2)


def worked_example() -> tuple:
    site = make_site(
        [("A", 2), ("B", 3), ("C", 2), ("FIN", 0)],
        [("A", "B"), ("B", "FIN"), ("C", "FIN")],
        finish_by=day(8),
    )
    log = Log()
    log.add("started", day(2), activity="A")
    log.add("lost-time", day(3), cause="weather", whole_day=True, note="heavy rain")
    log.add("finished", day(4), activity="A")
    log.add(
        "instruction",
        day(4),
        text="hold B for the revised pour sequence",
        given_by="client's engineer (invented)",
        form="written",
        activities=["B"],
    )
    log.add("started", day(5), activity="C")
    log.add("note", day(5), text="B crew sent to another job", activity="B")
    log.add("lost-time", day(6), cause="access", whole_day=True, note="gate blocked")
    log.add("started", day(7), activity="B")
    log.add("finished", day(7), activity="C")
    log.add("finished", day(9), activity="B")
    log.add("finished", day(9), activity="FIN")
    return site, log.sorted()


def test_daily_windows_finish_float_and_movement() -> None:
    site, entries = worked_example()
    h = build_history(site, entries)
    assert (h.baseline_finish, h.baseline_float) == (day(6), 2)
    got = [(w.status, w.finish, w.finish_float, w.movement) for w in h.windows]
    assert got == [
        (day(2), day(6), 2, 0),
        (day(3), day(7), 1, 1),
        (day(4), day(7), 1, 0),
        (day(5), day(8), 0, 1),
        (day(6), day(9), -1, 1),
        (day(7), day(9), -1, 0),
        (day(9), day(9), -1, 0),
    ]


def test_split_by_cause() -> None:
    site, entries = worked_example()
    h = build_history(site, entries)
    split = {w.status: {b: d for b, d in w.split.items() if d} for w in h.windows}
    assert split[day(3)] == {"weather": 1}
    assert split[day(5)] == {NOT_EXPLAINED: 1}
    assert split[day(6)] == {"access": 1}
    assert {b: d for b, d in h.split.items() if d} == {"weather": 1, "access": 1, NOT_EXPLAINED: 1}
    assert h.total_movement == 3
    assert "B did not start (planned to start 2026-03-05)" in h.windows[3].steps[0].what


def test_evidence_of_must_work() -> None:
    site, entries = worked_example()
    h = build_history(site, entries)
    by_day = {w.status: [(e.kind, e.text) for e in w.evidence] for w in h.windows}
    assert ("missing start", "B was MUST from 2026-03-06, not started") in by_day[day(6)]
    assert ("late start", "B started 2026-03-07, MUST from 2026-03-05") in by_day[day(7)]
    assert [k for k, _ in by_day[day(4)]] == ["instruction"]
    assert by_day[day(3)][0] == ("lost day", "weather: whole day lost - heavy rain")


@pytest.mark.parametrize(
    "by, expected",
    [
        ("week", [(day(2), 3), (day(9), 0)]),
        ("month", [(day(1), 3)]),
    ],
)
def test_weeks_and_months_add_up(by: str, expected: list) -> None:
    site, entries = worked_example()
    h = build_history(site, entries, by=by)
    assert [(w.first, w.movement) for w in h.windows] == expected
    assert h.windows[-1].finish == day(9)


def test_ppc_by_week() -> None:
    site, entries = worked_example()
    h = build_history(site, entries)
    first, second = h.weeks
    assert [(a.activity, a.must, a.required, a.done) for a in first.assignments] == [
        ("A", False, "finish", True),
        ("B", True, "finish", False),
        ("C", False, "finish", True),
    ]
    assert round(first.ppc or 0, 1) == 66.7 and (first.must_done, first.must_planned) == (0, 1)
    miss = first.assignments[1].reasons
    assert miss == (
        "2026-03-04: instruction from client's engineer (invented): hold B for "
        "the revised pour sequence",
        "2026-03-05: note: B crew sent to another job",
        "2026-03-03: day lost on site (weather)",
        "2026-03-06: day lost on site (access)",
    )
    assert [(a.activity, a.must, a.required, a.done) for a in second.assignments] == [
        ("B", True, "finish", True)
    ]
    assert second.ppc == 100.0


def test_from_starts_at_the_log_as_it_stood() -> None:
    """--from 03-05: measured from the log as of 03-04 (finish 03-07), same later windows."""
    site, entries = worked_example()
    h = build_history(site, entries, first=day(5))
    assert (h.baseline_status, h.baseline_finish) == (day(4), day(7))
    assert [w.movement for w in h.windows] == [1, 1, 0, 0]
