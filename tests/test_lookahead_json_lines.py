"""The lookahead JSON and CSV write their lines themselves: they must be the stdlib's bytes.

``render_json`` builds each activity's line from its parts (much faster than a dict through
``json.dumps``). The outside reference here is Python's own ``json`` module: every line must
equal ``json.dumps(activity_json(row), ensure_ascii=False, separators=(", ", ": "))``, and the
whole document must parse (``json.loads``) to exactly :func:`lookahead_json`. The random
sites carry names and crews full of what an escaper can get wrong: quotes, backslashes,
control characters, non-ASCII letters, characters outside the Basic Multilingual Plane.
The CSV's reference is Python's ``csv.writer`` over one row per activity and day (the way
the file was written before); the same sites must give exactly its bytes. All sites are
invented.
"""

from __future__ import annotations

import csv
import io
import json
from datetime import date, timedelta

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from test_lookahead_exact import problems
from test_lookahead_oracle import act, make_site

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Progress
from fieldlog.engine.readiness import OpenItem
from fieldlog.lookahead import build_lookahead
from fieldlog.reports.lookahead_data import (
    CSV_COLUMNS,
    activity_json,
    activity_lines,
    csv_field,
    lookahead_json,
    render_csv,
    render_json,
)
from fieldlog.site.model import Link, LinkType

AWKWARD = 'Pour "slab" \\ bay 2\t\u00e9tage \u2013 n\u00b0 3 \U0001f6a7 \x01 end'


def _reference_line(row) -> str:
    """The stdlib encoder's line for one row (the outside reference)."""
    return json.dumps(activity_json(row), ensure_ascii=False, separators=(", ", ": "))


def reference_csv(la) -> str:
    """The lookahead CSV through ``csv.writer``, one row per activity and day."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_COLUMNS)
    days = [d.isoformat() for d in la.days]
    moved = {m.activity: m.start.isoformat() for m in la.fewest.moves} if la.fewest else {}
    for row in la.rows:
        for day, cell, k in zip(days, row.cells, row.why, strict=True):
            w.writerow(
                (
                    day,
                    row.id,
                    row.name,
                    cell.value,
                    row.reasons[k] if k is not None else "",
                    row.total_float,
                    "true" if row.late else "false",
                    "; ".join(row.not_ready),
                    row.early_start.isoformat(),
                    row.late_finish.isoformat(),
                    moved.get(row.id, ""),
                )
            )
    return buf.getvalue()


def _check(la) -> None:
    lines = activity_lines(la.rows)
    assert len(lines) == len(la.rows)
    for line, row in zip(lines, la.rows, strict=True):
        assert line == _reference_line(row), row.id
    assert json.loads(render_json(la)) == lookahead_json(la)
    assert render_csv(la) == reference_csv(la)


@given(st.text(alphabet=st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=8))
def test_a_csv_field_is_the_writers_own(text: str) -> None:
    """Any text (commas, quotes, line breaks, controls, none of them) as ``csv.writer``
    writes it among other fields."""
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerow(("a", text, "b"))
    assert f"a,{csv_field(text)},b\n" == buf.getvalue()


names = st.text(
    alphabet=st.characters(codec="utf-8", exclude_categories=("Cs",)), min_size=1, max_size=12
)


@settings(
    max_examples=60, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow]
)
@given(problems(), st.lists(names, min_size=4, max_size=4))
def test_lines_equal_the_stdlib_encoder_on_random_sites(p, labels) -> None:
    """Random networks (every link type, lags and leads, two calendars, progress, holds)
    with random names: each line equals the stdlib encoder's, the document parses back."""
    site = p.site
    renamed = tuple(
        act(a.id, a.duration, labels[k % len(labels)], calendar=a.calendar, crew={labels[k]: k})
        for k, a in enumerate(site.activities)
    )
    site = make_site(
        renamed,
        site.links,
        calendars=tuple(site.calendars.values()),
        start=site.start,
        finish_by=site.finish_by,
        crews=dict.fromkeys(labels, 3),
    )
    items = [
        OpenItem(aid, 'shop "drawings"', "drawings", until - timedelta(days=1), p.status)
        for aid, until in p.holds.items()
    ]
    result = compute_schedule(site, p.status, p.progress)
    _check(build_lookahead(result, items, p.data_date - timedelta(days=2), 21))


def test_awkward_names_late_work_and_readiness_flags() -> None:
    """A hand-made case with every kind of value a line holds: a late activity (negative
    float), work in progress, a readiness item with no date (a not-ready flag), a crew, and
    a name needing every escape."""
    start = date(2026, 3, 2)
    site = make_site(
        [
            act("A-1", 5, AWKWARD, crew={"fixers \u00e9": 2}),
            act("B-2", 3, "Second\nline", finish_not_after=start + timedelta(days=4)),
            act("C-3", 0, "Milestone \\ end"),
        ],
        [Link("A-1", "B-2", LinkType.FS, 1), Link("B-2", "C-3", LinkType.SS, -1)],
        crews={"fixers \u00e9": 2},
        finish_by=start + timedelta(days=3),
    )
    status = start + timedelta(days=1)
    progress = {"A-1": Progress(actual_start=start, remaining=4, remaining_as_of=status)}
    items = [OpenItem("B-2", 'rebar "cage"', "drawings", None, status)]
    result = compute_schedule(site, status, progress)
    la = build_lookahead(result, items)
    assert any(row.late for row in la.rows)
    assert any(row.not_ready for row in la.rows)
    _check(la)


def test_a_lookahead_with_no_open_work_writes_an_empty_list() -> None:
    """Everything finished: ``activities`` is ``[]`` as the encoder writes an empty list."""
    start = date(2026, 3, 2)
    site = make_site([act("A", 2, "Only")])
    status = start + timedelta(days=5)
    progress = {"A": Progress(actual_start=start, actual_finish=start + timedelta(days=1))}
    la = build_lookahead(compute_schedule(site, status, progress))
    assert la.rows == ()
    assert '  "activities": [],\n' in render_json(la)
    _check(la)


def test_a_number_or_flag_of_another_type_goes_through_the_encoder() -> None:
    """Never expected from the engine: a remaining count given as a bool, a float flag given
    as an int. The lines then come from the encoder itself, still its bytes exactly."""
    start = date(2026, 3, 2)
    site = make_site([act("A-1", 5, "First"), act("B-2", 3, "Second")], [Link("A-1", "B-2")])
    la = build_lookahead(compute_schedule(site, start))
    odd = (la.rows[0]._replace(remaining=True), la.rows[1]._replace(critical=1))
    for row in odd:
        assert activity_lines([row]) == [_reference_line(row)]
    assert activity_lines(odd) == [_reference_line(row) for row in odd]
