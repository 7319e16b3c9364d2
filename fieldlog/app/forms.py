"""Small forms as data: which fields a form has, and turning what was typed into values.

The modal screen (:mod:`fieldlog.app.screens.form`) draws any :class:`Form`; this module stays
pure so parsing and checking are tested without a terminal. A field that cannot be read gives
one sentence saying what to type, shown under the field; nothing is recorded until every field
reads.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from datetime import date
from typing import Any

from fieldlog.bounds import RECORD_HIDDEN, check_date, check_line
from fieldlog.day_words import DayProblem, parse_day
from fieldlog.errors import OutOfBounds
from fieldlog.journal.fields import FieldProblem, FieldSpec, coerce

TEXT, LINES, WHOLE, NUMBER, DAY, TIME, CHOICE, YES_NO = (
    "text",
    "lines",
    "whole",
    "number",
    "day",
    "time",
    "choice",
    "yes/no",
)
KINDS = (TEXT, LINES, WHOLE, NUMBER, DAY, TIME, CHOICE, YES_NO)
NUMBER_KINDS = frozenset({WHOLE, NUMBER})

_SPEC_TYPE = {WHOLE: "int", NUMBER: "float", TIME: "time"}


@dataclass(frozen=True)
class Field:
    """One field of a form.

    A number field opens *empty* with its current value as the placeholder: typing replaces
    the value instead of adding digits to it, and Enter on the empty field keeps it. A text
    field opens holding its default.
    """

    name: str
    """Key of the value in the result."""
    label: str
    kind: str = TEXT
    """One of :data:`KINDS`."""
    required: bool = False
    choices: tuple[str, ...] = ()
    """For :data:`CHOICE`: the allowed values, shown as they are."""
    default: Any = None
    placeholder: str = ""
    spec: FieldSpec | None = None
    """The journal's spec of the field: its bounds are the form's bounds (one set of rules
    for the app and the command line)."""
    future: bool = False
    """For :data:`DAY`: a later day than today is allowed (an expected date)."""

    def journal_spec(self) -> FieldSpec:
        """The spec the value is checked against (a plain one when the form has its own)."""
        return self.spec or FieldSpec(self.name, _SPEC_TYPE.get(self.kind, "text"))


@dataclass(frozen=True)
class Form:
    """A titled list of fields; ``intro`` says what the form records, in one line."""

    title: str
    fields: tuple[Field, ...]
    intro: str = ""
    submit: str = "Record"


@dataclass(frozen=True)
class Reading:
    """The result of reading a form: values, or per-field problems."""

    values: Mapping[str, Any] = field(default_factory=dict)
    problems: Mapping[str, str] = field(default_factory=dict)

    @property
    def ok(self) -> bool:
        """True when every field read."""
        return not self.problems


@dataclass(frozen=True)
class DayContext:
    """What day fields are read against: the app's today and the site's earliest day."""

    today: date
    earliest: date | None = None


def read_form(form: Form, raw: Mapping[str, Any], days: DayContext | None = None) -> Reading:
    """Turn the widgets' raw values (text, bool, chosen value) into typed values.

    Empty optional fields give None (a number field with a current value gives that value).
    Problems are keyed by field name.
    """
    values: dict[str, Any] = {}
    problems: dict[str, str] = {}
    for f in form.fields:
        try:
            values[f.name] = read_field(f, raw.get(f.name), days)
        except ValueError as exc:
            problems[f.name] = str(exc)
    return Reading(values, problems)


def read_field(f: Field, raw: Any, days: DayContext | None = None) -> Any:
    """One field's value. Nothing typed is altered: a value reads as typed or is refused.

    Raises:
        ValueError: with the sentence to show under the field.
    """
    if f.kind == YES_NO:
        return bool(raw)
    text = "" if raw is None else str(raw).strip()
    if not text and f.kind in NUMBER_KINDS and f.default is not None:
        return f.default
    if not text:
        if f.required:
            raise ValueError(f"{f.label} is needed")
        return None
    if f.kind in (TEXT, LINES):
        return _bounded(_recordable_text, text, f.label)
    if f.kind == CHOICE:
        if text not in f.choices:
            raise ValueError(f"choose one of: {', '.join(f.choices)}")
        return text
    if f.kind == DAY:
        if days is None:
            raise TypeError(f"day field {f.name} read without a DayContext")
        try:
            day = parse_day(
                text, days.today, earliest=days.earliest, latest=None if f.future else days.today
            )
        except DayProblem as exc:
            raise ValueError(str(exc)) from None
        return _bounded(check_date, day, f.label)
    try:
        return coerce(f.journal_spec(), text)
    except FieldProblem as exc:
        raise ValueError(f"{f.label}: {_after_name(f, str(exc))}") from None


def _recordable_text(text: str, label: str) -> str:
    """What the journal takes as new text: its length, and no DEL, C1 control or direction
    override (pasted text can hold them), said under the field rather than after Record."""
    return check_line(text, label, RECORD_HIDDEN)


def _after_name(f: Field, message: str) -> str:
    """The journal's message without its leading field name (the label is shown instead)."""
    name = f.journal_spec().name
    return message[len(name) + 1 :] if message.startswith(name + " ") else message


def _bounded(check: Callable[[Any, str], Any], value: Any, label: str) -> Any:
    """The command line's check from :mod:`fieldlog.bounds`, as the sentence under a field."""
    try:
        return check(value, label)
    except OutOfBounds as exc:
        raise ValueError(exc.problem) from None


def initial_text(f: Field) -> str:
    """What the field's input holds when the form opens (number fields open empty)."""
    if f.default is None or f.kind == YES_NO or f.kind in NUMBER_KINDS:
        return ""
    if isinstance(f.default, date):
        return f.default.isoformat()
    return str(f.default)


def placeholder_text(f: Field) -> str:
    """The grey text of an empty field: a number's current value, or the field's hint."""
    if f.kind in NUMBER_KINDS and f.default is not None:
        value = f.default
        shown = str(int(value)) if float(value).is_integer() else str(value)
        return f"{shown} now: type to replace, Enter keeps it"
    if f.kind == DAY and not f.placeholder:
        return "today, yesterday, fri, -2 or 2026-09-25"
    return f.placeholder
