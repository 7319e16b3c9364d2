"""The fewest-people rule that surprises a reader, stated where it applies.

Crews are settled one after another, the most over its headcount first; a crew settled later
keeps within its headcount, not within its early-start peak, so it may end higher than "all
work starts early" to make room for the crew settled before it (DEVELOPERS.md, "The
lookahead"). The sheet and the JSON say so in one line for every such crew; the golden files
hold both for the invented site below, whose answer is worked by hand in its docstring.
"""

from __future__ import annotations

import json
from datetime import date

from test_lookahead_oracle import act, make_site

from fieldlog.engine.cpm import compute_schedule
from fieldlog.lookahead import build_lookahead
from fieldlog.lookahead.fewest_text import lines, raised_line
from fieldlog.reports.lookahead_data import render_json
from fieldlog.reports.lookahead_text import render_text
from fieldlog.site.model import Link
from tests.helpers.golden_files import assert_golden

SUN = date(2026, 3, 1)


def stair_core():
    """Worked by hand, window Mon-Fri 2-6 Mar 2026. The carpenters (4) frame the stair core
    Mon-Tue while the lift pit (carpenters 4, fixers 2, 2 days, 2 days of float: it must finish
    before the slab edge bars on Friday) also starts early: 8 carpenters. The pit can start
    Mon, Tue or Wed; only Wed keeps the carpenters at 4, the stair core's must work. The
    fixers, 3 at most if all work starts early (starter bars 2 on Wed, edge bars 3 on Fri),
    then have starter bars and the pit together on Wed: 4, their headcount, and no plan that
    keeps the carpenters at 4 has fewer."""
    acts = [
        act("K1", 2, "Set out and level"),
        act("A", 2, "Frame the stair core", crew={"carpenters": 4}),
        act("C", 1, "Fix starter bars", crew={"fixers": 2}),
        act("K2", 1, "Inspect the bars"),
        act("F", 1, "Fix slab edge bars", crew={"fixers": 3}),
        act("B", 2, "Form and fix the lift pit", crew={"carpenters": 4, "fixers": 2}),
        act("L", 5, "Pour and cure"),
    ]
    links = [
        Link("K1", "C"),
        Link("A", "C"),
        Link("C", "K2"),
        Link("K2", "F"),
        Link("F", "L"),
        Link("B", "F"),
    ]
    site = make_site(acts, links, crews={"carpenters": 4, "fixers": 4}, start=date(2026, 3, 2))
    return build_lookahead(compute_schedule(site, SUN), days=5, suggest_levelling=False)


def test_a_crew_settled_later_rises_to_make_room_and_the_sheet_says_so() -> None:
    la = stair_core()
    fewest = la.fewest
    assert fewest is not None
    assert [(a.crew, a.early_peak, a.peak, a.optimal) for a in fewest.crews] == [
        ("carpenters", 8, 4, True),
        ("fixers", 3, 4, True),
    ]
    (raised,) = fewest.raised
    assert (raised.crew, raised.early_peak, raised.peak, raised.room_for) == (
        "fixers",
        3,
        4,
        ("carpenters",),
    )
    line = raised_line(raised)
    assert line == (
        "fixers rises to 4 people (3 if all work starts early) to make room for carpenters; "
        "never above its headcount of 4."
    )
    assert line in lines(fewest, la.days)
    doc = json.loads(render_json(la))["fewest_people"]
    assert doc["raised"] == [
        {
            "crew": "fixers",
            "early_peak": 3,
            "people": 4,
            "available": 4,
            "to_make_room_for": ["carpenters"],
        }
    ]


def test_no_line_when_no_crew_rises() -> None:
    """One crew only: the plan never puts it above its early peak, so nothing is said."""
    site = make_site(
        [act("A1", 3, crew={"carpenters": 4}), act("A2", 3, crew={"carpenters": 4}), act("A3", 6)],
        [Link("A1", "A3"), Link("A2", "A3")],
        crews={"carpenters": 6},
        start=date(2026, 3, 2),
    )
    la = build_lookahead(compute_schedule(site, SUN), days=5, suggest_levelling=False)
    assert la.fewest is not None and la.fewest.raised == ()
    assert not any("rises to" in t for t in lines(la.fewest, la.days))
    assert json.loads(render_json(la))["fewest_people"]["raised"] == []


def test_golden_sheet_and_json() -> None:
    la = stair_core()
    assert_golden("fewest_raised_80.txt", render_text(la, 80))
    assert_golden("fewest_raised.json", render_json(la))
