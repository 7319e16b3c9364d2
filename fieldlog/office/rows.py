"""One site's rows for every table of the office database, from a loaded site.

Pure: a :class:`~fieldlog.workspace.SiteState` in, plain tuples out, in the column order of
:mod:`fieldlog.office.schema`. The journal is exported twice on purpose: ``entries`` holds every
entry exactly as recorded (the legal record, with ``superseded_by`` naming a correction), while
``lost_time``, ``crew_days`` and ``readiness`` hold what counts once corrections are applied,
so the office's sums agree with the site's own reports.
"""

from __future__ import annotations

import json
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from datetime import date
from typing import Any

from fieldlog.journal import Entry
from fieldlog.workspace import SiteState

Row = tuple[Any, ...]


@dataclass(frozen=True)
class SiteRows:
    """Rows per table for one site (``site_id`` is added when they are written)."""

    tables: Mapping[str, Sequence[Row]]
    run: Row
    """The ``schedule_runs`` row (without ``site_id``)."""
    results: Sequence[Row]
    """``schedule_results`` rows (without ``site_id``)."""


def _iso(value: date | None) -> str | None:
    return None if value is None else value.isoformat()


def _joined(values: Iterable[str] | None) -> str | None:
    items = list(values or ())
    return ",".join(items) if items else None


def _json_value(value: object) -> object:
    if isinstance(value, date):
        return value.isoformat()
    if isinstance(value, tuple | list):
        return [_json_value(v) for v in value]
    return value


def fields_json(fields: Mapping[str, Any]) -> str:
    """An entry's own fields as JSON text (dates ISO, keys in the order recorded)."""
    return json.dumps({k: _json_value(v) for k, v in fields.items()}, ensure_ascii=False)


def site_rows(state: SiteState) -> SiteRows:
    """Every row the site contributes (see the module docstring)."""
    site, result, rp = state.site, state.schedule, state.replay
    as_of = state.as_of.isoformat()
    activities = [
        (
            a.id,
            a.name,
            a.duration,
            a.calendar,
            _iso(a.start_not_before),
            _iso(a.finish_not_after),
            _joined(f"{k}={v}" for k, v in sorted(a.crew.items())) or "",
        )
        for a in site.activities
    ]
    links = [(k.pred, k.succ, k.type.value, k.lag) for k in site.links]
    crews = [(c.name, c.available) for c in site.crews.values()]
    entries = [_entry_row(e, rp.superseded.get(e.id)) for e in state.journal.entries]
    effective = rp.effective
    lost = [
        (
            e.id,
            e.day.isoformat(),
            e.fields["cause"],
            int(bool(e.fields.get("whole_day"))),
            e.fields.get("hours"),
            _joined(e.fields.get("activities")),
            _joined(e.fields.get("calendars")),
            e.fields.get("note"),
        )
        for e in effective
        if e.kind == "lost-time"
    ]
    crew_days = [
        (
            e.id,
            e.day.isoformat(),
            e.fields["trade"],
            e.fields.get("company"),
            e.fields["headcount"],
            e.fields.get("hours"),
            _joined(e.fields.get("activities")),
        )
        for e in effective
        if e.kind == "crew"
    ]
    readiness = []
    for e in effective:
        if e.kind != "need":
            continue
        cleared = rp.cleared.get(e.id)
        readiness.append(
            (
                e.id,
                e.fields["activity"],
                e.fields["what"],
                e.fields["category"],
                _iso(e.fields.get("expected")),
                e.day.isoformat(),
                cleared.id if cleared else None,
                _iso(cleared.day) if cleared else None,
            )
        )
    results = [
        (
            as_of,
            r.id,
            r.status.value,
            r.early_start.isoformat(),
            r.early_finish.isoformat(),
            _iso(r.late_start),
            _iso(r.late_finish),
            r.total_float,
            r.free_float,
            int(r.critical),
            int(r.on_driving_path),
            r.remaining,
            _iso(r.actual_start),
            _iso(r.actual_finish),
        )
        for r in result.activities
    ]
    run = (
        as_of,
        site.revision,
        result.finish.isoformat(),
        result.finish_float,
        sum(1 for r in result.activities if r.critical),
        sum(1 for r in result.activities if r.late),
    )
    return SiteRows(
        tables={
            "activities": activities,
            "links": links,
            "crews": crews,
            "entries": entries,
            "lost_time": lost,
            "crew_days": crew_days,
            "readiness": readiness,
        },
        run=run,
        results=results,
    )


def _entry_row(e: Entry, superseded_by: Entry | None) -> Row:
    return (
        e.id,
        e.kind,
        e.day.isoformat(),
        e.device,
        e.author,
        e.written.isoformat(),
        e.file,
        e.position,
        _joined(e.activities()),
        superseded_by.id if superseded_by else None,
        fields_json(e.fields),
    )
