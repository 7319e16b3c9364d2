"""Journal entries as the app lists them: newest first, one line each, with what replaced what.

Order is the replay order reversed (the day the entry describes, then device, then place in
its file), never wall-clock time: two devices' clocks disagree, the days they describe do not.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from typing import Any

from fieldlog.app.recording import KIND_TITLES, label
from fieldlog.journal.entries import Entry
from fieldlog.reports.words import working_days


@dataclass(frozen=True)
class HistoryRow:
    """One entry in the journal list."""

    entry: Entry
    summary: str
    status: str
    """"" for a standing entry; "replaced by X", "withdrawn by X" or "corrects X"."""

    @property
    def superseded(self) -> bool:
        """True when a later correction replaced or withdrew this entry."""
        return self.status.startswith(("replaced", "withdrawn"))


def history_rows(entries: Iterable[Entry], superseded: Mapping[str, Entry]) -> list[HistoryRow]:
    """Every entry, newest first, with its summary and correction status.

    Args:
        entries: the journal's entries (any order).
        superseded: entry id -> the correction that replaced or withdrew it (from replay).
    """
    replaced = superseded
    rows = []
    for e in sorted(entries, key=lambda x: x.sort_key(), reverse=True):
        by = replaced.get(e.id)
        if by is not None:
            verb = "withdrawn" if by.fields.get("withdraw") else "replaced"
            status = f"{verb} by {by.id}"
        elif e.kind == "correction":
            status = f"corrects {e.fields.get('supersedes', '?')}"
        else:
            status = ""
        rows.append(HistoryRow(e, summarize(e), status))
    return rows


def summarize(e: Entry) -> str:
    """One line saying what the entry records, in plain words."""
    f = e.fields
    fn = _SUMMARIES.get(e.kind)
    if fn is not None:
        text = fn(f)
    else:
        text = f"{KIND_TITLES.get(e.kind, e.kind)}: " + ", ".join(
            f"{label(k)} {_v(v)}" for k, v in f.items()
        )
    return text.replace("\n", " / ")  # a note of several lines, on one line


def _v(v: Any) -> str:
    if isinstance(v, bool):
        return "yes" if v else "no"
    if isinstance(v, float):
        return f"{v:g}"
    if isinstance(v, list | tuple):
        return ", ".join(str(x) for x in v)
    if hasattr(v, "isoformat"):
        return v.strftime("%a %d %b")
    return str(v)


def _join(*parts: str | None) -> str:
    return ", ".join(p for p in parts if p)


def _acts(f: Mapping[str, Any]) -> str:
    ids = ([f["activity"]] if f.get("activity") else []) + list(f.get("activities", ()))
    return f" ({', '.join(ids)})" if ids else ""


def _weather(f: Mapping[str, Any]) -> str:
    unit = f.get("unit", "")
    temps = None
    if "low" in f or "high" in f:
        temps = f"{_v(f.get('low', '?'))}-{_v(f.get('high', '?'))} {unit}".strip()
    return "Weather: " + _join(
        f["conditions"],
        temps,
        f"{_v(f['precip_mm'])} mm" if "precip_mm" in f else None,
        f.get("wind"),
        "WORK STOPPED" if f.get("stopped") else None,
        f"{_v(f['hours_lost'])} h lost" if f.get("hours_lost") else None,
    )


def _lost(f: Mapping[str, Any]) -> str:
    how = "whole day lost" if f.get("whole_day") else f"{_v(f.get('hours', 0))} h lost"
    cals = f" on {', '.join(f['calendars'])}" if f.get("calendars") else ""
    return f"Lost time: {how}{cals}, cause {f['cause']}{_acts(f)}" + (
        f": {f['note']}" if f.get("note") else ""
    )


def _crew(f: Mapping[str, Any]) -> str:
    who = f["trade"] + (f" ({f['company']})" if f.get("company") else "")
    hours = f", {_v(f['hours'])} h" if "hours" in f else ""
    return f"Crew: {who} {f['headcount']} on site{hours}{_acts(f)}"


def _times(f: Mapping[str, Any]) -> str | None:
    """A visit's times: ``09:15-11:40``, ``in 09:15``, ``out 11:40``."""
    t_in, t_out = f.get("time_in"), f.get("time_out")
    if t_in and t_out:
        return f"{t_in:%H:%M}-{t_out:%H:%M}"
    if t_in:
        return f"in {t_in:%H:%M}"
    return f"out {t_out:%H:%M}" if t_out else None


def _need(f: Mapping[str, Any]) -> str:
    when = f"expected {_v(f['expected'])}" if f.get("expected") else "no expected date"
    return f"{f['activity']} needs {f['what']} ({f['category']}), {when}"


_SUMMARIES = {
    "started": lambda f: f"{f['activity']} started",
    "finished": lambda f: f"{f['activity']} finished",
    "remaining": lambda f: f"{f['activity']}: {working_days(f['days'])} left",
    "percent": lambda f: f"{f['activity']}: {_v(f['percent'])}% built",
    "weather": _weather,
    "crew": _crew,
    "lost-time": _lost,
    "need": _need,
    "cleared": lambda f: f"Need {f['item']} cleared" + (f": {f['note']}" if f.get("note") else ""),
    "delivery": lambda f: (
        "Delivery: "
        + _join(
            f["what"], f.get("quantity"), f"from {f['supplier']}" if f.get("supplier") else None
        )
        + _acts(f)
    ),
    "inspection": lambda f: f"Inspection: {f['what']}, {f['result'].upper()}" + _acts(f),
    "visitor": lambda f: (
        "Visitor: " + _join(f["name"], f.get("company"), f.get("purpose"), _times(f))
    ),
    "plant": lambda f: (
        "Plant: "
        + _join(
            f"{f['count']} x {f['what']}" if f.get("count") else f["what"],
            f"{_v(f['hours_worked'])} h worked" if "hours_worked" in f else None,
            ("BROKE DOWN" + (f", {_v(f['hours_down'])} h down" if "hours_down" in f else ""))
            if f.get("broken_down")
            else None,
        )
        + _acts(f)
    ),
    "instruction": lambda f: (
        f"Instruction ({f['form']}) from {f['given_by']}: {f['text']}" + _acts(f)
    ),
    "incident": lambda f: (
        "Incident: " + f["text"] + (" [SOMEONE HURT]" if f.get("injury") else "") + _acts(f)
    ),
    "safety": lambda f: (
        "Safety: " + f["text"] + (f"; done: {f['action']}" if f.get("action") else "")
    ),
    "note": lambda f: "Note: " + f["text"] + _acts(f),
    "correction": lambda f: (
        f"Correction of {f['supersedes']}"
        + (" (withdrawn)" if f.get("withdraw") else "")
        + f": {f['reason']}"
    ),
}
