"""The lookahead as data: JSON for other tools, CSV for the office's spreadsheets.

JSON (the contract in DEVELOPERS.md, Contracts, extended, never broken)::

    {"from": "2026-03-09", "days": ["2026-03-09", ...],
     "activities": [{"id", "name",
                     "cells": ["must" | "may" | "cannot" | "done" | "off", one per day],
                     "reasons": [...], "late": bool, "total_float", ...}],
     "crews": [{"crew", "available", "must": [...], "most": [...], ...}], ...}

``activities`` lists every unfinished activity. ``cell_reasons`` gives, per day, the index in
``reasons`` of the sentence that explains that cell (null for MUST days of on-time work and for
days off).

CSV has one row per activity and day with that day's class and reason. Both outputs are
deterministic: the same lookahead gives the same bytes (``\\n`` line ends).
"""

from __future__ import annotations

import csv
import io
import json
from datetime import date
from json.encoder import encode_basestring
from typing import TYPE_CHECKING

from fieldlog.engine.rows import collector_paused
from fieldlog.lookahead.build import ActivityRow, Lookahead
from fieldlog.lookahead.crew_load import CrewLoad

if TYPE_CHECKING:  # the suggestions' modules load only when a lookahead has one
    from fieldlog.lookahead.fewest_people import FewestPeople
    from fieldlog.lookahead.levelling import Levelling

CSV_COLUMNS = (
    "day",
    "id",
    "name",
    "cell",
    "reason",
    "total_float",
    "late",
    "not_ready",
    "early_start",
    "late_finish",
    "fewest_people_start",
)
"""``fewest_people_start`` (added last, so older readers keep working): the start day the
fewest-people plan gives the activity when it moves it, else empty."""


def _iso(d: date | None) -> str | None:
    return d.isoformat() if d else None


def activity_json(row: ActivityRow) -> dict:
    """One activity of the lookahead as JSON."""
    return {
        "id": row.id,
        "name": row.name,
        "status": row.status.value,
        "calendar": row.calendar,
        "cells": [c.value for c in row.cells],
        "reasons": list(row.reasons),
        "cell_reasons": list(row.why),
        "late": row.late,
        "total_float": row.total_float,
        "free_float": row.free_float,
        "critical": row.critical,
        "remaining": row.remaining,
        "early_start": _iso(row.early_start),
        "early_finish": _iso(row.early_finish),
        "late_start": _iso(row.late_start),
        "late_finish": _iso(row.late_finish),
        "not_ready": list(row.not_ready),
        "crew": dict(row.crew),
    }


class ActivityLines:
    """Writes one activity's line of the JSON: exactly ``_compact(activity_json(row))``.

    The general encoder costs ~30 us an activity (a dict, an enum lookup per cell, the
    encoder's own walk); this writes the line from its parts. Strings go through the
    encoder's own string escaper, so names and reasons come out byte for byte the same. The
    cells and their reason indexes belong to a pattern shared by many activities
    (:class:`fieldlog.lookahead.classify.PatternCache`), so their text is made once per
    pattern, keyed by the tuple's identity (the tuple is kept with its text, so the identity
    cannot be reused while the cache lives).
    """

    def __init__(self) -> None:
        self._cells: dict[int, tuple[tuple, str]] = {}
        self._why: dict[int, tuple[tuple, str]] = {}
        self._status: dict[object, str] = {}

    def __call__(self, row: ActivityRow) -> str:
        esc = encode_basestring
        cells = self._cells.get(id(row.cells))
        if cells is None or cells[0] is not row.cells:
            cells = (row.cells, _compact([c.value for c in row.cells]))
            self._cells[id(row.cells)] = cells
        why = self._why.get(id(row.why))
        if why is None or why[0] is not row.why:
            why = (row.why, _compact(list(row.why)))
            self._why[id(row.why)] = why
        status = self._status.get(row.status)
        if status is None:
            status = self._status[row.status] = esc(row.status.value)
        tf = row.total_float
        crew = row.crew
        crew_text = (
            "{" + ", ".join(f"{esc(k)}: {_int(v)}" for k, v in crew.items()) + "}" if crew else "{}"
        )
        return (
            f'{{"id": {esc(row.id)}, "name": {esc(row.name)}, "status": {status}, '
            f'"calendar": {esc(row.calendar)}, "cells": {cells[1]}, '
            f'"reasons": {_strings(row.reasons)}, "cell_reasons": {why[1]}, '
            f'"late": {"true" if tf < 0 else "false"}, "total_float": {_int(tf)}, '
            f'"free_float": {_int(row.free_float)}, '
            f'"critical": {_bool(row.critical)}, '
            f'"remaining": {_int(row.remaining)}, '
            f'"early_start": {_date(row.early_start)}, '
            f'"early_finish": {_date(row.early_finish)}, '
            f'"late_start": {_date(row.late_start)}, '
            f'"late_finish": {_date(row.late_finish)}, '
            f'"not_ready": {_strings(row.not_ready)}, "crew": {crew_text}}}'
        )


def _strings(values: tuple[str, ...]) -> str:
    """A JSON list of strings, as the compact encoder writes it."""
    return "[" + ", ".join(map(encode_basestring, values)) + "]" if values else "[]"


def _int(value: int) -> str:
    """An integer as the encoder writes it; anything else (never expected) goes through
    the encoder itself, so the line can only ever be the encoder's."""
    return int.__repr__(value) if type(value) is int else _compact(value)


def _bool(value: bool) -> str:
    """True or False as the encoder writes them (anything else: the encoder's own text)."""
    if value is True:
        return "true"
    return "false" if value is False else _compact(value)


def _date(value: date | None) -> str:
    """A date (or None) as :func:`activity_json` gives it to the encoder."""
    return f'"{value.isoformat()}"' if value else "null"


def crew_json(load: CrewLoad, days: tuple[date, ...]) -> dict:
    """One crew's load as JSON, with the days it is over its headcount."""
    return {
        "crew": load.crew,
        "available": load.available,
        "must": list(load.must),
        "most": list(load.most),
        "early_start": list(load.early),
        "levelled": list(load.levelled) if load.levelled is not None else None,
        "over_days_must": _over_days(days, load.over(load.must)),
        "over_days_early_start": _over_days(days, load.over(load.early)),
    }


def _over_days(days: tuple[date, ...], over: tuple[bool, ...]) -> list[str]:
    return [d.isoformat() for d, o in zip(days, over, strict=True) if o]


def levelling_json(lev: Levelling | None) -> dict | None:
    """The levelling suggestion as JSON (None when no crew was over its headcount)."""
    if lev is None:
        return None
    return {
        "method": lev.method,
        "crews": list(lev.crews),
        "passes": lev.passes,
        "sum_of_squares_before": lev.sum_of_squares_before,
        "sum_of_squares_after": lev.sum_of_squares_after,
        "moves": [
            {
                "id": m.activity,
                "name": m.name,
                "early_start": _iso(m.early_start),
                "start": _iso(m.start),
                "finish": _iso(m.finish),
                "float_used": m.float_used,
                "crew": dict(m.crew),
            }
            for m in lev.moves
        ],
    }


def fewest_json(fewest: FewestPeople | None, days: tuple[date, ...]) -> dict | None:
    """The fewest-people plan as JSON (None when no crew is over or near its headcount)."""
    if fewest is None:
        return None
    from fieldlog.lookahead.fewest_people import CAUTION

    return {
        "method": fewest.method,
        "finish": _iso(fewest.finish),
        "nodes": fewest.nodes,
        "budget": fewest.budget,
        "caution": CAUTION,
        "crews": [
            {
                "crew": a.crew,
                "available": a.available,
                "early_peak": a.early_peak,
                "people": a.peak,
                "optimal": a.optimal,
                "lower_bound": a.bound.people,
                "bound_reason": a.bound.reason,
                "bound_from": _iso(days[a.bound.first]),
                "bound_to": _iso(days[a.bound.last]),
                "bound_person_days": a.bound.person_days,
                "bound_work_days": a.bound.work_days,
                "bound_days": [_iso(days[d]) for d in a.bound.days],
                "load": list(a.load),
            }
            for a in fewest.crews
        ],
        "moves": [
            {
                "id": m.activity,
                "name": m.name,
                "early_start": _iso(m.early_start),
                "start": _iso(m.start),
                "finish": _iso(m.finish),
                "float_used": m.float_used,
                "crew": dict(m.crew),
            }
            for m in fewest.moves
        ],
        "raised": [
            {
                "crew": r.crew,
                "early_peak": r.early_peak,
                "people": r.peak,
                "available": r.available,
                "to_make_room_for": list(r.room_for),
            }
            for r in fewest.raised
        ],
    }


def lookahead_json(la: Lookahead) -> dict:
    """The ``fieldlog lookahead --format json`` document."""
    doc = lookahead_json_head(la)
    doc["activities"] = [activity_json(row) for row in la.rows]
    return doc


def lookahead_json_head(la: Lookahead) -> dict:
    """The document with ``activities`` left empty (in its place among the keys): the
    renderer writes the activity lines itself."""
    return {
        "site": la.site,
        "revision": la.revision,
        "as_of": la.as_of.isoformat(),
        "data_date": la.data_date.isoformat(),
        "from": la.days[0].isoformat(),
        "to": la.days[-1].isoformat(),
        "days": [d.isoformat() for d in la.days],
        "finish": la.finish.isoformat(),
        "finish_by": _iso(la.finish_by),
        "finish_float": la.finish_float,
        "activities": [],
        "finished": [
            {
                "id": f.id,
                "name": f.name,
                "actual_start": _iso(f.actual_start),
                "actual_finish": _iso(f.actual_finish),
            }
            for f in la.finished
        ],
        "crews": [crew_json(load, la.days) for load in la.crews],
        "levelling": levelling_json(la.levelling),
        "fewest_people": fewest_json(la.fewest, la.days),
    }


def render_json(la: Lookahead) -> str:
    """JSON text ending in a newline: one top-level key per line, one activity per line.

    A line per activity keeps a 10,000-activity file quick to write and still easy to read
    and to diff. The activity lines are written by :class:`ActivityLines`, byte for byte what
    the compact encoder makes of :func:`activity_json` (a test holds the two equal) in a
    fraction of the time; everything else goes through the encoder.
    """
    doc = lookahead_json_head(la)
    parts = []
    for key, value in doc.items():
        name = json.dumps(key)
        if key == "activities":
            line = ActivityLines()
            with collector_paused():  # strings only: nothing for the collector to find
                value = [line(row) for row in la.rows]
        elif isinstance(value, list) and value and isinstance(value[0], dict):
            value = [_compact(v) for v in value]
        else:
            parts.append(f"  {name}: {_compact(value)}")
            continue
        if value:
            items = ",\n".join("    " + v for v in value)
            parts.append(f"  {name}: [\n{items}\n  ]")
        else:
            parts.append(f"  {name}: []")
    return "{\n" + ",\n".join(parts) + "\n}\n"


def _compact(value: object) -> str:
    return json.dumps(value, ensure_ascii=False, separators=(", ", ": "))


def render_csv(la: Lookahead) -> str:
    """CSV text: a header, then one row per activity and day.

    Byte for byte what ``csv.writer`` (``lineterminator="\\n"``) writes of those rows (a test
    holds the two equal), made a line at a time from the activity's fields encoded once:
    140,000 rows of a 10,000-activity fortnight took 0.3 s through the writer.
    """
    days = [d.isoformat() for d in la.days]  # ISO dates are never quoted
    moved = {m.activity: m.start.isoformat() for m in la.fewest.moves} if la.fewest else {}
    lines = [",".join(map(csv_field, CSV_COLUMNS)) + "\n"]
    with collector_paused():  # strings only
        for row in la.rows:
            head = f"{csv_field(row.id)},{csv_field(row.name)}"
            tail = ",".join(
                (
                    str(row.total_float),
                    "true" if row.late else "false",  # as in the schedule CSV
                    csv_field("; ".join(row.not_ready)),
                    row.early_start.isoformat(),
                    row.late_finish.isoformat(),
                    moved.get(row.id, ""),
                )
            )
            reasons = [csv_field(r) for r in row.reasons]
            lines.extend(
                f"{day},{head},{cell.value},{reasons[k] if k is not None else ''},{tail}\n"
                for day, cell, k in zip(days, row.cells, row.why, strict=True)
            )
    return "".join(lines)


def csv_field(text: str) -> str:
    """``text`` as one field of a ``csv.writer`` row (the excel dialect, quoting minimal).

    Printable text without a comma or a quote is written as it is (the writer quotes only a
    field holding the delimiter, the quote character or a line break); anything else goes
    through the writer itself, so its quoting is always the writer's.
    """
    if text.isprintable() and "," not in text and '"' not in text:
        return text
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerow((text, ""))
    return buf.getvalue()[:-2]  # less the empty second field's comma and the line end
