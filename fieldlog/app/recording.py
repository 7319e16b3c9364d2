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

from fieldlog.app.forms import CHOICE, DAY, NUMBER, TEXT, WHOLE, YES_NO, Field, Form
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
    "days": "Days left", "percent": "Percent", "conditions": "Conditions",
    "high": "High temp", "low": "Low temp", "unit": "Temp unit", "precip_mm": "Rain/snow mm",
    "wind": "Wind", "stopped": "Work stopped", "hours_lost": "Hours lost", "trade": "Trade",
    "company": "Company", "headcount": "Headcount", "hours": "Hours", "activities": "Activities",
    "cause": "Cause", "whole_day": "Whole day lost", "calendars": "Calendars", "note": "Note",
    "what": "What", "category": "Kind", "expected": "Expected on", "supplier": "Supplier",
    "quantity": "Quantity", "activity": "Activity", "result": "Result",
    "inspector": "Inspector", "reference": "Reference", "name": "Name", "purpose": "Purpose",
    "text": "What", "given_by": "Given by", "form": "Verbal/written", "injury": "Someone hurt",
    "reported_to": "Reported to", "action": "Action taken", "reason": "Reason",
    "withdraw": "Withdraw it",
}

_KIND_OF_TYPE = {
    "text": TEXT, "int": WHOLE, "float": NUMBER, "bool": YES_NO, "date": DAY,
    "choice": CHOICE, "ids": TEXT, "names": TEXT, "activity": TEXT,
}

PICK_VISIT = ("delivery", "inspection", "visitor", "instruction", "note")
"""What the "delivery" key offers: things that came to site or were said on it."""
PICK_INCIDENT = ("incident", "safety")
"""What the "incident" key offers."""


def label(name: str) -> str:
    """The label of a field in forms and lists."""
    return _LABELS.get(name, name.replace("_", " ").capitalize())


def form_field(s: FieldSpec, default: Any = None, placeholder: str = "") -> Field:
    """A form field for one journal field spec."""
    if not placeholder and s.type in ("ids", "names"):
        placeholder = "comma separated"
    return Field(
        name=s.name, label=label(s.name), kind=_KIND_OF_TYPE[s.type], required=s.required,
        choices=s.choices, default=default, placeholder=placeholder or s.help, low=s.low,
        high=s.high,
    )


def entry_form(kind: str, *, intro: str = "", defaults: Mapping[str, Any] | None = None,
               fixed: Mapping[str, Any] | None = None,
               hints: Mapping[str, str] | None = None) -> Form:
    """The form for an entry of ``kind``.

    Args:
        kind: a journal entry kind.
        intro: one line under the title (which activity, which day).
        defaults: values the fields open with.
        fixed: fields the caller fills in (the selected activity): not asked.
        hints: placeholders replacing the spec's help text.
    """
    defaults = defaults or {}
    fixed = fixed or {}
    hints = hints or {}
    fields = tuple(
        form_field(s, defaults.get(s.name), hints.get(s.name, ""))
        for s in KINDS[kind]
        if s.name not in fixed and s.type != "entry" and not (kind == "correction"
                                                               and s.name == "corrects")
    )
    return Form(KIND_TITLES.get(kind, kind), fields, intro=intro)


def entry_fields(values: Mapping[str, Any], fixed: Mapping[str, Any] | None = None
                 ) -> dict[str, Any]:
    """The fields to record: what the form read (empty ones left out) plus the fixed ones."""
    out = {k: v for k, v in values.items() if v is not None}
    out.update(fixed or {})
    return out


def record(session: SiteSession, kind: str, fields: Mapping[str, Any],
           day: date | None = None) -> Entry:
    """Append one entry for ``day`` to the site's journal.

    ``day`` None means the app's today; for a correction, the day of the corrected entry.

    Raises:
        EntryRefused: the journal refused it; nothing was written.
        JournalError: the log could not be written.
    """
    return record_entry(session.folder, session.site, kind, day, dict(fields),
                        today=session.today)
