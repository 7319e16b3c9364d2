"""The one place where the app turns a key press into a journal entry.

Forms are built from the journal's own field specs (:data:`fieldlog.journal.entries.KINDS`), so
the app asks for exactly what ``fieldlog record`` asks for, in the same order, with the same
ranges and choices; the journal then checks the entry again and writes it. Nothing here knows
how entries are stored.
"""

from __future__ import annotations

from collections.abc import Mapping
from datetime import date
from typing import Any

from fieldlog.app.forms import (
    CHOICE,
    DAY,
    LINES,
    NUMBER,
    TEXT,
    TIME,
    WHOLE,
    YES_NO,
    Field,
    Form,
)
from fieldlog.app.session import SiteSession
from fieldlog.journal import record_entry
from fieldlog.journal.entries import KINDS, Entry, FieldSpec

KIND_TITLES: Mapping[str, str] = {
    "started": "Started",
    "finished": "Finished",
    "remaining": "Working days left",
    "percent": "Percent complete",
    "weather": "Weather today",
    "crew": "Crew on site today",
    "lost-time": "Time lost today",
    "need": "Readiness: something the activity needs before it can start",
    "cleared": "Readiness item cleared",
    "plant": "Plant or equipment",
    "delivery": "Delivery",
    "inspection": "Inspection or test",
    "visitor": "Visitor",
    "instruction": "Instruction received",
    "incident": "Incident",
    "safety": "Safety observation",
    "note": "Note",
    "correction": "Correction",
}
"""Entry kind -> title of its form and its name in lists."""

_LABELS: Mapping[str, str] = {
    "days": "Days left",
    "percent": "Percent",
    "conditions": "Conditions",
    "high": "High temp",
    "low": "Low temp",
    "unit": "Temp unit",
    "precip_mm": "Rain/snow mm",
    "wind": "Wind",
    "stopped": "Work stopped",
    "hours_lost": "Hours lost",
    "trade": "Trade",
    "company": "Company",
    "headcount": "Headcount",
    "hours": "Hours",
    "activities": "Activities",
    "cause": "Cause",
    "whole_day": "Whole day lost",
    "calendars": "Calendars",
    "note": "Note",
    "what": "What",
    "category": "Kind",
    "expected": "Expected on",
    "supplier": "Supplier",
    "quantity": "Quantity",
    "activity": "Activity",
    "result": "Result",
    "inspector": "Inspector",
    "reference": "Reference",
    "name": "Name",
    "purpose": "Purpose",
    "text": "What",
    "given_by": "Given by",
    "form": "Verbal/written",
    "injury": "Someone hurt",
    "reported_to": "Reported to",
    "action": "Action taken",
    "reason": "Reason",
    "withdraw": "Withdraw it",
    "count": "How many",
    "hours_worked": "Hours worked",
    "broken_down": "Broke down",
    "hours_down": "Hours down",
    "time_in": "Time in",
    "time_out": "Time out",
}

_KIND_OF_TYPE = {
    "text": TEXT,
    "int": WHOLE,
    "float": NUMBER,
    "bool": YES_NO,
    "date": DAY,
    "time": TIME,
    "choice": CHOICE,
    "ids": TEXT,
    "names": TEXT,
    "activity": TEXT,
}

LONG_TEXT: frozenset[tuple[str, str]] = frozenset(
    {
        ("note", "text"),
        ("incident", "text"),
        ("safety", "text"),
        ("instruction", "text"),
        ("lost-time", "note"),
        ("delivery", "note"),
        ("inspection", "note"),
        ("plant", "note"),
    }
)
"""Fields that often take several lines: a small text box (Enter is a new line there)."""

FIRST_FIELDS: Mapping[str, tuple[str, ...]] = {
    "weather": ("conditions", "stopped", "hours_lost"),
    "lost-time": ("cause", "whole_day", "on", "hours"),
}
"""Fields moved to the top of a form, in this order: what is asked most at the end of a
shift comes first, so it is a Tab or two away (the rest keep the journal's order)."""

DAY_FIELD = "on"
"""The form field naming the day an entry describes; empty means the app's today. It is not
a journal field: the app passes it as the entry's day."""

PICK_VISIT = ("delivery", "inspection", "visitor", "instruction", "note")
"""What the "delivery" key offers: things that came to site or were said on it."""
PICK_INCIDENT = ("incident", "safety")
"""What the "incident" key offers."""


def label(name: str) -> str:
    """The label of a field in forms and lists."""
    return _LABELS.get(name, name.replace("_", " ").capitalize())


def form_field(
    s: FieldSpec, default: Any = None, placeholder: str = "", kind_of_entry: str = ""
) -> Field:
    """A form field for one journal field spec (its bounds stay the journal's)."""
    if not placeholder and s.type in ("ids", "names"):
        placeholder = "comma separated"
    kind = LINES if (kind_of_entry, s.name) in LONG_TEXT else _KIND_OF_TYPE[s.type]
    if kind == TIME and not placeholder:
        placeholder = "hh:mm, e.g. 07:30"
    return Field(
        name=s.name,
        label=label(s.name),
        kind=kind,
        required=s.required,
        choices=s.choices,
        default=default,
        placeholder=placeholder or s.help,
        spec=s,
        future=s.type == "date",
    )


def day_field() -> Field:
    """The "Day" field of a form: which day the entry describes (empty: today)."""
    return Field(DAY_FIELD, "Day", DAY, placeholder="today (or yesterday, fri, -2, 2026-09-25)")


def entry_form(
    kind: str,
    *,
    intro: str = "",
    defaults: Mapping[str, Any] | None = None,
    fixed: Mapping[str, Any] | None = None,
    hints: Mapping[str, str] | None = None,
    dated: bool = False,
) -> Form:
    """The form for an entry of ``kind``.

    Args:
        kind: a journal entry kind.
        intro: one line under the title (which activity, which day).
        defaults: values the fields open with.
        fixed: fields the caller fills in (the selected activity): not asked.
        hints: placeholders replacing the spec's help text.
        dated: add the "Day" field (:data:`DAY_FIELD`), after the kind's own fields unless
            :data:`FIRST_FIELDS` puts it higher.
    """
    defaults = defaults or {}
    fixed = fixed or {}
    hints = hints or {}
    fields = [
        form_field(s, defaults.get(s.name), hints.get(s.name, ""), kind)
        for s in KINDS[kind]
        if s.name not in fixed
        and s.type != "entry"
        and not (kind == "correction" and s.name == "corrects")
    ]
    if dated:
        fields.append(day_field())
    first = FIRST_FIELDS.get(kind, ())
    fields.sort(key=lambda f: first.index(f.name) if f.name in first else len(first))
    return Form(KIND_TITLES.get(kind, kind), tuple(fields), intro=intro)


def entry_fields(
    values: Mapping[str, Any], fixed: Mapping[str, Any] | None = None
) -> dict[str, Any]:
    """The fields to record: what the form read (empty ones left out) plus the fixed ones."""
    out = {k: v for k, v in values.items() if v is not None}
    out.update(fixed or {})
    return out


def record(
    session: SiteSession, kind: str, fields: Mapping[str, Any], day: date | None = None
) -> Entry:
    """Append one entry for ``day`` to the site's journal.

    ``day`` None means the app's today; for a correction, the day of the corrected entry.

    Raises:
        EntryRefused: the journal refused it; nothing was written.
        JournalError: the log could not be written.
    """
    return record_entry(session.folder, session.site, kind, day, dict(fields), today=session.today)
