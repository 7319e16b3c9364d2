"""Print a schedule: a float list a foreman can read, JSON for other tools, CSV for the office.

Text is sorted by total float (critical and late first), then early start, then id, so the
activities that decide the finish are at the top. Bytes are deterministic: the same schedule
prints the same file on every platform (``\\n`` line ends).
"""

from __future__ import annotations

import csv
import io
import json
from datetime import date
from functools import lru_cache

from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult, ScheduleResult
from fieldlog.reports.text_fit import fit, width
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


def render_schedule(result: ScheduleResult, fmt: str) -> str:
    """The schedule in ``fmt`` (one of :data:`FORMATS`)."""
    if fmt == "json":
        return json_text(schedule_json(result))
    if fmt == "csv":
        return _csv(result)
    return _text(result)


def _iso(d: date | None) -> str | None:
    return d.isoformat() if d else None


def activity_json(r: ActivityResult) -> dict:
    """One activity as the JSON contract has it (ISO dates, null where none)."""
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


def schedule_json(result: ScheduleResult) -> dict:
    """The ``fieldlog schedule --format json`` document."""
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
        "activities": [activity_json(r) for r in result.activities],
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


def _csv(result: ScheduleResult) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_COLUMNS)
    for r in result.activities:
        row = activity_json(r)
        w.writerow([_csv_cell(row[c]) for c in CSV_COLUMNS])
    return buf.getvalue()


def _csv_cell(value: object) -> object:
    """Spreadsheet-friendly cell: empty for none, lowercase true/false for flags."""
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    return value


def sort_key(r: ActivityResult) -> tuple:
    """Float list order: open work by float then start; finished work last."""
    if r.status is Status.FINISHED:
        return (1, 0, r.actual_finish or date.min, r.id)
    return (0, r.total_float, r.early_start, r.id)


_MARK = {Status.FINISHED: "done", Status.IN_PROGRESS: "on", Status.NOT_STARTED: ""}


def _text(result: ScheduleResult) -> str:
    site = result.site
    idw = max([10, *(width(r.id) for r in result.activities)])
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
    ]
    for r in sorted(result.activities, key=sort_key):
        flag = ("!" if r.late else "*" if r.critical else " ") + (">" if r.on_driving_path else " ")
        start = r.actual_start if r.status is not Status.NOT_STARTED else r.early_start
        lines.append(
            f"{flag}{fit(r.id, idw)} {fit(r.name, 30)} {_MARK[r.status]:<5} {_d(start):<9} "
            f"{_d(r.actual_finish or r.early_finish):<9} {_d(r.late_finish):<9} "
            f"{_n(r.total_float):>4} {_n(r.free_float):>3} {r.remaining:>3}"
        )
    lines += [
        "",
        "! late (negative float)  * critical  > on the driving path  "
        "TF/FF total/free float, Rem remaining (working days)",
    ]
    for o in result.out_of_sequence:
        lines.append(f"Out of sequence: {o.describe()}")
    return "\n".join(line.rstrip() for line in lines) + "\n"


def _finish_line(result: ScheduleResult) -> str:
    text = f"Forecast finish {result.finish:%a %d %b %Y}"
    if result.site.finish_by is not None and result.finish_float is not None:
        text += (
            f"; required {result.site.finish_by:%a %d %b %Y}: "
            f"{against_required(result.finish_float)}"
        )
    return text


@lru_cache(maxsize=4096)
def _d(d: date | None) -> str:
    return d.strftime("%d %b %y") if d else ""


def _n(v: int | None) -> str:
    return "" if v is None else str(v)
