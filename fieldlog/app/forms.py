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

from fieldlog.bounds import check_date, check_text
from fieldlog.errors import OutOfBounds

TEXT, WHOLE, NUMBER, DAY, CHOICE, YES_NO = "text", "whole", "number", "day", "choice", "yes/no"
KINDS = (TEXT, WHOLE, NUMBER, DAY, CHOICE, YES_NO)


@dataclass(frozen=True)
class Field:
    """One field of a form."""

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
    low: float | None = None
    """Smallest number allowed (whole and number kinds)."""
    high: float | None = None
    """Largest number allowed."""


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


def read_form(form: Form, raw: Mapping[str, Any]) -> Reading:
    """Turn the widgets' raw values (text, bool, chosen value) into typed values.

    Empty optional fields give None. Problems are keyed by field name.
    """
    values: dict[str, Any] = {}
    problems: dict[str, str] = {}
    for f in form.fields:
        try:
            values[f.name] = read_field(f, raw.get(f.name))
        except ValueError as exc:
            problems[f.name] = str(exc)
    return Reading(values, problems)


def read_field(f: Field, raw: Any) -> Any:
    """One field's value.

    Raises:
        ValueError: with the sentence to show under the field.
    """
    if f.kind == YES_NO:
        return bool(raw)
    text = "" if raw is None else str(raw).strip()
    if not text:
        if f.required:
            raise ValueError(f"{f.label} is needed")
        return None
    if f.kind == TEXT:
        return _bounded(check_text, text, f.label)
    if f.kind == CHOICE:
        if text not in f.choices:
            raise ValueError(f"choose one of: {', '.join(f.choices)}")
        return text
    if f.kind == DAY:
        try:
            day = date.fromisoformat(text[:40])
        except ValueError:
            raise ValueError("type a date like 2026-03-02") from None
        return _bounded(check_date, day, f.label)
    if f.kind == WHOLE:
        try:
            number: float = int(text)
        except ValueError:
            raise ValueError("type a whole number, like 3") from None
    else:
        try:
            number = float(text.replace(",", "."))
        except ValueError:
            raise ValueError("type a number, like 2.5") from None
    if f.low is not None and number < f.low:
        raise ValueError(f"{f.label} cannot be less than {_num(f.low)}")
    if f.high is not None and number > f.high:
        raise ValueError(f"{f.label} cannot be more than {_num(f.high)}")
    return number


def _bounded(check: Callable[[Any, str], Any], value: Any, label: str) -> Any:
    """The command line's check from :mod:`fieldlog.bounds`, as the sentence under a field."""
    try:
        return check(value, label)
    except OutOfBounds as exc:
        raise ValueError(exc.problem) from None


def _num(x: float) -> str:
    return str(int(x)) if float(x).is_integer() else str(x)


def initial_text(f: Field) -> str:
    """What the field's input shows when the form opens."""
    if f.default is None or f.kind == YES_NO:
        return ""
    if isinstance(f.default, date):
        return f.default.isoformat()
    return str(f.default)
