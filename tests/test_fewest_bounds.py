"""The fewest-people lower bounds, checked against brute force on small invented problems.

Every start combination of a few movable activities is enumerated and the smallest peak taken
(the oracle knows nothing of the bound's arguments). Checked: the bound never exceeds that
minimum; the bound over chosen day sets is never weaker than the interval bound alone
(``SUBSET_DAYS`` set to 0 turns it off); and a case worked by hand where two busy days with a
quiet one between need more people than any interval shows.
"""

from __future__ import annotations

import itertools
from unittest import mock

from hypothesis import given, settings
from hypothesis import strategies as st

from fieldlog.lookahead import fewest_bounds
from fieldlog.lookahead.fewest_bounds import lower_bound
from fieldlog.lookahead.fewest_problem import Movable, Problem


def problem(days: int, fixed: list[int], jobs: list[tuple[int, int, int, int]]) -> Problem:
    """``jobs``: (first start, last start, length, people) on window-day indices; a run is cut
    at the window's end, as work that runs past the window is counted on window days only."""
    movables = tuple(
        Movable(
            f"J{i}",
            {"crew": rate},
            tuple(range(first, last + 1)),
            tuple(
                tuple(d for d in range(s, s + length) if d < days) for s in range(first, last + 1)
            ),
        )
        for i, (first, last, length, rate) in enumerate(jobs)
    )
    return Problem(days, ("crew",), {"crew": 99}, {"crew": tuple(fixed)}, movables, (), {})


def brute_minimum(p: Problem) -> int:
    best = None
    for combo in itertools.product(*(range(len(m.runs)) for m in p.movables)):
        load = list(p.fixed_load["crew"])
        for m, k in zip(p.movables, combo, strict=True):
            for d in m.runs[k]:
                load[d] += m.crew["crew"]
        peak = max(load, default=0)
        best = peak if best is None else min(best, peak)
    return best or 0


@st.composite
def problems(draw):
    days = draw(st.integers(1, 8))
    fixed = draw(st.lists(st.integers(0, 5), min_size=days, max_size=days))
    jobs = []
    for _ in range(draw(st.integers(0, 5))):
        first = draw(st.integers(0, days - 1))
        last = draw(st.integers(first, min(days - 1, first + 3)))
        jobs.append((first, last, draw(st.integers(1, 4)), draw(st.integers(1, 5))))
    return problem(days, fixed, jobs)


@settings(max_examples=300, deadline=None, derandomize=True)
@given(problems())
def test_bound_never_exceeds_the_enumerated_minimum_and_never_weakens(p) -> None:
    bound = lower_bound(p, "crew")
    assert bound.people <= brute_minimum(p)
    with mock.patch.object(fewest_bounds, "SUBSET_DAYS", 0):
        intervals_only = lower_bound(p, "crew")
    assert bound.people >= intervals_only.people
    if bound.reason == "days":
        assert len(bound.days) == bound.work_days >= 2
        assert bound.days[0] == bound.first and bound.days[-1] == bound.last


def test_two_busy_days_with_a_quiet_one_between() -> None:
    """Worked by hand: 3 people of fixed work on days 0 and 2, none on day 1, and a 2-day job of
    3 people that starts on day 0 or 1. Any start covers day 0 or day 2, so the peak is 6.
    Intervals prove only 4 (days 0-2: 3 + 3 + 6 = 12 person-days over 3 days); the set {0, 2}
    proves 5 (3 + 3 + 3 = 9 over 2 days, rounded up), and brute force gives 6."""
    p = problem(3, [3, 0, 3], [(0, 1, 2, 3)])
    with mock.patch.object(fewest_bounds, "SUBSET_DAYS", 0):
        assert lower_bound(p, "crew").people == 4
    bound = lower_bound(p, "crew")
    assert (bound.people, bound.reason, bound.days, bound.person_days) == (5, "days", (0, 2), 9)
    assert brute_minimum(p) == 6


def test_the_sheet_names_the_chosen_days() -> None:
    from datetime import date, timedelta

    from fieldlog.lookahead.fewest_people import CrewAnswer
    from fieldlog.lookahead.fewest_text import bound_line

    p = problem(3, [3, 0, 3], [(0, 1, 2, 3)])
    days = tuple(date(2026, 3, 2) + timedelta(days=k) for k in range(3))
    answer = CrewAnswer("crew", 99, 6, 6, lower_bound(p, "crew"), False, (6, 3, 3))
    assert bound_line(answer, days) == (
        "crew: 9 person-days must fall on these 2 working days, whatever starts the work "
        "takes (Mon 02 Mar 2026, Wed 04 Mar 2026): at least 5 people a day."
    )
