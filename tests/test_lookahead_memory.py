"""A lookahead lets go of its schedule as soon as nobody holds it: no reference cycle.

A cycle (an object holding its own bound methods, say) keeps everything it reaches alive
until the garbage collector's next full pass, which on a 10,000-activity site means every
result row, and at the end of a command the interpreter's last collection walks them all.
The witness is Python's own ``weakref`` with the collector switched off: the schedule must be
gone the moment the last name for it is dropped. The site is invented.
"""

from __future__ import annotations

import gc
import weakref
from datetime import date, timedelta

from test_lookahead_oracle import act, make_site

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.readiness import OpenItem
from fieldlog.lookahead import build_lookahead
from fieldlog.reports.lookahead_data import render_json
from fieldlog.reports.lookahead_text import render_text
from fieldlog.site.model import Link, LinkType


def test_the_schedule_is_freed_by_reference_counting_alone() -> None:
    start = date(2026, 3, 2)
    site = make_site(
        [act("A", 3, crew={"fixers": 2}), act("B", 2, crew={"fixers": 2}), act("C", 4)],
        [Link("A", "B", LinkType.FS, 1), Link("A", "C", LinkType.SS)],
        crews={"fixers": 2},
    )
    status = start - timedelta(days=1)
    items = [OpenItem("C", "drawings", "drawings", start + timedelta(days=3), status)]
    was_on = gc.isenabled()
    gc.disable()
    try:
        result = compute_schedule(site, status)
        assert result.activities[0].id == "A"  # the rows are built
        gone = weakref.ref(result)
        la = build_lookahead(result, items)
        render_json(la)
        render_text(la, 80)
        del la, result
        assert gone() is None, "something holds the schedule in a reference cycle"
    finally:
        if was_on:
            gc.enable()
