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
from collections.abc import Callable, Iterator, Mapping, Sequence
from datetime import date
from itertools import islice
from json.encoder import encode_basestring
from typing import TYPE_CHECKING, Any

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


_LINE = (
    '{"id": %s, "name": %s, "status": %s, "calendar": %s, "cells": %s, "reasons": %s, '
    '"cell_reasons": %s, "late": %s, "total_float": %d, "free_float": %d, "critical": %s, '
    '"remaining": %d, "early_start": %s, "early_finish": %s, "late_start": %s, '
    '"late_finish": %s, "not_ready": %s, "crew": %s}'
)
"""One activity's line: the compact encoder's text of :func:`activity_json`, keys in order."""
_TRUE_FALSE = {True: "true", False: "false"}


def activity_lines(rows: Sequence[ActivityRow]) -> list[str]:
    """Each row's line of the JSON: exactly ``_compact(activity_json(row))``, a column at a time.

    The general encoder costs ~30 us an activity (a dict, an enum lookup per cell, the
    encoder's own walk); here every column is turned into its JSON text by one C-level
    ``map`` (strings through the encoder's own escaper, so names and reasons come out byte
    for byte the same), each distinct value once where values repeat (dates, statuses,
    calendars, the cells and reason indexes of a pattern shared by many activities, crews),
    and a line is one ``%`` of :data:`_LINE`. Should a number or flag column hold anything
    but plain ``int`` or ``bool`` (never expected), every line goes through the encoder.
    """
    if not rows:
        return []
    columns = zip(*rows, strict=True)  # ActivityRow's fields, in order
    ids, names, status, calendar, remaining, es, ef, ls, lf, tf, ff, critical = islice(columns, 12)
    cells, reasons, why, not_ready, crew = columns
    if not (_only(int, remaining, tf, ff) and _only(bool, critical)):
        return [_compact(activity_json(row)) for row in rows]
    esc = encode_basestring
    day = {d: _date(d) for d in {*es, *ef, *ls, *lf}}
    return list(
        map(
            _LINE.__mod__,
            zip(
                map(esc, ids),
                map(esc, names),
                _each(status, lambda s: esc(s.value)),
                _each(calendar, esc),
                _by_identity(cells, lambda c: _compact([cell.value for cell in c])),
                map(_strings, reasons),
                _by_identity(why, lambda w: _compact(list(w))),
                ["true" if t < 0 else "false" for t in tf],
                tf,
                ff,
                map(_TRUE_FALSE.__getitem__, critical),
                remaining,
                map(day.__getitem__, es),
                map(day.__getitem__, ef),
                map(day.__getitem__, ls),
                map(day.__getitem__, lf),
                _each(not_ready, _strings),
                _by_identity(crew, _crew),
                strict=True,
            ),
        )
    )


def _only(kind: type, *columns: tuple) -> bool:
    """Every value of every column is of exactly type ``kind`` (bool is not int here)."""
    return all(set(map(type, column)) <= {kind} for column in columns)


def _each(values: tuple, text: Callable[[Any], str]) -> Iterator[str]:
    """``text`` of each value, worked out once per distinct (hashable) value."""
    done = {v: text(v) for v in set(values)}
    return map(done.__getitem__, values)


def _by_identity(values: tuple, text: Callable[[Any], str]) -> Iterator[str]:
    """``text`` of each value, worked out once per distinct object: for values shared by many
    rows (a pattern's tuples, a crew mapping) that hash slowly (a tuple of enums) or not at
    all (a mapping). Every object stays referenced by ``values`` meanwhile, so no identity
    is reused."""
    done: dict[int, str] = {}
    for v in values:
        if id(v) not in done:
            done[id(v)] = text(v)
    return map(done.__getitem__, map(id, values))


def _crew(crew: Mapping[str, int]) -> str:
    """A crew mapping as the compact encoder writes it."""
    if not crew:
        return "{}"
    return "{" + ", ".join(f"{encode_basestring(k)}: {_int(v)}" for k, v in crew.items()) + "}"


def _strings(values: tuple[str, ...]) -> str:
    """A JSON list of strings, as the compact encoder writes it."""
    return "[" + ", ".join(map(encode_basestring, values)) + "]" if values else "[]"


def _int(value: int) -> str:
    """An integer as the encoder writes it; anything else (never expected) goes through
    the encoder itself, so the line can only ever be the encoder's."""
    return int.__repr__(value) if type(value) is int else _compact(value)


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
    and to diff. The activity lines are written by :func:`activity_lines`, byte for byte what
    the compact encoder makes of :func:`activity_json` (a test holds the two equal) in a
    fraction of the time; everything else goes through the encoder.
    """
    doc = lookahead_json_head(la)
    parts = []
    for key, value in doc.items():
        name = json.dumps(key)
        if key == "activities":
            with collector_paused():  # strings only: nothing for the collector to find
                value = activity_lines(la.rows)
        elif isinstance(value, list) and value and isinstance(value[0], dict):
            value = [_compact(v) for v in value]
        else:
            parts.append(f"  {name}: {_compact(value)}")
            continue
        if value:
            items = "    " + ",\n    ".join(value)
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
    patterns: dict[tuple[int, int], tuple[list, tuple[int, ...]]] = {}
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
            # A line is its day and the rest, and the rest repeats across a row's days: it
            # is made once per distinct (class, reason) of the row's pattern.
            kinds, slots = _day_kinds(row, patterns)
            rest = [
                f",{head},{value},{csv_field(row.reasons[k]) if k is not None else ''},{tail}\n"
                for value, k in kinds
            ]
            lines.extend(map(str.__add__, days, map(rest.__getitem__, slots)))
    return "".join(lines)


def _day_kinds(
    row: ActivityRow, patterns: dict[tuple[int, int], tuple[list, tuple[int, ...]]]
) -> tuple[list[tuple[str, int | None]], tuple[int, ...]]:
    """The distinct (class, reason index) pairs of a row's days, and each day's pair as a
    position in them; worked out once per pattern (rows share their cells and reason index
    tuples, :class:`fieldlog.lookahead.classify.PatternCache`), kept by the tuples' identity
    while the rows, which hold the tuples, are alive."""
    key = (id(row.cells), id(row.why))
    found = patterns.get(key)
    if found is None:
        pairs = [(cell.value, k) for cell, k in zip(row.cells, row.why, strict=True)]
        kinds = list(dict.fromkeys(pairs))
        at = {pair: n for n, pair in enumerate(kinds)}
        found = patterns[key] = (kinds, tuple(at[pair] for pair in pairs))
    return found


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
