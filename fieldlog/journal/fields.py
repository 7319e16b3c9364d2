"""One field of an entry: its spec, and checking a value against it.

Kept apart from the entry kinds so that the rules for a value (an activity id, a whole
number of days, a date, one of a few choices) are in one place for the command line, the app
and the reader of stored files alike. Text typed on a command line is accepted for every type
and parsed here, so every caller gets the same message for the same mistake.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass
from datetime import date, datetime, time
from typing import Any

from fieldlog.bounds import MAX_COUNTER, check_date, check_text, shown
from fieldlog.errors import OutOfBounds

_ID_RE = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._-]{0,31}$")
_ENTRY_ID_RE = re.compile(r"^[a-z0-9][a-z0-9-]{4,22}[a-z0-9]\.([1-9][0-9]{0,9})$")
_NAME_RE = re.compile(r"^[A-Za-z0-9][A-Za-z0-9 ._-]{0,63}$")


@dataclass(frozen=True)
class FieldSpec:
    """One field of an entry kind.

    Attributes:
        name: the TOML key.
        type: ``text``, ``int``, ``float``, ``bool``, ``date``, ``time`` (of day, to the
            minute), ``choice``, ``activity`` (an
            activity id), ``ids`` (activity ids), ``names`` (a list of plain names, e.g.
            calendars) or ``entry`` (an entry id).
        required: the entry is refused without it.
        choices: allowed values of a ``choice``.
        low, high: inclusive bounds of a number.
        help: one line for ``--help``.
        cli: how the command line asks for it: ``"positional"`` or an option such as
            ``"--kind"`` (default: ``--`` and the name with dashes).
    """

    name: str
    type: str
    required: bool = False
    choices: tuple[str, ...] = ()
    low: float | None = None
    high: float | None = None
    help: str = ""
    cli: str | None = None


class FieldProblem(ValueError):
    """A field value has the wrong shape; the message says which field and what is wanted."""


def coerce(s: FieldSpec, value: Any) -> Any:
    """Check and normalise one value for field ``s``; text from a command line is parsed.

    Returns the value as it is stored: ints stay ints, numbers of a float field become float,
    text is stripped, lists become lists of stripped text.

    Raises:
        FieldProblem: wrong type, out of range, or not one of the choices.
    """
    t = s.type
    if t in ("text", "activity", "entry"):
        if not isinstance(value, str) or not value.strip():
            raise FieldProblem(f"{s.name} must be text, not {value!r}")
        text = _bounded(check_text, value.strip(), s.name)
        if t == "activity" and not _ID_RE.match(text):
            raise FieldProblem(f"{s.name} {shown(text)} is not an activity id")
        entry_id = _ENTRY_ID_RE.match(text) if t == "entry" else None
        if t == "entry" and (entry_id is None or int(entry_id[1]) > MAX_COUNTER):
            raise FieldProblem(f"{s.name} {shown(text)} is not an entry id like site-laptop-1.42")
        if any(ord(c) < 32 and c not in "\n\t" for c in text):
            raise FieldProblem(f"{s.name} contains control characters")
        return text
    if t == "bool":
        if isinstance(value, str) and value.lower() in ("true", "yes", "1", "false", "no", "0"):
            return value.lower() in ("true", "yes", "1")
        if not isinstance(value, bool):
            raise FieldProblem(f"{s.name} must be true or false, not {shown(value)}")
        return value
    if t in ("int", "float"):
        return _number(s, value)
    if t == "date":
        if isinstance(value, str):
            try:
                value = date.fromisoformat(value.strip()[:40])
            except ValueError:
                raise FieldProblem(
                    f"{s.name} {shown(value)} is not a date like 2026-09-18"
                ) from None
        if isinstance(value, datetime) or not isinstance(value, date):
            raise FieldProblem(f"{s.name} must be a date, not {shown(value)}")
        return _bounded(check_date, value, s.name)
    if t == "time":
        return _time_of_day(s, value)
    if t == "choice":
        if not isinstance(value, str):
            raise FieldProblem(f"{s.name} must be text, not {shown(value)}")
        if s.choices and value not in s.choices:
            raise FieldProblem(f"{s.name} {shown(value)} is not one of: {', '.join(s.choices)}")
        return value
    if t in ("ids", "names"):
        if isinstance(value, str):
            value = [v for v in (p.strip() for p in value.split(",")) if v]
        if not isinstance(value, list | tuple) or not all(isinstance(v, str) for v in value):
            raise FieldProblem(f"{s.name} must be a list of names, not {shown(value)}")
        items = [v.strip() for v in value]
        rx = _ID_RE if t == "ids" else _NAME_RE
        for v in items:
            if not rx.match(v):
                raise FieldProblem(
                    f"{s.name} has {shown(v)}, which is not a valid "
                    f"{'activity id' if t == 'ids' else 'name'}"
                )
        if len(set(items)) != len(items):
            raise FieldProblem(f"{s.name} lists the same name twice")
        return items
    raise AssertionError(f"unknown field type {t}")


_WHOLE_RE = re.compile(r"^[+-]?[0-9]{1,12}$")
_DECIMAL_RE = re.compile(r"^[+-]?([0-9]{1,12}(\.[0-9]{0,6})?|\.[0-9]{1,6})$")
"""Numbers as typed: plain digits with at most one decimal point. Python's own ``float()``
also takes ``1e9``, ``1_000``, ``nan`` and ``inf``; a person typing any of those meant
something else, so they are refused rather than read."""


def _number(s: FieldSpec, value: Any) -> int | float:
    if isinstance(value, str):
        text = value.strip()
        if s.type == "int" and _WHOLE_RE.match(text):
            value = int(text)
        elif s.type == "float" and _DECIMAL_RE.match(text):
            value = float(text)
        else:
            what = "a whole number like 3" if s.type == "int" else "a number like 2.5"
            raise FieldProblem(f"{s.name} {shown(text)} is not {what}")
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise FieldProblem(f"{s.name} must be a number, not {shown(value)}")
    if s.type == "int":
        if isinstance(value, float):
            if not value.is_integer():
                raise FieldProblem(f"{s.name} must be a whole number, not {value}")
            value = int(value)
    else:
        value = float(value)
        if value != value or value in (float("inf"), float("-inf")):
            raise FieldProblem(f"{s.name} must be a finite number")
    if s.low is not None and value < s.low:
        raise FieldProblem(f"{s.name} {shown(value)} is below {_fmt(s.low)}")
    if s.high is not None and value > s.high:
        raise FieldProblem(f"{s.name} {shown(value)} is above {_fmt(s.high)}")
    return value


_TIME_RE = re.compile(r"^([01]?[0-9]|2[0-3])[:.h]?([0-5][0-9])$")


def _time_of_day(s: FieldSpec, value: Any) -> time:
    """A time of day to the minute: ``07:30``, ``7:30``, ``0730`` or a stored TOML time."""
    if isinstance(value, str):
        m = _TIME_RE.match(value.strip())
        if not m:
            raise FieldProblem(f"{s.name} {shown(value.strip())} is not a time like 07:30")
        return time(int(m[1]), int(m[2]))
    if not isinstance(value, time) or value.tzinfo is not None:
        raise FieldProblem(f"{s.name} must be a time of day, not {shown(value)}")
    if value.second or value.microsecond:
        raise FieldProblem(f"{s.name} {value} has seconds: give hours and minutes")
    return value


def _bounded(check: Callable[[Any, str], Any], value: Any, what: str) -> Any:
    """A check from :mod:`fieldlog.bounds`, its refusal worded as this field's problem."""
    try:
        return check(value, what)
    except OutOfBounds as exc:
        raise FieldProblem(exc.problem) from None


def _fmt(v: float) -> str:
    return str(int(v)) if float(v).is_integer() else str(v)
