"""Facts of the trade the lookahead must honour, and what each cell says and why.

Facts marked "common practice" are the trade's usual reading, not taken from a source:
zero float leaves only MUST days; float is how far MAY-only work can slide; day d covers the
interval from the end of day d-1 to the end of day d. The sites here are invented.
"""

from __future__ import annotations

from datetime import date, timedelta

import pytest
from test_lookahead_oracle import act, make_site

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Progress
from fieldlog.engine.readiness import OpenItem
from fieldlog.lookahead import Cell, build_lookahead
from fieldlog.lookahead.classify import Window, classify
from fieldlog.site.model import Link, LinkType

SUN = date(2026, 3, 1)
MON = date(2026, 3, 2)
M, Y, N, X = Cell.MUST, Cell.MAY, Cell.CANNOT, Cell.OFF  # X: a day off
D = Cell.DONE  # after the late finish: nothing left to do


def _row(la, aid):
    return next(r for r in la.rows if r.id == aid)


def _chain_site(**kw):
    # A(3) -> B(2) -> D(1); A -> C(1) -> D: C has 1 day of float.
    return make_site(
        [
            act("A", 3, "Dig trench"),
            act("B", 2, "Lay duct"),
            act("C", 1, "Order lids"),
            act("D", 1, "Backfill"),
        ],
        [Link("A", "B"), Link("B", "D"), Link("A", "C"), Link("C", "D")],
        **kw,
    )


def test_zero_float_has_only_must_days() -> None:
    """Common practice: work with zero total float must run on every one of its days."""
    la = build_lookahead(compute_schedule(_chain_site(), SUN))
    for row in la.rows:
        if row.total_float == 0:
            assert Cell.MAY not in row.cells, row.id
            assert row.cells.count(M) == row.remaining


@pytest.mark.parametrize("slack", [2, 3, 5])
def test_float_is_how_far_may_only_work_can_slide(slack: int) -> None:
    """Common practice: an activity with float >= its duration has no MUST day, and its MAY
    days number duration + float: it can slide by exactly its float."""
    # S stands alone beside the longer L, so its float is the difference of their lengths.
    site = make_site([act("L", 2 + slack, "Long run"), act("S", 2, "Short job")])
    la = build_lookahead(compute_schedule(site, SUN), days=21)
    s = _row(la, "S")
    assert s.total_float == slack
    assert M not in s.cells
    assert s.cells.count(Y) - s.remaining == s.total_float


def test_day_d_runs_from_end_of_d_minus_1_to_end_of_d() -> None:
    """Common practice: status "as of the end of Sunday" means Sunday is over, so the window
    starts Monday; a one-day job on Monday takes the one cell of Monday, and its FS successor
    starts at the end of Monday, i.e. on Tuesday."""
    site = make_site([act("A", 1), act("B", 1)], [Link("A", "B")])
    la = build_lookahead(compute_schedule(site, SUN))
    assert la.days[0] == MON
    assert _row(la, "A").cells[:3] == (M, D, D)
    assert _row(la, "B").cells[:3] == (N, M, D)


def test_cells_of_a_small_chain() -> None:
    """The whole pattern of a worked example, by hand from the rule (DEVELOPERS.md)."""
    la = build_lookahead(compute_schedule(_chain_site(), SUN), days=7)
    assert _row(la, "A").cells == (M, M, M, D, D, X, X)  # finished by Wednesday: done after
    assert _row(la, "B").cells == (N, N, N, M, M, X, X)
    assert _row(la, "C").cells == (N, N, N, Y, Y, X, X)
    assert _row(la, "D").cells == (N, N, N, N, N, X, X)  # Monday 9th, outside this window


def test_reasons_name_the_predecessor_and_the_float() -> None:
    la = build_lookahead(compute_schedule(_chain_site(), SUN), days=7)
    c = _row(la, "C")
    assert (
        c.reasons[c.why[0]] == "waiting on A (Dig trench) to finish; earliest start Thu 05 Mar 2026"
    )
    assert (
        c.reasons[c.why[3]] == "1 working day of float: start by Fri 06 Mar 2026, finish "
        "by Fri 06 Mar 2026"
    )
    assert c.why[5] is None  # Saturday: off, nothing to explain


def test_lags_and_link_types_in_reasons() -> None:
    site = make_site(
        [act("P", 2, "Pour slab"), act("Q", 2, "Strip forms")], [Link("P", "Q", LinkType.SS, 3)]
    )
    q = _row(build_lookahead(compute_schedule(site, SUN)), "Q")
    assert q.reasons[q.why[0]].startswith("waiting on P (Pour slab) to start + 3 working days;")


def test_negative_float_is_late_and_must_on_its_earliest_days() -> None:
    """Negative float -> ES..EF are MUST and the activity is flagged (DEVELOPERS.md)."""
    site = _chain_site(finish_by=date(2026, 3, 5))  # needs Mon 9th, required Thu 5th
    la = build_lookahead(compute_schedule(site, SUN), days=7)
    a = _row(la, "A")
    assert a.late and a.total_float == -2
    assert a.cells == (M, M, M, D, D, X, X)
    assert a.reasons[a.why[0]].startswith("late: 2 working days behind")
    assert la.finish_float == -2


def test_in_progress_work_uses_its_remaining_dates() -> None:
    """An activity started before the status date is classified on its remaining days."""
    site = make_site(
        [act("A", 5, "Form walls"), act("B", 1, "Inspect")],
        [Link("A", "B")],
        start=date(2026, 2, 23),
    )
    progress = {"A": Progress(actual_start=date(2026, 2, 24), remaining=2, remaining_as_of=SUN)}
    la = build_lookahead(compute_schedule(site, SUN, progress), days=5)
    a = _row(la, "A")
    assert a.status.value == "in progress"
    assert a.cells == (M, M, D, D, D)
    assert _row(la, "B").cells == (N, N, M, D, D)


def test_readiness_item_holds_and_explains() -> None:
    """An open item with a date ahead holds the work back and is the reason for the wait."""
    site = make_site([act("R", 2, "Fix rebar")])
    item = OpenItem("R", "rebar shop drawings rev B", "drawings", date(2026, 3, 4), SUN)
    result = compute_schedule(site, SUN, holds={"R": date(2026, 3, 5)})
    r = _row(build_lookahead(result, [item], days=7), "R")
    assert r.cells[:3] == (N, N, N)
    assert r.reasons[r.why[0]] == (
        "needs rebar shop drawings rev B, expected Wed 04 Mar 2026; earliest start Thu 05 Mar 2026"
    )
    assert r.not_ready == ()


@pytest.mark.parametrize("expected", [None, date(2026, 2, 27)])
def test_readiness_item_without_a_future_date_is_flagged(expected: date | None) -> None:
    """readiness.OpenItem.flag: no date, or a date already past -> chase it."""
    site = make_site([act("R", 2, "Fix rebar")])
    item = OpenItem("R", "crane permit", "permit", expected, SUN)
    r = _row(build_lookahead(compute_schedule(site, SUN), [item]), "R")
    assert r.not_ready and r.not_ready[0].startswith("needs crane permit")
    assert r.not_ready[0] in r.reasons


def test_milestone_falls_on_its_date() -> None:
    """A milestone takes no working time: MUST on its one date when it has no float."""
    site = make_site([act("A", 2), act("M", 0, "Slab handed over")], [Link("A", "M")])
    m = _row(build_lookahead(compute_schedule(site, SUN), days=5), "M")
    assert m.cells == (N, M, D, D, D)  # reached on Tuesday: done after


def test_days_before_the_data_date_are_past() -> None:
    site = make_site([act("A", 2)])
    la = build_lookahead(compute_schedule(site, SUN), start=date(2026, 2, 26), days=6)
    a = _row(la, "A")
    assert a.cells == (N, N, X, X, M, M)
    assert a.reasons[a.why[0]].startswith("already past")


def test_finished_work_is_listed_apart_only_inside_the_window() -> None:
    site = make_site([act("A", 1), act("B", 2)], [Link("A", "B")], start=date(2026, 2, 23))
    progress = {"A": Progress(actual_start=date(2026, 2, 27), actual_finish=date(2026, 2, 27))}
    result = compute_schedule(site, SUN, progress)
    assert [f.id for f in build_lookahead(result, start=date(2026, 2, 27)).finished] == ["A"]
    assert build_lookahead(result).finished == ()
    assert [r.id for r in build_lookahead(result).rows] == ["B"]


def test_crew_load_must_and_most() -> None:
    """Must counts MUST cells only; most adds MAY; early is everything on early dates."""
    site = make_site(
        [
            act("A", 2, crew={"hands": 3}),
            act("B", 1, crew={"hands": 2}),
            act("C", 2, crew={"hands": 1}),
        ],
        [Link("A", "C")],
        crews={"hands": 4},
    )
    la = build_lookahead(compute_schedule(site, SUN), days=5, suggest_levelling=False)
    (hands,) = la.crews
    assert hands.must == (3, 3, 1, 1, 0)
    assert hands.most == (5, 5, 3, 3, 0)  # B (float 3) may still run on Thursday
    assert hands.early == (5, 3, 1, 1, 0)
    assert hands.over(hands.early) == (True, False, False, False, False)


def test_classify_is_exact_on_clamped_dates() -> None:
    """Dates far outside the window give the same cells as dates just outside it."""
    w = Window(first=100, length=4, data_date=100)
    far = classify([True] * 4, w, es=90, ef=500, ls=95, lf=600, late=False)
    near = classify([True] * 4, w, es=99, ef=104, ls=99, lf=104, late=False)
    assert far == near and far.cells == (M, M, M, M)


def test_rejects_an_empty_window() -> None:
    with pytest.raises(ValueError, match="at least one day"):
        build_lookahead(compute_schedule(make_site([act("A", 1)]), SUN), days=0)


def test_window_defaults_to_fourteen_days_from_the_data_date() -> None:
    la = build_lookahead(compute_schedule(make_site([act("A", 1)]), SUN))
    assert la.days == tuple(MON + timedelta(days=k) for k in range(14))
