"""The schedule sheets written from columns, byte for byte against the per-row way.

:mod:`fieldlog.reports.schedule_sheet` writes text, JSON and CSV a whole column at a time.
The reference here is the sheet as it was written before, one row at a time: a dict per
activity, ``json.dumps(doc, indent=2)`` (the standard library's encoder is the judge of the
JSON bytes), ``csv.writer`` rows (the standard library's CSV dialect is the judge of quoting),
and the float list from each row's fields. Both run on 40 seeded random sites (every link
type, calendars, progress, finished work with and without a start; see
tests/test_cpm_differential.py) whose names mix commas, quotes, line breaks, accents, wide
characters, emoji and long text. The result's own columns, its built rows and a plain tuple
of rows must all print the same bytes. All data is invented.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import json
import random
from datetime import date

import pytest

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult, ScheduleResult
from fieldlog.reports.schedule_sheet import (
    CSV_COLUMNS,
    float_list,
    render_schedule,
    sort_key,
    summary_json,
)
from fieldlog.reports.text_fit import fit, width
from tests.test_cpm_differential import random_case

_PIECES = ("Pour", "slab", ",", '"', "'", "\n", "\r\n", "é", "Façade", "混凝土", "🏗️", "👷\u200d♀️")
_PIECES += ("\t", "%s", "\\", "grid A-C", "x" * 40, " ", "")


def _name(rng: random.Random) -> str:
    return "".join(rng.choice(_PIECES) for _ in range(rng.randint(0, 6))) or "Task"


def _case(seed: int) -> ScheduleResult:
    site, status, progress, lost, holds = random_case(seed)
    rng = random.Random(seed * 7919)
    acts = tuple(dataclasses.replace(a, name=_name(rng)) for a in site.activities)
    site = dataclasses.replace(site, name=_name(rng), activities=acts)
    return compute_schedule(site, status, progress, lost_days=lost, holds=holds)


def _iso(d: date | None) -> str | None:
    return d.isoformat() if d else None


def _row_json(r: ActivityResult) -> dict:
    return {
        "id": r.id,
        "name": r.name,
        "status": r.status.value,
        "early_start": _iso(r.early_start),
        "early_finish": _iso(r.early_finish),
        "late_start": _iso(r.late_start),
        "late_finish": _iso(r.late_finish),
        "total_float": r.total_float,
        "free_float": r.free_float,
        "critical": r.critical,
        "actual_start": _iso(r.actual_start),
        "actual_finish": _iso(r.actual_finish),
        "remaining": r.remaining,
        "driving_path": r.on_driving_path,
        "driven_by": r.driven_by,
        "calendar": r.calendar,
        "overdue_update": r.overdue,
    }


def reference_json(result: ScheduleResult) -> str:
    doc = {**summary_json(result), "activities": [_row_json(r) for r in result.activities]}
    return json.dumps(doc, indent=2) + "\n"


def _cell(value: object) -> object:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    return value


def reference_csv(result: ScheduleResult) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_COLUMNS)
    for r in result.activities:
        row = _row_json(r)
        w.writerow([_cell(row[c]) for c in CSV_COLUMNS])
    return buf.getvalue()


_MARK = {Status.FINISHED: "done", Status.IN_PROGRESS: "on", Status.NOT_STARTED: ""}


def _d(d: date | None) -> str:
    return d.strftime("%d %b %y") if d else ""


def _n(v: int | None) -> str:
    return "" if v is None else str(v)


def reference_text(result: ScheduleResult) -> str:
    """The float list's rows from each row's fields (the frame around them is shared)."""
    idw = max([10, *(width(r.id) for r in result.activities)])
    rows = []
    for r in sorted(result.activities, key=sort_key):
        flag = ("!" if r.late else "*" if r.critical else " ") + (">" if r.on_driving_path else " ")
        start = r.actual_start if r.status is not Status.NOT_STARTED else r.early_start
        rows.append(
            f"{flag}{fit(r.id, idw)} {fit(r.name, 30)} {_MARK[r.status]:<5} {_d(start):<9} "
            f"{_d(r.actual_finish or r.early_finish):<9} {_d(r.late_finish):<9} "
            f"{_n(r.total_float):>4} {_n(r.free_float):>3} {r.remaining:>3}"
        )
    return float_list(result, idw, rows)


REFERENCES = {"json": reference_json, "csv": reference_csv, "text": reference_text}


@pytest.mark.parametrize("seed", range(40))
def test_columns_print_the_bytes_of_the_per_row_sheet(seed: int) -> None:
    result = _case(seed)
    assert not result.activities.built  # type: ignore[attr-defined]
    from_columns = {fmt: render_schedule(result, fmt) for fmt in REFERENCES}
    assert not result.activities.built  # type: ignore[attr-defined]  # no row was needed
    want = {fmt: ref(result) for fmt, ref in REFERENCES.items()}
    narrowed = dataclasses.replace(result, activities=tuple(result.activities))
    for fmt in REFERENCES:
        assert from_columns[fmt] == want[fmt], (seed, fmt)
        assert render_schedule(result, fmt) == want[fmt], (seed, fmt)  # rows built now
        assert render_schedule(narrowed, fmt) == want[fmt], (seed, fmt)


_PLAIN = ("Pour", "slab", "%s", "%d", "grid A-C", " ", "x" * 9)
"""Printable ASCII only: the sheet pads such columns in its row template, not cell by cell."""


def _plain_case(seed: int, longest: int) -> ScheduleResult:
    """A random site whose names are plain ASCII, the first ``longest`` characters long."""
    result = _case(seed)
    rng = random.Random(seed * 104729)
    acts = [
        dataclasses.replace(a, name="".join(rng.choice(_PLAIN) for _ in range(4)).strip() or "T")
        for a in result.site.activities
    ]
    if acts:
        acts[0] = dataclasses.replace(acts[0], name="n" * longest)
    site = dataclasses.replace(result.site, activities=tuple(acts))
    return compute_schedule(site, result.as_of)


@pytest.mark.parametrize("longest", [30, 31])
@pytest.mark.parametrize("seed", range(10))
def test_plain_names_padded_by_the_template_print_the_per_row_sheet(seed, longest) -> None:
    """Names of 30 characters fit the column; one of 31 makes the sheet fit each cell."""
    result = _plain_case(seed, longest)
    assert render_schedule(result, "text") == reference_text(result), (seed, longest)


def test_the_cases_cover_what_the_columns_treat_apart() -> None:
    """The random sites include every status, finished work without a start, negative float,
    names CSV must quote and an empty site."""
    rows = [r for seed in range(40) for r in _case(seed).activities]
    assert {r.status for r in rows} == set(Status)
    assert any(r.status is Status.FINISHED and r.actual_start is None for r in rows)
    assert any(r.late for r in rows)
    assert any("," in r.name or '"' in r.name or "\n" in r.name for r in rows)
    assert any(not _case(seed).activities for seed in range(40))


@pytest.mark.parametrize("count", [1, 2])
def test_a_site_of_one_or_two_activities_prints_the_per_row_sheet(count: int) -> None:
    """The columns are put in order by ``itemgetter`` from two activities on; one activity
    takes the plain way. Both print the per-row sheet."""
    for seed in range(40):
        result = _case(seed)
        if len(result.site.activities) >= count:
            break
    acts = result.site.activities[:count]
    kept = {a.id for a in acts}
    links = tuple(lk for lk in result.site.links if lk.pred in kept and lk.succ in kept)
    site = dataclasses.replace(result.site, activities=acts, links=links)
    small = compute_schedule(site, result.as_of)
    assert len(small.activities) == count
    for fmt, reference in REFERENCES.items():
        assert render_schedule(small, fmt) == reference(small), fmt
