"""The forecast history as JSON (everything) and CSV (one row per window, for a spreadsheet)."""

from __future__ import annotations

import csv
import io
import json
from dataclasses import asdict
from datetime import date
from typing import Any

from fieldlog.history.causes import BUCKETS
from fieldlog.history.values import History, WeekReliability, Window

CSV_COLUMNS = (
    "window",
    "first",
    "last",
    "status",
    "finish",
    "finish_float",
    "movement",
    *BUCKETS,
    "driving_path",
)


def _plain(value: Any) -> Any:
    if isinstance(value, date):
        return value.isoformat()
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [_plain(v) for v in value]
    return value


def window_json(w: Window) -> dict[str, Any]:
    """One window: dates ISO, split by bucket, steps and evidence as objects."""
    return {
        "window": w.label,
        "first": w.first.isoformat(),
        "last": w.last.isoformat(),
        "status": w.status.isoformat(),
        "finish": w.finish.isoformat(),
        "finish_float": w.finish_float,
        "movement": w.movement,
        "split": dict(w.split),
        "driving_path": list(w.driving_path),
        "steps": [_plain(asdict(s)) for s in w.steps],
        "evidence": [_plain(asdict(e)) for e in w.evidence],
    }


def week_json(wk: WeekReliability) -> dict[str, Any]:
    """One week's PPC with every assignment."""
    return {
        "first": wk.first.isoformat(),
        "last": wk.last.isoformat(),
        "plan_as_of": wk.plan_as_of.isoformat(),
        "planned": wk.planned,
        "done": wk.done,
        "ppc": None if wk.ppc is None else round(wk.ppc, 1),
        "must_planned": wk.must_planned,
        "must_done": wk.must_done,
        "assignments": [_plain(asdict(a)) for a in wk.assignments],
    }


def history_json(h: History) -> dict[str, Any]:
    """The ``fieldlog history --format json`` document."""
    return {
        "site": h.site,
        "revision": h.revision,
        "calendar": h.calendar,
        "finish_by": h.finish_by.isoformat() if h.finish_by else None,
        "by": h.by,
        "baseline": {
            "status": h.baseline_status.isoformat(),
            "finish": h.baseline_finish.isoformat(),
            "finish_float": h.baseline_float,
        },
        "total_movement": h.total_movement,
        "split": h.split,
        "windows": [window_json(w) for w in h.windows],
        "weeks": [week_json(wk) for wk in h.weeks],
        "problems": list(h.problems),
    }


def render_json(h: History) -> str:
    return json.dumps(history_json(h), indent=2, ensure_ascii=False) + "\n"


def render_csv(h: History) -> str:
    buf = io.StringIO()
    out = csv.writer(buf, lineterminator="\n")
    out.writerow(CSV_COLUMNS)
    for w in h.windows:
        out.writerow(
            [
                w.label,
                w.first.isoformat(),
                w.last.isoformat(),
                w.status.isoformat(),
                w.finish.isoformat(),
                "" if w.finish_float is None else w.finish_float,
                w.movement,
                *(w.split[b] for b in BUCKETS),
                " ".join(w.driving_path),
            ]
        )
    return buf.getvalue()
