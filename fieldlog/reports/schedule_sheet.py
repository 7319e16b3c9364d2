"""Print a schedule: a float list a foreman can read, JSON for other tools, CSV for the office.

Text is sorted by total float (critical and late first), then early start, then id, so the
activities that decide the finish are at the top. Bytes are deterministic: the same schedule
prints the same file on every platform (``\\n`` line ends).

All three are written from the schedule's columns (:mod:`fieldlog.engine.sheet_columns`), a
whole column at a time: every distinct date is formatted once, every cell of a column is
encoded by one C-level ``map``, and a row is one ``%`` of a fixed template. No row object or
per-row dict is made, so JSON and CSV of 10,000 activities cost less than building the rows.
tests/test_schedule_sheet.py checks the bytes against ``json.dumps(indent=2)`` and
``csv.writer`` over per-row dicts (the way the sheet was written before) on random sites.
"""

from __future__ import annotations

import csv
import io
import json
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from datetime import date
from json.encoder import encode_basestring_ascii
from operator import itemgetter

import numpy as np

from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult, ScheduleResult
from fieldlog.engine.rows import collector_paused
from fieldlog.engine.sheet_columns import NO_DAY, SheetColumns, day_texts, sheet_columns
from fieldlog.reports.text_fit import fit, plain, width
from fieldlog.reports.words import against_required

FORMATS = ("text", "json", "csv")

CSV_COLUMNS = (
    "id",
    "name",
    "status",
    "early_start",
    "early_finish",
    "late_start",
    "late_finish",
    "total_float",
    "free_float",
    "critical",
    "actual_start",
    "actual_finish",
    "remaining",
)

JSON_KEYS = (*CSV_COLUMNS, "driving_path", "driven_by", "calendar", "overdue_update")
"""The keys of one activity in the JSON contract, in order (the CSV's columns first)."""


def render_schedule(result: ScheduleResult, fmt: str) -> str:
    """The schedule in ``fmt`` (one of :data:`FORMATS`).

    The cyclic collector is paused meanwhile: a sheet is strings and the tuples that sort
    them, none in a cycle, and on 200,000 activities its collections cost 0.1 s.
    """
    with collector_paused():
        cols = sheet_columns(result.activities)
        if fmt == "json":
            return _json(result, cols)
        if fmt == "csv":
            return _csv(cols)
        return _text(result, cols)


def _iso(d: date | None) -> str | None:
    return d.isoformat() if d else None


def summary_json(result: ScheduleResult) -> dict:
    """The ``fieldlog schedule --format json`` document, activities left empty."""
    return {
        "site": result.site.name,
        "revision": result.site.revision,
        "as_of": result.as_of.isoformat(),
        "data_date": result.data_date.isoformat(),
        "finish": result.finish.isoformat(),
        "finish_by": _iso(result.site.finish_by),
        "finish_float": result.finish_float,
        "driving_path": list(result.driving_path),
        "out_of_sequence": [o.describe() for o in result.out_of_sequence],
        "activities": [],
    }


_ROW = json.JSONEncoder(separators=(",\n      ", ": "))


def json_text(doc: dict) -> str:
    """``json.dumps(doc, indent=2) + "\\n"``, byte for byte, but fast for 10,000 activities.

    With ``indent`` set, ``json.dumps`` always takes the pure-Python encoder; the activity rows
    (flat objects, the last key of ``doc``) are encoded here by the C encoder instead, with
    separators that give the same layout. A test checks the bytes against ``json.dumps``.
    """
    rows = doc["activities"]
    head = json.dumps({**doc, "activities": []}, indent=2)
    if not rows:
        return head + "\n"
    body = _ROW.encode(rows)[2:-2].replace("},\n      {", "\n    },\n    {\n      ")
    return head[: -len("[]\n}")] + "[\n    {\n      " + body + "\n    }\n  ]\n}\n"


_JSON_ROW = "    {\n" + ",\n".join(f'      "{key}": %s' for key in JSON_KEYS) + "\n    }"
"""One activity of the JSON document, every value already encoded."""

_FLAGS = np.array(["false", "true"], dtype=object)


@dataclass(frozen=True)
class _Encoding:
    """How JSON or CSV writes each kind of cell."""

    text: Callable[[str], str]
    day: Callable[[date], str]
    none: str
    """A missing date or number."""


_JSON = _Encoding(encode_basestring_ascii, lambda d: f'"{d.isoformat()}"', "null")
_CSV = _Encoding(str, date.isoformat, "")
"""Spreadsheet-friendly: empty for none (``csv.writer`` quotes what needs it)."""


def _cells(cols: SheetColumns, how: _Encoding) -> list[list[str]]:
    """Every column of :data:`JSON_KEYS` as encoded cells (CSV takes the first ones)."""

    def text(values: Sequence[str]) -> list[str]:
        return list(map(how.text, values))

    def number(values: Sequence[int | None]) -> list[str]:
        return [how.none if v is None else str(v) for v in values]

    def flag(values: np.ndarray) -> list[str]:
        return _FLAGS[values.astype(np.intp)].tolist()

    status = {s: how.text(s.value) for s in Status}
    es, ef, ls, lf, as_, af = day_texts(cols.dates(), how.day, how.none)
    return [
        text(cols.ids),
        text(cols.names),
        [status[s] for s in cols.status],
        es,
        ef,
        ls,
        lf,
        number(cols.total_float),
        number(cols.free_float),
        flag(cols.critical),
        as_,
        af,
        list(map(str, cols.remaining)),
        flag(cols.on_driving_path),
        text(cols.driven_by),
        text(cols.calendars),
        flag(cols.overdue),
    ]


def _json(result: ScheduleResult, cols: SheetColumns) -> str:
    head = json.dumps(summary_json(result), indent=2)
    if not len(cols):
        return head + "\n"
    rows = list(map(_JSON_ROW.__mod__, zip(*_cells(cols, _JSON), strict=True)))
    # One copy of the whole text: the head and the tail join with the rows.
    rows[0] = head[: -len("[]\n}")] + "[\n" + rows[0]
    rows[-1] += "\n  ]\n}\n"
    return ",\n".join(rows)


def _csv(cols: SheetColumns) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_COLUMNS)
    w.writerows(zip(*_cells(cols, _CSV)[: len(CSV_COLUMNS)], strict=True))
    return buf.getvalue()


def sort_key(r: ActivityResult) -> tuple:
    """Float list order: open work by float then start; finished work last."""
    if r.status is Status.FINISHED:
        return (1, 0, r.actual_finish or date.min, r.id)
    return (0, r.total_float, r.early_start, r.id)


_DATE_MIN = date.min.toordinal()
_MARK = {Status.FINISHED: "done", Status.IN_PROGRESS: "on", Status.NOT_STARTED: ""}


def _text(result: ScheduleResult, cols: SheetColumns) -> str:
    ids = cols.ids
    idw = max(10, max(map(len, ids), default=0)) if plain(ids) else max([10, *map(width, ids)])
    return float_list(result, idw, _text_rows(cols, idw))


def float_list(result: ScheduleResult, idw: int, rows: list[str]) -> str:
    """The text sheet around its activity ``rows`` (ids fitted to ``idw`` cells)."""
    site = result.site
    head = (
        f"{'':2}{'ID':<{idw}} {'Activity':<30} {'State':<5} {'Start':<9} {'Finish':<9} "
        f"{'Late fin':<9} {'TF':>4} {'FF':>3} {'Rem':>3}"
    )
    lines = [
        f"{site.name} - schedule revision {site.revision}",
        f"Status as of end of {result.as_of:%a %d %b %Y}; data date {result.data_date:%a %d %b %Y}",
        _finish_line(result),
        "",
        head,
        "-" * len(head),
        *rows,
        "",
        "! late (negative float)  * critical  > on the driving path  "
        "TF/FF total/free float, Rem remaining (working days)",
    ]
    for o in result.out_of_sequence:
        lines.append(f"Out of sequence: {o.describe()}")
    return "\n".join(line.rstrip() for line in lines) + "\n"


def _text_rows(cols: SheetColumns, idw: int) -> list[str]:
    """The float list's rows, in :func:`sort_key` order (the same keys, from the columns)."""
    fin = cols.finished
    started = np.array([s is not Status.NOT_STARTED for s in cols.status], dtype=bool)
    tf = np.array([0 if v is None else v for v in cols.total_float], dtype=np.int64)
    order = sorted(
        range(len(cols)),
        key=list(
            zip(
                fin.tolist(),
                np.where(fin, 0, tf).tolist(),
                np.where(fin, np.maximum(cols.actual_finish, _DATE_MIN), cols.early_start).tolist(),
                cols.ids,
                strict=True,
            )
        ).__getitem__,
    )
    pick = _picker(order)
    flag = np.where(tf < 0, 4, np.where(cols.critical, 2, 0)) + cols.on_driving_path
    starts, finishes, late_finishes = day_texts(
        (
            np.where(started, cols.actual_start, cols.early_start)[order],
            np.where(cols.actual_finish != NO_DAY, cols.actual_finish, cols.early_finish)[order],
            cols.late_finish[order],
        ),
        lambda d: d.strftime("%d %b %y"),
        "",
    )
    id_cell, ids = _cell(pick(cols.ids), idw)
    name_cell, names = _cell(pick(cols.names), 30)
    row = f"%s{id_cell} {name_cell} %-5s %-9s %-9s %-9s %4s %3s %3s"
    return list(
        map(
            row.__mod__,
            zip(
                map(_FLAG_CELLS.__getitem__, flag[order].tolist()),
                ids,
                names,
                map(_MARK.__getitem__, pick(cols.status)),
                starts,
                finishes,
                late_finishes,
                _numbers(pick(cols.total_float)),
                _numbers(pick(cols.free_float)),
                pick(cols.remaining),
                strict=True,
            ),
        )
    )


_FLAG_CELLS = ("  ", " >", "* ", "*>", "! ", "!>")
"""The two flag cells by code: 4 late, 2 critical (late wins), + 1 on the driving path."""


def _picker(order: list[int]) -> Callable[[Sequence], Sequence]:
    """A function giving a column's values in ``order`` (``itemgetter`` of two or more
    positions does it in C and returns a tuple)."""
    if len(order) >= 2:
        return itemgetter(*order)
    return lambda values: [values[k] for k in order]


def _numbers(values: Sequence[int | None]) -> Sequence[int | str | None]:
    """The numbers for ``%s`` cells, None (no float for finished work) as an empty cell
    (a column with no None is given as it is)."""
    if None not in values:
        return values
    return ["" if v is None else v for v in values]


def _cell(values: Sequence[str], columns: int) -> tuple[str, Sequence[str]]:
    """The row template's cell for a text column ``columns`` wide, and the values for it.

    Plain ASCII that fits (nearly every id and name) is padded by the template itself
    (``%-30s``); otherwise each value is fitted by :func:`~fieldlog.reports.text_fit.fit`
    to exactly ``columns`` cells (wide characters, cut names) and the cell is ``%s``.
    """
    if plain(values) and max(map(len, values), default=0) <= columns:
        return f"%-{columns}s", values
    return "%s", [
        v.ljust(columns)
        if len(v) <= columns and v.isascii() and v.isprintable()
        else fit(v, columns)
        for v in values
    ]


def _finish_line(result: ScheduleResult) -> str:
    text = f"Forecast finish {result.finish:%a %d %b %Y}"
    if result.site.finish_by is not None and result.finish_float is not None:
        text += (
            f"; required {result.site.finish_by:%a %d %b %Y}: "
            f"{against_required(result.finish_float)}"
        )
    return text
